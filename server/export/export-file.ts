/**
 * The export task (run in a compute worker, server/compute/tasks.ts): draw the figure of a
 * stored revision and turn it into a PDF or a PNG.
 */
import { renderTravelTimes, SectionSheetError } from '../../engine/render/index.js';
import { renderMethodComparison } from '../../engine/render/method-comparison.js';
import { compareMethods } from '../../engine/compare/method-comparison.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import type { Survey } from '../../engine/survey/survey.js';
import type { FontFiles } from './export-fonts.js';
import type { ExportFormat, ExportOptions } from './export-options.js';
import { assemblePages, sectionSheets, type ExportResult } from './section-pages.js';

/** `methods`: the first refractor by every method on one sheet (the same drawing as methods.svg). */
export type ExportFigure = 'section' | 'traveltimes' | 'methods';

export interface ExportRequest {
  figure: ExportFigure;
  format: ExportFormat;
  survey: Survey;
  interpretation: Interpretation;
  options: ExportOptions;
  /** The stored line: its name, revision number and when the revision was stored. */
  line: { name: string; revision: number; createdAt: string };
  fonts: FontFiles | null;
}

const FIGURE_TITLE: Record<ExportFigure, string> = { section: 'Depth section', traveltimes: 'Time–distance plot', methods: 'Methods compared' };

/** The one sheet of a single-sheet figure. The comparison interprets the line by the other methods (the stored interpretation serves its own). */
function singleSheet(figure: 'traveltimes' | 'methods', survey: Survey, interpretation: Interpretation): string {
  return figure === 'traveltimes' ? renderTravelTimes(survey, interpretation) : renderMethodComparison(survey, compareMethods(survey, interpretation));
}

export async function exportFile(request: ExportRequest): Promise<ExportResult> {
  const { figure, format, survey, interpretation, options, line, fonts } = request;
  let sheets: string[];
  try {
    sheets = figure === 'section' ? sectionSheets(survey, interpretation, options) : [singleSheet(figure, survey, interpretation)];
  } catch (e) {
    if (e instanceof SectionSheetError) return { kind: 'sheet-options', problems: e.problems.map((p) => ({ ...(p.field ? { field: p.field } : {}), message: p.message })) };
    throw e;
  }
  const meta = {
    title: `${FIGURE_TITLE[figure]} — ${line.name}`,
    subject: `Revision ${line.revision} of the line, drawn from its stored interpretation`,
    createdAt: line.createdAt,
  };
  return assemblePages(sheets, format, options, meta, fonts);
}
