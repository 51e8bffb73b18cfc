/**
 * The computations the service hands to its worker threads, by name: everything that costs
 * more than reading or writing a stored record (interpreting a line, drawing a figure,
 * making a synthetic line, writing a PDF or PNG, reading and picking or decimating a SEG-2 gather). Pure functions of their input, so a worker can run any of
 * them and the main thread never does.
 */
import { interpret } from '../../engine/pipeline/interpret.js';
import { renderSection, renderSectionSheet, renderSectionSheets, renderTravelTimes, sectionSheetCount } from '../../engine/render/index.js';
import { renderGrmFunctions } from '../../engine/render/grm-functions.js';
import { renderMethodComparison } from '../../engine/render/method-comparison.js';
import { compareMethods, comparisonSummary, type MethodComparisonSummary } from '../../engine/compare/method-comparison.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import type { Survey } from '../../engine/survey/survey.js';
import { syntheticSurveyFromRequest, type SyntheticRequest } from '../../engine/forward/synthetic-request.js';
import { refractorVisibility, visibilityNotes, type RefractorVisibility, type SyntheticNote } from '../../engine/forward/refractor-visibility.js';
import { exportFile, type ExportRequest } from '../export/export-file.js';
import type { ExportResult } from '../export/section-pages.js';
import { gatherPicksFromSeg2, type GatherPicksResult } from '../../engine/picking/gather-picks.js';
import type { GatherOverrides } from '../../engine/seg2/gather.js';
import { reviewGatherFromSeg2, type ReviewGatherResult } from '../../engine/picking/review-gather.js';

/** `grm`: the GRM functions of every XY (a page saying there are none on a line not interpreted by GRM). */
export type Figure = 'section' | 'traveltimes' | 'grm';

/** Each task's input and result, by name. */
export interface TaskTable {
  interpret: { input: { survey: Survey }; result: Interpretation };
  /** One interpretation and both drawings of it (every sheet of the section). */
  preview: { input: { survey: Survey }; result: { interpretation: Interpretation } & Drawings };
  drawing: { input: { figure: Figure; survey: Survey; interpretation: Interpretation }; result: string };
  /** The line by every method (the interpretation given is reused for its own method): the overlay figure and where they differ. */
  methods: { input: { survey: Survey; interpretation?: Interpretation }; result: { methodsSvg: string; comparison: MethodComparisonSummary } };
  /** One sheet (1-based) of the section at the default options, and how many there are; svg null past the last. */
  sectionSheet: { input: { survey: Survey; interpretation: Interpretation; sheet: number }; result: { svg: string | null; sheetCount: number } };
  /** How many sheets the section has at the default options (planned, none drawn). */
  sectionSheetCount: { input: { survey: Survey; interpretation: Interpretation }; result: number };
  drawings: { input: { survey: Survey; interpretation: Interpretation }; result: Drawings };
  synthetic: {
    input: { request: SyntheticRequest; interpret: boolean };
    result: { survey: Survey; interpretation: Interpretation | null; refractors: RefractorVisibility[]; notes: SyntheticNote[] };
  };
  /** A figure of a stored revision as PDF (every sheet) or PNG (one sheet). */
  exportFile: { input: ExportRequest; result: Promise<ExportResult> };
  /** One SEG-2 shot gather read and picked (POST /api/v1/gathers/picks). */
  gatherPicks: { input: { bytes: Uint8Array; overrides: GatherOverrides }; result: GatherPicksResult };
  /** A stored SEG-2 gather read and decimated for display, with the picker's own picks (GET …/gathers/:shotId/traces). */
  gatherTraces: { input: { bytes: Uint8Array; overrides: GatherOverrides; columns?: number; fromMs?: number; toMs?: number }; result: ReviewGatherResult };
}

/** Both drawings of a line: the section's first sheet, every sheet of it (a long line is paged), and the plot. */
export interface Drawings {
  sectionSvg: string;
  sectionSheets: string[];
  travelTimesSvg: string;
  /** The GRM functions, only when the line was interpreted by GRM. */
  grmSvg?: string;
}

export type TaskName = keyof TaskTable;
export type TaskMessage = { [K in TaskName]: { name: K; input: TaskTable[K]['input'] } }[TaskName];

function drawing(figure: Figure, survey: Survey, interpretation: Interpretation): string {
  if (figure === 'grm') return renderGrmFunctions(survey, interpretation);
  return figure === 'section' ? renderSection(survey, interpretation) : renderTravelTimes(survey, interpretation);
}

const TASKS: { [K in TaskName]: (input: TaskTable[K]['input']) => TaskTable[K]['result'] } = {
  interpret: ({ survey }) => interpret(survey),
  preview: ({ survey }) => {
    const interpretation = interpret(survey);
    return { interpretation, ...TASKS.drawings({ survey, interpretation }) };
  },
  drawing: ({ figure, survey, interpretation }) => drawing(figure, survey, interpretation),
  methods: ({ survey, interpretation }) => {
    const comparison = compareMethods(survey, interpretation);
    return { methodsSvg: renderMethodComparison(survey, comparison), comparison: comparisonSummary(comparison) };
  },
  sectionSheet: ({ survey, interpretation, sheet }) => renderSectionSheet(survey, interpretation, sheet),
  sectionSheetCount: ({ survey, interpretation }) => sectionSheetCount(survey, interpretation),
  drawings: ({ survey, interpretation }) => {
    const sectionSheets = renderSectionSheets(survey, interpretation);
    return {
      sectionSvg: sectionSheets[0],
      sectionSheets,
      travelTimesSvg: renderTravelTimes(survey, interpretation),
      ...(interpretation.grm ? { grmSvg: renderGrmFunctions(survey, interpretation) } : {}),
    };
  },
  synthetic: ({ request, interpret: withInterpretation }) => {
    const survey = syntheticSurveyFromRequest(request);
    const refractors = refractorVisibility(request);
    return { survey, interpretation: withInterpretation ? interpret(survey) : null, refractors, notes: visibilityNotes(refractors) };
  },
  exportFile: (request) => exportFile(request),
  gatherPicks: ({ bytes, overrides }) => gatherPicksFromSeg2(bytes, overrides),
  gatherTraces: ({ bytes, overrides, columns, fromMs, toMs }) => reviewGatherFromSeg2(bytes, overrides, { columns, fromMs, toMs }),
};

/** Runs one task here, in this thread (the worker's entry calls this). */
export function runTask(message: TaskMessage): unknown {
  const task = TASKS[message.name] as (input: unknown) => unknown;
  return task(message.input);
}
