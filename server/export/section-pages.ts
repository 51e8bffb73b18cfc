/**
 * The section as sheets, and sheets as an exported file: every sheet a PDF page, or one
 * sheet as PNG. The assembly takes any list of drawn sheets, so a section paged over
 * several sheets (issue 11 item 3) is printed page by page without change here.
 */
import { renderSection } from '../../engine/render/index.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import type { Survey } from '../../engine/survey/survey.js';
import type { FontFiles } from './export-fonts.js';
import { EXPORT_LIMITS, type ExportFormat, type ExportOptions, type SectionSheetOptions } from './export-options.js';
import { sheetsToPdf, type PdfMeta } from './pdf-document.js';
import { sheetToPng } from './png-image.js';

/**
 * The section drawn for the chosen paper, one SVG per sheet. Until the sheet renderer
 * lands, the whole line on one sheet (the same drawing as section.svg); then this becomes
 * `renderSectionSheets(survey, interpretation, options)`.
 */
export function sectionSheets(survey: Survey, interpretation: Interpretation, options: SectionSheetOptions): string[] {
  return [renderSection(survey, interpretation, { showArcs: options.showArcs })];
}

export type ExportResult =
  | { kind: 'file'; bytes: Uint8Array; sheetCount: number; sheet: number; warnings: string[] }
  | { kind: 'sheet-out-of-range'; sheetCount: number }
  | { kind: 'too-many-sheets'; sheetCount: number };

/** PDF: every sheet, one page each (refused past EXPORT_LIMITS.sheets). PNG: sheet `options.sheet`. */
export async function assemblePages(
  sheets: string[],
  format: ExportFormat,
  options: Pick<ExportOptions, 'paper' | 'dpi' | 'sheet'>,
  meta: PdfMeta,
  fonts: FontFiles | null,
): Promise<ExportResult> {
  const sheetCount = sheets.length;
  if (format === 'png') {
    if (options.sheet > sheetCount) return { kind: 'sheet-out-of-range', sheetCount };
    const png = sheetToPng(sheets[options.sheet - 1], options.dpi, fonts);
    return { kind: 'file', bytes: png.bytes, sheetCount, sheet: options.sheet, warnings: [] };
  }
  if (sheetCount > EXPORT_LIMITS.sheets) return { kind: 'too-many-sheets', sheetCount };
  const pdf = await sheetsToPdf(sheets, options.paper, meta, fonts);
  return { kind: 'file', bytes: pdf.bytes, sheetCount, sheet: 1, warnings: pdf.warnings };
}
