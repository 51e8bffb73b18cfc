/**
 * What a caller may choose for an exported drawing (query parameters of the
 * `…/section.pdf|png` and `…/traveltimes.pdf|png` routes), with the limits and defaults in
 * one place: the route schemas read the limits from here, the export task the defaults.
 */
import type { PaperName } from './paper.js';

export type ExportFormat = 'pdf' | 'png';

/** Options of the section's sheets (passed to the sheet renderer as they are). */
export interface SectionSheetOptions {
  paper: PaperName;
  /** Horizontal drawing scale 1:N, as N; absent: the renderer fits the line to the sheet. */
  scale?: number;
  /** Vertical exaggeration (vertical scale ÷ horizontal scale); absent: the renderer's choice. */
  verticalExaggeration?: number;
  /** Depth arcs drawn (default true). */
  showArcs: boolean;
}

export interface ExportOptions extends SectionSheetOptions {
  /** PNG resolution, dots per inch. */
  dpi: number;
  /** PNG: which sheet (1-based) of a drawing that runs over several. */
  sheet: number;
}

export const EXPORT_LIMITS = {
  /**
   * 72–300 dpi: 72 is screen size, 300 print quality. 300 dpi on A3 is already 4961 × 3508
   * pixels (70 MB of pixels in the worker while it is drawn); more buys nothing on paper.
   * Our choice.
   */
  dpi: { minimum: 72, maximum: 300 },
  /**
   * 1:50 to 1:20,000. Engineering sections are drawn from about 1:100 (a short line) to
   * 1:5,000 (a long one) — common practice; the limits leave room both ways.
   */
  scale: { minimum: 50, maximum: 20_000 },
  /** 1:1 (true scale) to 20:1; beyond that the section no longer shows shapes. Our choice. */
  verticalExaggeration: { minimum: 1, maximum: 20 },
  /** The most sheets one PDF holds; a scale that needs more is refused with 400. Our choice. */
  sheets: 40,
} as const;

export const EXPORT_DEFAULTS = {
  paper: 'A4' as PaperName,
  /** 150 dpi: sharp on screen and in an e-mail, a quarter of the pixels of 300 (our choice). */
  dpi: 150,
  showArcs: true,
  sheet: 1,
} as const;
