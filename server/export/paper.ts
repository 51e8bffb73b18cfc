/**
 * Paper for the exported drawings: ISO 216 sheets in landscape, and the printer margin the
 * drawings already leave (engine/render/page.ts draws A4 landscape less 10 mm a side).
 */

export type PaperName = 'A4' | 'A3';

export const PAPER_NAMES: readonly PaperName[] = ['A4', 'A3'];

/** ISO 216 sheet sizes in landscape (long side across), mm. */
export const PAPER_MM: Readonly<Record<PaperName, { widthMm: number; heightMm: number }>> = {
  A4: { widthMm: 297, heightMm: 210 },
  A3: { widthMm: 420, heightMm: 297 },
};

/**
 * White border every printer can reach, mm a side: office laser printers leave about 4–6 mm
 * unprinted (common practice); 10 mm is what engine/render/page.ts assumes for A4.
 */
export const PRINT_MARGIN_MM = 10;

/** PostScript points per millimetre (1 pt = 1/72 in, 1 in = 25.4 mm). */
export const POINTS_PER_MM = 72 / 25.4;

/** The sheet in PDF points, landscape. */
export function paperPoints(paper: PaperName): { widthPt: number; heightPt: number } {
  const { widthMm, heightMm } = PAPER_MM[paper];
  return { widthPt: widthMm * POINTS_PER_MM, heightPt: heightMm * POINTS_PER_MM };
}

/** The area inside the printer margin, mm. */
export function printableMm(paper: PaperName): { widthMm: number; heightMm: number } {
  const { widthMm, heightMm } = PAPER_MM[paper];
  return { widthMm: widthMm - 2 * PRINT_MARGIN_MM, heightMm: heightMm - 2 * PRINT_MARGIN_MM };
}
