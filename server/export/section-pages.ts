/**
 * The section as sheets, and sheets as an exported file: every sheet a PDF page, or one
 * sheet as PNG. The assembly takes any list of drawn sheets, so a section paged over
 * several sheets (issue 11 item 3) is printed page by page without change here.
 */
import { renderSectionSheets } from '../../engine/render/index.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import type { Survey } from '../../engine/survey/survey.js';
import type { FontFiles } from './export-fonts.js';
import { EXPORT_LIMITS, type ExportFormat, type ExportOptions, type SectionSheetOptions } from './export-options.js';
import { sheetsToPdf, type PdfMeta } from './pdf-document.js';
import { sheetToPng } from './png-image.js';

/**
 * The section drawn for the chosen paper at the chosen scale and exaggeration, one SVG per
 * sheet (renderSectionSheets: long lines are paged at match lines). Throws
 * SectionSheetError for a scale or exaggeration that cannot be drawn (a section too tall
 * for the sheet, or more sheets than SHEET_LIMITS allows); exportFile answers that as a 400.
 */
export function sectionSheets(survey: Survey, interpretation: Interpretation, options: SectionSheetOptions): string[] {
  return renderSectionSheets(survey, interpretation, {
    paper: options.paper,
    scale: options.scale ?? 'auto',
    verticalExaggeration: options.verticalExaggeration ?? 'auto',
    showArcs: options.showArcs,
  });
}

export type ExportResult =
  | { kind: 'file'; bytes: Uint8Array; sheetCount: number; sheet: number; warnings: string[] }
  | { kind: 'sheet-out-of-range'; sheetCount: number }
  | { kind: 'too-many-sheets'; sheetCount: number }
  | { kind: 'sheet-options'; problems: { field?: string; message: string }[] };

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
