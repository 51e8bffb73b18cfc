/**
 * The schemas every route declares: request bodies, query strings and responses. Fastify
 * validates requests with them, serialises responses with them (undeclared fields are
 * dropped, so the schemas must be complete: tests/server/schemas.test.ts checks that the
 * interpretation comes out exactly as the engine made it), and @fastify/swagger turns them
 * into GET /api/v1/openapi.json.
 *
 * A survey body is validated by the survey's own door (`server/survey-input.ts`): JSON
 * through `validateSurvey` (limits, the JSON Schema, the rules), a pick table through
 * `importPickTable` and then `validateSurvey`, so errors keep the contract's codes,
 * JSON pointers and sentences.
 */
import { Type, type TSchema } from '@sinclair/typebox';
import { SurveySchema } from '../engine/schemas/survey.js';
import { InterpretationSchema } from '../engine/schemas/interpretation.js';
import { MethodComparisonSchema } from '../engine/schemas/method-comparison.js';
import { EXPORT_DEFAULTS, EXPORT_LIMITS } from './export/export-options.js';

const closed = { additionalProperties: false } as const;

export const ProblemSchema = Type.Object(
  {
    path: Type.String({ description: 'JSON pointer of the offending value ("" for the whole body); in a pick table "/csv/line/<n>/<column>".' }),
    code: Type.String({ description: 'Stable kebab-case code.' }),
    message: Type.String({ description: 'The problem in words; in a pick table it starts with the line and column.' }),
    line: Type.Optional(Type.Integer({ minimum: 1, description: 'Pick tables: the CSV line of the problem.' })),
    column: Type.Optional(Type.Integer({ minimum: 1, description: 'Pick tables: the CSV column (1-based, as in the file).' })),
  },
  { ...closed, title: 'Problem' },
);

const SpreadSchema = {
  geophones: Type.Integer({ description: 'Number of geophones.' }),
  fromX: Type.Number({ description: 'x of the first geophone, m.' }),
  toX: Type.Number({ description: 'x of the last geophone, m.' }),
};

/** The 409 `layout_changed` answer's detail: what a refused revision would change (server/revision-layout.ts). */
export const LayoutChangeSchema = Type.Object(
  {
    stored: Type.Object({ ...SpreadSchema, revision: Type.Integer(), name: Type.String() }, closed),
    sent: Type.Object(SpreadSchema, closed),
    movedGeophones: Type.Union([Type.Integer(), Type.Null()], { description: 'Geophones at another x (same count only; null when the counts differ).' }),
    firstMoved: Type.Union([Type.Object({ geophone: Type.Integer({ description: '1-based.' }), storedX: Type.Number(), sentX: Type.Number() }, closed), Type.Null()]),
    largestShiftM: Type.Union([Type.Number(), Type.Null()], { description: 'Largest change of a geophone x, m (same count only).' }),
    confirmWith: Type.String({ description: 'The query string that stores the revision anyway: "layoutChange=confirm".' }),
    description: Type.String({ description: 'The change in words.' }),
  },
  { ...closed, title: 'LayoutChange' },
);

/** The contract's error body (api-v1.md): `problems` both inside `error` and beside it. */
export const ErrorBodySchema = Type.Object(
  {
    error: Type.Object(
      {
        code: Type.String({ description: 'A code from the error catalogue (server/errors.ts).' }),
        message: Type.String({ description: 'What is wrong, for a field geophysicist.' }),
        path: Type.String({ description: 'JSON pointer of the offending value, e.g. "/shots/2/times/7".' }),
        problems: Type.Optional(Type.Array(ProblemSchema)),
        layoutChange: Type.Optional(LayoutChangeSchema),
        byteOffset: Type.Optional(Type.Integer({ description: 'For a SEG-2 file that cannot be read: the byte offset of the problem.' })),
      },
      closed,
    ),
    problems: Type.Optional(Type.Array(ProblemSchema)),
  },
  { ...closed, title: 'Error' },
);

/** Error answers a route may give, by status. */
export function errorResponses(...statuses: number[]): Record<number, TSchema> {
  return Object.fromEntries(statuses.map((status) => [status, ErrorBodySchema]));
}

export const PickTableSchema = Type.String({
  title: 'PickTable',
  description: 'The survey as a pick table (CSV, one row per shot–geophone pair); see the README.',
});

/** A survey body: the survey document as JSON, or the same line as a pick table. */
export const surveyBody = {
  content: {
    'application/json': { schema: SurveySchema },
    'text/csv': { schema: PickTableSchema },
  },
};

export const revisionQuerySchema = Type.Object(
  { revision: Type.Optional(Type.Integer({ minimum: 1, description: 'A revision number; absent: the latest.' })) },
);

/** The answer header giving how many sheets the drawing has (the section's SVG, PNG and PDF routes alike). */
export const SHEET_COUNT_HEADER = 'Arcline-Sheet-Count';

/** `?sheet=k` of the section's SVG routes. */
export const sheetQuery = Type.Optional(
  Type.Integer({ minimum: 1, description: `Which sheet of a section paged over several (default 1, the first); the answer's ${SHEET_COUNT_HEADER} header gives how many.` }),
);

/** GET …/section-sheets.json: how many sheets the section has, and where each is. */
export const SectionSheetsSchema = Type.Object(
  {
    sheetCount: Type.Integer({ minimum: 1, description: 'How many sheets the depth section has at the default paper and scale (1 when the line fits one sheet).' }),
    sheets: Type.Array(Type.String(), { description: 'The SVG of each sheet, in order along the line (…/section.svg?sheet=k).' }),
  },
  { additionalProperties: false, title: 'SectionSheets' },
);

/** GET …/section.svg: a revision and one sheet of a section paged over several. */
export const sectionSvgQuerySchema = Type.Object({ revision: revisionQuerySchema.properties.revision, sheet: sheetQuery });

/** POST /api/v1/surveys/:id/revisions: `?layoutChange=confirm` says a new geophone layout is meant. */
/** Who stores a revision: a person's name as they want it recorded (our limit of 100 characters). */
export const authorQuerySchema = Type.Optional(
  Type.String({ minLength: 1, maxLength: 100, description: 'Who stores this revision (recorded with it and listed in `revisions`).' }),
);

export const revisionWriteQuerySchema = Type.Object({
  layoutChange: Type.Optional(
    Type.Literal('confirm', { description: 'Store the revision even though its geophone layout differs from the stored line (otherwise 409 layout_changed).' }),
  ),
  author: authorQuerySchema,
});

/** The paths of one revision's views (surveys.ts `links`), in every answer that stores or reads a revision. */
export const LinksSchema = Type.Object(
  {
    self: Type.String(),
    section: Type.String(),
    traveltimes: Type.String(),
    methods: Type.String({ description: 'The first refractor by every method on one section (methods.svg).' }),
    stations: Type.String(),
    interpretation: Type.String(),
  },
  { ...closed, title: 'Links' },
);

const shareUrl = Type.Union([Type.String(), Type.Null()], {
  description: 'Path of the read-only share page; null when revoked, and on a read by a request that could not write (no or wrong write token).',
});

export const SurveyCreatedSchema = Type.Object(
  {
    id: Type.String(),
    name: Type.String(),
    createdAt: Type.String(),
    revision: Type.Integer(),
    shareUrl,
    url: Type.String(),
    links: LinksSchema,
    interpretation: InterpretationSchema,
  },
  { ...closed, title: 'SurveyCreated' },
);

export const RevisionCreatedSchema = Type.Object(
  {
    id: Type.String(),
    name: Type.String(),
    createdAt: Type.String(),
    revision: Type.Integer(),
    revisionCreatedAt: Type.String(),
    author: Type.Optional(Type.Union([Type.String(), Type.Null()])),
    shareUrl,
    url: Type.String(),
    links: LinksSchema,
    interpretation: InterpretationSchema,
  },
  { ...closed, title: 'RevisionCreated' },
);

export const SurveyListSchema = Type.Array(
  Type.Object(
    {
      id: Type.String(),
      name: Type.String(),
      createdAt: Type.String(),
      updatedAt: Type.String(),
      latestRevision: Type.Integer(),
      url: Type.String(),
    },
    { ...closed, title: 'SurveyListItem', description: 'No share link: only a writer may see one (GET /api/v1/surveys/:id with the write token).' },
  ),
);

export const StoredSurveySchema = Type.Object(
  {
    id: Type.String(),
    name: Type.String(),
    createdAt: Type.String(),
    updatedAt: Type.String(),
    revision: Type.Integer(),
    revisionCreatedAt: Type.String(),
    latestRevision: Type.Integer(),
    revisions: Type.Array(
      Type.Object(
        {
          revision: Type.Integer(),
          name: Type.String(),
          createdAt: Type.String(),
          author: Type.Union([Type.String(), Type.Null()], { description: 'Who stored the revision (?author= of the write); null when not given.' }),
        },
        closed,
      ),
    ),
    gathers: Type.Optional(
      Type.Array(
        Type.Object(
          {
            shotId: Type.String(),
            revision: Type.Integer({ description: 'The revision the upload of this gather made.' }),
            createdAt: Type.String(),
            bytes: Type.Integer(),
            traces: Type.String({ description: 'Path of its decimated traces.' }),
          },
          closed,
        ),
        { description: 'The shot gathers uploaded into this line (the latest file per shot id).' },
      ),
    ),
    shareUrl,
    links: LinksSchema,
    survey: SurveySchema,
    interpretation: InterpretationSchema,
  },
  { ...closed, title: 'StoredSurvey' },
);

export const ShareIssuedSchema = Type.Object({ id: Type.String(), shareUrl: Type.String() }, { ...closed, title: 'ShareIssued' });

export const HealthSchema = Type.Object({ status: Type.Literal('ok') }, closed);

/** A response that is not JSON: described for the OpenAPI document, never serialised by a schema. */
export function fileResponse(mediaType: string, description: string): { description: string; content: Record<string, { schema: TSchema }> } {
  return { description, content: { [mediaType]: { schema: Type.String() } } };
}

/*
 * Query strings of the exports (…/section.pdf|png, …/traveltimes.pdf|png). Limits come
 * from server/export/export-options.ts; absent parameters take the defaults there.
 */
const exportRevision = Type.Optional(Type.Integer({ minimum: 1, description: 'A revision number; absent: the latest.' }));
const paper = Type.Optional(
  Type.String({ enum: ['A4', 'A3', 'a4', 'a3'], description: 'ISO 216 paper, landscape: A4 (default) or A3. PDF pages are this size.' }),
);
const dpi = Type.Optional(
  Type.Integer({ ...EXPORT_LIMITS.dpi, description: `PNG resolution, dots per inch (default ${EXPORT_DEFAULTS.dpi}); the image is the drawing's size on paper at this resolution.` }),
);
const sectionSheetQuery = {
  revision: exportRevision,
  paper,
  scale: Type.Optional(
    Type.Integer({ ...EXPORT_LIMITS.scale, description: 'Horizontal drawing scale 1:N, given as N (e.g. 500 for 1:500); absent: the line is fitted to the sheet.' }),
  ),
  exaggeration: Type.Optional(
    Type.Number({ ...EXPORT_LIMITS.verticalExaggeration, description: 'Vertical exaggeration (e.g. 2 for 2:1); absent: chosen to fill the sheet.' }),
  ),
  arcs: Type.Optional(Type.Boolean({ description: 'Draw the depth arcs (default true).' })),
};
export const sectionPdfQuerySchema = Type.Object(sectionSheetQuery);
const pngSheet = Type.Optional(Type.Integer({ minimum: 1, description: 'Which sheet of a drawing paged over several (default 1); the answer\'s Arcline-Sheet-Count header gives how many.' }));
export const sectionPngQuerySchema = Type.Object({
  ...sectionSheetQuery,
  dpi,
  sheet: pngSheet,
});
export const travelTimesPdfQuerySchema = Type.Object({ revision: exportRevision, paper });
// The time–distance plot is one sheet; `sheet` is taken (1, or a clear 400 beyond) so a link built for the section works.
export const travelTimesPngQuerySchema = Type.Object({ revision: exportRevision, dpi, sheet: pngSheet });
// The method comparison is one sheet too, with the same choices as the time–distance plot.
export const methodsPdfQuerySchema = travelTimesPdfQuerySchema;
export const methodsPngQuerySchema = travelTimesPngQuerySchema;

/** A binary file answer (PDF, PNG), for the OpenAPI document. */
export function binaryFileResponse(mediaType: string, description: string): { description: string; content: Record<string, { schema: TSchema }> } {
  return { description, content: { [mediaType]: { schema: Type.String({ format: 'binary' }) } } };
}

/** The answer of GET …/methods.json and POST /api/v1/previews/methods: the comparison and its figure. */
export const MethodsAnswerSchema = Type.Object(
  {
    comparison: MethodComparisonSchema,
    methodsSvg: Type.String({ description: 'The refractor by every method on one section, an SVG document.' }),
  },
  { additionalProperties: false, title: 'MethodsAnswer' },
);
