/**
 * The printed page both plots share: A4 landscape inside 10 mm printer margins, drawn in
 * millimetres (1 user unit = 1 mm), so sizes below are what the ruler shows on paper.
 */
export const PAGE = {
  widthMm: 277,
  heightMm: 190,
  /** White border inside the page. */
  marginMm: 6,
} as const;

/** A drawing area: width and height inside the printer margins, and the white border inside it, mm. */
export interface PageSize {
  readonly widthMm: number;
  readonly heightMm: number;
  readonly marginMm: number;
}

export type PaperName = 'A4' | 'A3';

/**
 * Sheets of the depth section, landscape. ISO 216 sizes (A4 297 × 210 mm, A3 420 × 297 mm)
 * less 10 mm printer margins on every side, as PAGE is for A4; 1 user unit = 1 mm on paper.
 */
export const PAPER: Readonly<Record<PaperName, PageSize>> = {
  A4: PAGE,
  A3: { widthMm: 400, heightMm: 277, marginMm: 6 },
};

/** A generic sans-serif stack; nothing to download. */
export const FONT_FAMILY = "Helvetica, Arial, 'Liberation Sans', sans-serif";

/** Font sizes (em height) in mm. Capital letters are about 0.7 of these. */
export const TEXT_MM = {
  title: 5,
  subtitle: 3.2,
  label: 3,
  tick: 2.8,
  legend: 2.8,
  /** Cautions: the smallest type on the page, still ≥ 2 mm. */
  caution: 2.5,
} as const;

/**
 * Average advance of a character as a fraction of the font size (sans-serif, mixed case).
 * Generous, so boxes kept clear for labels are never too small.
 */
export const CHAR_WIDTH_EM = 0.56;

/**
 * The advance used to wrap running text (cautions). Arial/Helvetica set ordinary prose at
 * about 0.45 em a character (measured on the rendered PNGs); 0.48 leaves a margin.
 */
export const WRAP_CHAR_WIDTH_EM = 0.48;

/** Estimated width of a label on the page, mm. Used for layout, never for science. */
export function textWidthMm(text: string, sizeMm: number, emPerChar: number = CHAR_WIDTH_EM): number {
  return text.length * sizeMm * emPerChar;
}
