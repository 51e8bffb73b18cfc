/**
 * Drawn sheets (SVG strings) to one vector PDF, a page per sheet.
 *
 * pdfkit writes the PDF and svg-to-pdfkit draws each SVG into it as PDF paths and real
 * text in an embedded font subset (export-fonts.ts), so lines keep their widths at any
 * zoom and the labels can be searched and copied. Label halos are turned into outline
 * paths first (halo-outlines.ts), and rectangular clips into viewports (svg-sheet.ts).
 *
 * Placement: the page is the chosen ISO sheet in landscape; each drawing is scaled by one
 * factor to fill the area inside the printer margin and centred. A sheet drawn for that
 * paper fills it exactly (factor 1), so a drawing scale printed on it holds on paper; a
 * drawing made for a smaller sheet (the A4 time–distance plot on A3) is enlarged whole.
 *
 * The file is a pure function of its input: the creation date is the revision's, so the
 * same stored revision always gives the same bytes. Cost O(size of the SVGs).
 */
import PDFDocument from 'pdfkit';
import SVGtoPDF from 'svg-to-pdfkit';
import type { FontFiles } from './export-fonts.js';
import { fontFileFor, outlineHalos } from './halo-outlines.js';
import { paperPoints, POINTS_PER_MM, printableMm, type PaperName } from './paper.js';
import { clipRectsAsViewports, sheetSizeMm, withSheetSize } from './svg-sheet.js';

export interface PdfMeta {
  title: string;
  subject: string;
  /** Written as the PDF's creation date (ISO 8601). */
  createdAt: string;
}

export interface PdfResult {
  bytes: Uint8Array;
  /** Scale factor each sheet was drawn at on its page (1 = as drawn). */
  placements: number[];
  /** What svg-to-pdfkit could not draw (an unsupported SVG feature); empty for our drawings. */
  warnings: string[];
}

const FACES = ['regular', 'bold', 'italic', 'boldItalic'] as const;

function registerFonts(doc: PDFKit.PDFDocument, fonts: FontFiles): void {
  for (const face of FACES) doc.registerFont(face, fontFileFor(fonts, face.startsWith('bold'), /italic/i.test(face)));
}

/** svg-to-pdfkit's font choice: every family of the drawings maps to the embedded sans. */
function fontCallback(fonts: FontFiles | null) {
  return (_family: string, bold: boolean, italic: boolean, fontOptions: { fauxBold?: boolean; fauxItalic?: boolean }): string => {
    if (fonts === null) return bold ? (italic ? 'Helvetica-BoldOblique' : 'Helvetica-Bold') : italic ? 'Helvetica-Oblique' : 'Helvetica';
    if (bold && fonts.bold === null) fontOptions.fauxBold = true;
    if (italic && (bold ? fonts.boldItalic ?? fonts.italic : fonts.italic) === null) fontOptions.fauxItalic = true;
    return bold ? (italic ? 'boldItalic' : 'bold') : italic ? 'italic' : 'regular';
  };
}

export function sheetsToPdf(sheets: string[], paper: PaperName, meta: PdfMeta, fonts: FontFiles | null): Promise<PdfResult> {
  if (sheets.length === 0) throw new Error('sheetsToPdf: no sheet to print');
  const created = new Date(meta.createdAt);
  const doc = new PDFDocument({
    autoFirstPage: false,
    margin: 0,
    info: {
      Title: meta.title,
      Subject: meta.subject,
      Creator: 'Arcline',
      CreationDate: Number.isNaN(created.getTime()) ? new Date(0) : created,
    },
    displayTitle: true,
    lang: 'en',
  } as PDFKit.PDFDocumentOptions);
  if (fonts !== null) registerFonts(doc, fonts);
  const chunks: Buffer[] = [];
  const done = new Promise<Uint8Array>((resolve, reject) => {
    doc.on('data', (chunk: Buffer) => chunks.push(chunk));
    doc.on('end', () => resolve(new Uint8Array(Buffer.concat(chunks))));
    doc.on('error', reject);
  });

  const page = paperPoints(paper);
  const printable = printableMm(paper);
  const placements: number[] = [];
  const warnings: string[] = [];
  for (const sheet of sheets) {
    const size = sheetSizeMm(sheet);
    const fit = Math.min(printable.widthMm / size.widthMm, printable.heightMm / size.heightMm);
    // Within a thousandth of 1 is 1: a sheet made for this paper is printed as drawn.
    const factor = Math.abs(fit - 1) < 1e-3 ? 1 : fit;
    const widthMm = size.widthMm * factor;
    const heightMm = size.heightMm * factor;
    const prepared = clipRectsAsViewports(withSheetSize(outlineHalos(sheet, fonts).svg, widthMm, heightMm));
    doc.addPage({ size: [page.widthPt, page.heightPt], margin: 0 });
    const x = (page.widthPt - widthMm * POINTS_PER_MM) / 2;
    const y = (page.heightPt - heightMm * POINTS_PER_MM) / 2;
    SVGtoPDF(doc, prepared, x, y, {
      width: widthMm * POINTS_PER_MM,
      height: heightMm * POINTS_PER_MM,
      fontCallback: fontCallback(fonts),
      warningCallback: (warning) => warnings.push(warning),
    });
    placements.push(factor);
  }
  doc.end();
  return done.then((bytes) => ({ bytes, placements, warnings }));
}
