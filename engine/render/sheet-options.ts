/**
 * Options of the depth-section sheets: paper, horizontal scale, vertical exaggeration, arcs.
 * One record of defaults and limits (SECTION_SHEET_DEFAULTS, SHEET_LIMITS), one validator
 * that names the bad field and why (for 400 answers), one resolver. O(1).
 */
import type { PaperName } from './page.js';

export interface SectionSheetOptions {
  /** Paper, landscape: "A4" or "A3" (ISO 216). */
  paper?: PaperName;
  /** Horizontal scale 1:n, n a whole number; "auto" (default) picks one, see chooseScale. */
  scale?: number | 'auto';
  /** Vertical scale ÷ horizontal scale (1 = true scale); "auto" (default) picks one. */
  verticalExaggeration?: number | 'auto';
  /** Draw the depth arc about each labelled geophone where the interpretation gives normalDepth (default true). */
  showArcs?: boolean;
}

export interface ResolvedSheetOptions {
  paper: PaperName;
  scale: number | 'auto';
  verticalExaggeration: number | 'auto';
  showArcs: boolean;
}

/**
 * Defaults, and where each comes from.
 * - paper A4: the page of reports and office printers (ISO 216); common practice. A3 is
 *   offered for long lines and fold-out report figures.
 * - scale "auto": the largest scale of the ISO 5455 series (1, 2, 5 × 10ⁿ; ISO 5455:1979,
 *   from memory, with 2.5 × 10ⁿ added, see ISO_SCALES) at which the geophone spread fits
 *   one sheet, unless that would put geophones closer than MIN_GEOPHONE_SPACING_MM on paper; then the largest series scale that keeps
 *   them that far apart, and the line is paged over several sheets. Shots off the ends are
 *   drawn in place if that costs no scale step, else marked at the sheet's edge.
 * - verticalExaggeration "auto": the largest of 1, 2, 5, 10 at which the section fits the
 *   sheet's height. Engineering sections are drawn at true scale where they can be and are
 *   rarely exaggerated beyond 10:1 (common practice, from memory).
 * - showArcs true: the arcs show how the refractor was found (the envelope of the arcs).
 */
export const SECTION_SHEET_DEFAULTS: ResolvedSheetOptions = {
  paper: 'A4',
  scale: 'auto',
  verticalExaggeration: 'auto',
  showArcs: true,
};

/**
 * Scales "auto" chooses from, as n of 1:n, largest scale first: the ISO 5455 series (1, 2,
 * 5 × 10ⁿ) with 2.5 × 10ⁿ added (1:250, 1:2500 are usual on engineering drawings; common
 * practice, from memory).
 */
export const ISO_SCALES: readonly number[] = [10, 20, 25, 50, 100, 200, 250, 500, 1000, 2000, 2500, 5000, 10_000, 20_000, 25_000, 50_000, 100_000];
/** Exaggerations "auto" chooses from, smallest first. */
export const AUTO_EXAGGERATIONS: readonly number[] = [1, 2, 5, 10];
/**
 * Closest two geophones may sit on paper before "auto" pages the line instead of shrinking
 * it, mm: a geophone mark is 1.8 mm wide (our choice, so marks stay apart).
 */
export const MIN_GEOPHONE_SPACING_MM = 2;

export const SHEET_LIMITS = {
  /** At most this many sheets per drawing (bounds the work and size of one answer; our choice). */
  maxSheets: 40,
  /** Scale 1:n with n from 1 to this. */
  maxScaleDenominator: 1_000_000,
  /** Vertical exaggeration from 1 (true scale) to this. */
  maxVerticalExaggeration: 50,
} as const;

export const PAPERS: readonly PaperName[] = ['A4', 'A3'];
const FIELDS = ['paper', 'scale', 'verticalExaggeration', 'showArcs'] as const;

export interface SheetOptionProblem {
  /** The option at fault. */
  field: string;
  message: string;
}

type Parsed<T> = { value: T } | { problem: string };

function parsePaper(raw: unknown): Parsed<PaperName> {
  if (typeof raw !== 'string') return { problem: `must be "A4" or "A3" (landscape), got ${describe(raw)}` };
  const upper = raw.trim().toUpperCase();
  return upper === 'A4' || upper === 'A3' ? { value: upper } : { problem: `must be "A4" or "A3" (landscape), got "${raw}"` };
}

/** "500", "1:500", 500 → 500. */
function parseScale(raw: unknown): Parsed<number | 'auto'> {
  if (raw === 'auto') return { value: 'auto' };
  const text = typeof raw === 'number' ? String(raw) : typeof raw === 'string' ? raw.trim().replace(/^1\s*:\s*/, '') : null;
  if (text === null || !/^\d+$/.test(text)) {
    return { problem: `must be the n of a 1:n scale, a whole number such as 500 (or "1:500", or "auto"), got ${describe(raw)}` };
  }
  const n = Number(text);
  if (n < 1 || n > SHEET_LIMITS.maxScaleDenominator) return { problem: `1:${text} is outside 1:1 to 1:${SHEET_LIMITS.maxScaleDenominator}` };
  return { value: n };
}

/** "5", "5:1", 5 → 5. */
function parseExaggeration(raw: unknown): Parsed<number | 'auto'> {
  if (raw === 'auto') return { value: 'auto' };
  const text = typeof raw === 'number' ? String(raw) : typeof raw === 'string' ? raw.trim().replace(/\s*:\s*1$/, '') : null;
  const value = text !== null && /^\d+(\.\d+)?$/.test(text) ? Number(text) : NaN;
  if (!Number.isFinite(value)) return { problem: `must be a number such as 5 (or "5:1", or "auto"), got ${describe(raw)}` };
  if (value < 1 || value > SHEET_LIMITS.maxVerticalExaggeration) {
    return { problem: `${text}:1 is outside 1:1 (true scale) to ${SHEET_LIMITS.maxVerticalExaggeration}:1; below 1:1 the section would be squashed` };
  }
  return { value };
}

function parseBoolean(raw: unknown): Parsed<boolean> {
  if (raw === true || raw === 'true' || raw === '1') return { value: true };
  if (raw === false || raw === 'false' || raw === '0') return { value: false };
  return { problem: `must be true or false, got ${describe(raw)}` };
}

function describe(raw: unknown): string {
  if (typeof raw === 'string') return `"${raw.length > 40 ? `${raw.slice(0, 40)}…` : raw}"`;
  if (raw === null) return 'null';
  if (Array.isArray(raw)) return 'a list';
  return typeof raw === 'number' || typeof raw === 'boolean' ? String(raw) : typeof raw;
}

/**
 * Parses options given as JSON values or as query strings ("A3", "1:500", "5:1", "false").
 * Absent (undefined or empty-string) fields take the defaults. Any other field is a problem
 * (a misspelt option is never ignored), so a route passes only these four fields, not its
 * other query parameters (e.g. `revision`). Options that depend on the line (a section too
 * tall for the sheet, too many sheets) are found by renderSectionSheets, which throws
 * SectionSheetError with problems of the same shape: both are 400 answers.
 */
export function parseSectionSheetOptions(raw: unknown): { options: ResolvedSheetOptions; problems: SheetOptionProblem[] } {
  const options: ResolvedSheetOptions = { ...SECTION_SHEET_DEFAULTS };
  const problems: SheetOptionProblem[] = [];
  if (raw === undefined || raw === null) return { options, problems };
  if (typeof raw !== 'object' || Array.isArray(raw)) {
    return { options, problems: [{ field: '', message: `section sheet options must be an object, got ${describe(raw)}` }] };
  }
  const record = raw as Record<string, unknown>;
  for (const key of Object.keys(record)) {
    if (!(FIELDS as readonly string[]).includes(key) && record[key] !== undefined) {
      problems.push({ field: key, message: `is not an option of the section; the options are ${FIELDS.join(', ')}` });
    }
  }
  const take = <T>(field: (typeof FIELDS)[number], parse: (v: unknown) => Parsed<T>, set: (v: T) => void) => {
    const value = record[field];
    if (value === undefined || value === '') return;
    const parsed = parse(value);
    if ('problem' in parsed) problems.push({ field, message: parsed.problem });
    else set(parsed.value);
  };
  take('paper', parsePaper, (v) => (options.paper = v));
  take('scale', parseScale, (v) => (options.scale = v));
  take('verticalExaggeration', parseExaggeration, (v) => (options.verticalExaggeration = v));
  take('showArcs', parseBoolean, (v) => (options.showArcs = v));
  return { options, problems };
}

/** Every problem with the options, each naming its field and why; empty when they are good. */
export function sectionSheetOptionProblems(raw: unknown): SheetOptionProblem[] {
  return parseSectionSheetOptions(raw).problems;
}

/** Thrown by renderSectionSheets for options it cannot draw (bad values, or a line that would need too many sheets). */
export class SectionSheetError extends Error {
  constructor(readonly problems: SheetOptionProblem[]) {
    super(problems.map((p) => (p.field ? `${p.field}: ${p.message}` : p.message)).join('; '));
    this.name = 'SectionSheetError';
  }
}
