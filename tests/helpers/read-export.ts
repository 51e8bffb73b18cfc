/**
 * Reading exported files back with general-purpose readers, not with the code that wrote
 * them: PDFs with Mozilla's pdf.js (pdfjs-dist, the viewer Firefox uses), PNGs by their
 * chunk structure (ISO/IEC 15948, "PNG (Portable Network Graphics) Specification") and
 * Node's zlib for the CRCs and the image data.
 */
import { crc32, inflateSync } from 'node:zlib';
import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs';

export interface PdfTextItem {
  str: string;
  /** Position of the text's start on the page, pt from the bottom-left corner. */
  x: number;
  y: number;
  /** Advance width of the text, pt. */
  width: number;
  /** Font size on the page, pt. */
  sizePt: number;
  fontName: string;
}

export interface PdfPage {
  widthPt: number;
  heightPt: number;
  items: PdfTextItem[];
}

export interface PdfRead {
  pages: PdfPage[];
  title: string | undefined;
  /** Names of the fonts the text uses, with "(embedded)" when the PDF carries the font file. */
  fonts: string[];
}

export async function readPdf(bytes: Uint8Array): Promise<PdfRead> {
  const doc = await getDocument({ data: new Uint8Array(bytes), isEvalSupported: false, useSystemFonts: false, verbosity: 0 }).promise;
  try {
    const pages: PdfPage[] = [];
    const fonts = new Set<string>();
    for (let n = 1; n <= doc.numPages; n++) {
      const page = await doc.getPage(n);
      const viewport = page.getViewport({ scale: 1 });
      const content = await page.getTextContent();
      await page.getOperatorList();
      const items: PdfTextItem[] = [];
      for (const item of content.items) {
        if (!('str' in item) || item.str.trim() === '') continue;
        const [a, b, , , e, f] = item.transform as number[];
        items.push({ str: item.str, x: e, y: f, width: item.width, sizePt: Math.hypot(a, b), fontName: item.fontName });
        const font = page.commonObjs.has(item.fontName) ? (page.commonObjs.get(item.fontName) as { name?: string; missingFile?: boolean }) : undefined;
        if (font?.name) fonts.add(`${font.name}${font.missingFile ? '' : ' (embedded)'}`);
      }
      pages.push({ widthPt: viewport.width, heightPt: viewport.height, items });
    }
    const metadata = await doc.getMetadata();
    const title = (metadata.info as { Title?: string }).Title;
    return { pages, title, fonts: [...fonts] };
  } finally {
    await doc.destroy();
  }
}

export interface PngRead {
  width: number;
  height: number;
  /** Pixels per metre from pHYs, or null when the file has none. */
  pixelsPerMetre: number | null;
  /** Share of pixels darker than mid-grey (0–1). */
  darkShare: number;
  chunkTypes: string[];
}

/** The PNG signature, ISO/IEC 15948 §5.2. */
export const PNG_SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];

/** Walks the chunks (checking each CRC), inflates the image data and checks its length against IHDR. */
export function readPng(bytes: Uint8Array): PngRead {
  const buffer = Buffer.from(bytes);
  if (!PNG_SIGNATURE.every((byte, i) => buffer[i] === byte)) throw new Error('not a PNG: wrong signature');
  let width = 0;
  let height = 0;
  let colourType = -1;
  let bitDepth = 0;
  let pixelsPerMetre: number | null = null;
  const idat: Buffer[] = [];
  const chunkTypes: string[] = [];
  for (let at = 8; at < buffer.length; ) {
    const length = buffer.readUInt32BE(at);
    const type = buffer.toString('latin1', at + 4, at + 8);
    const data = buffer.subarray(at + 8, at + 8 + length);
    const crc = buffer.readUInt32BE(at + 8 + length);
    if (crc32(buffer.subarray(at + 4, at + 8 + length)) !== crc) throw new Error(`PNG chunk ${type}: CRC mismatch`);
    chunkTypes.push(type);
    if (type === 'IHDR') {
      width = data.readUInt32BE(0);
      height = data.readUInt32BE(4);
      bitDepth = data[8];
      colourType = data[9];
    } else if (type === 'pHYs') {
      if (data[8] === 1 && data.readUInt32BE(0) === data.readUInt32BE(4)) pixelsPerMetre = data.readUInt32BE(0);
    } else if (type === 'IDAT') idat.push(data);
    at += 12 + length;
  }
  // Samples per pixel by colour type (ISO/IEC 15948 §6.1): greyscale 1, RGB 3, grey+alpha 2, RGBA 4.
  const samples = ({ 0: 1, 2: 3, 4: 2, 6: 4 } as Record<number, number>)[colourType];
  if (samples === undefined || bitDepth !== 8) throw new Error(`PNG colour type ${colourType}, depth ${bitDepth}: not read here`);
  const raw = inflateSync(Buffer.concat(idat));
  const stride = 1 + width * samples;
  if (raw.length !== height * stride) throw new Error(`PNG data is ${raw.length} bytes, IHDR says ${height * stride}`);
  const pixels = unfilter(raw, width, height, samples);
  let dark = 0;
  for (let i = 0; i < width * height; i++) {
    const grey = samples >= 3 ? (pixels[i * samples] + pixels[i * samples + 1] + pixels[i * samples + 2]) / 3 : pixels[i * samples];
    if (grey < 128) dark += 1;
  }
  return { width, height, pixelsPerMetre, darkShare: dark / (width * height), chunkTypes };
}

/** Undoes the per-row filters (ISO/IEC 15948 §9.2: None, Sub, Up, Average, Paeth). O(pixels). */
function unfilter(raw: Buffer, width: number, height: number, bpp: number): Uint8Array {
  const rowBytes = width * bpp;
  const out = new Uint8Array(height * rowBytes);
  for (let y = 0; y < height; y++) {
    const filter = raw[y * (rowBytes + 1)];
    const src = y * (rowBytes + 1) + 1;
    const row = y * rowBytes;
    for (let i = 0; i < rowBytes; i++) {
      const a = i >= bpp ? out[row + i - bpp] : 0;
      const b = y > 0 ? out[row - rowBytes + i] : 0;
      const c = y > 0 && i >= bpp ? out[row - rowBytes + i - bpp] : 0;
      let predictor = 0;
      if (filter === 1) predictor = a;
      else if (filter === 2) predictor = b;
      else if (filter === 3) predictor = (a + b) >> 1;
      else if (filter === 4) {
        const p = a + b - c;
        const pa = Math.abs(p - a);
        const pb = Math.abs(p - b);
        const pc = Math.abs(p - c);
        predictor = pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
      }
      out[row + i] = (raw[src + i] + predictor) & 0xff;
    }
  }
  return out;
}
