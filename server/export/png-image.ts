/**
 * One drawn sheet (SVG) to a PNG for e-mail, by resvg (@resvg/resvg-js: the Rust SVG
 * renderer, prebuilt for each platform in its npm package; no browser). resvg honours
 * `paint-order`, so label halos come out as on screen, and it is given the export's font
 * files by path, so the PNG sets the same glyphs as the PDF.
 *
 * Size: the drawing's own size on paper at `dpi` (its width in mm × dpi / 25.4, rounded),
 * and the PNG records that resolution (pHYs chunk), so it prints at the drawn size.
 * Cost: O(pixels) — 4 bytes each while drawn (A3 at 300 dpi: 70 MB).
 */
import { Resvg } from '@resvg/resvg-js';
import type { FontFiles } from './export-fonts.js';

/** Fonts handed to resvg: the export's files only, or the system's when none was found. */
function fontOptions(fonts: FontFiles | null) {
  if (fonts === null) return { loadSystemFonts: true };
  const files = [fonts.regular, fonts.bold, fonts.italic, fonts.boldItalic].filter((f): f is string => f !== null);
  return { loadSystemFonts: false, fontFiles: files, defaultFontFamily: fonts.family, sansSerifFamily: fonts.family };
}

export interface PngResult {
  bytes: Uint8Array;
  widthPx: number;
  heightPx: number;
}

export function sheetToPng(svg: string, dpi: number, fonts: FontFiles | null): PngResult {
  const image = new Resvg(svg, { dpi, font: fontOptions(fonts), background: '#ffffff', logLevel: 'off' }).render();
  return { bytes: withResolution(image.asPng(), dpi), widthPx: image.width, heightPx: image.height };
}

/** CRC-32 of PNG chunks (ISO/IEC 15948 annex D: polynomial 0xEDB88320), table built once. O(bytes). */
const CRC_TABLE = (() => {
  const table = new Uint32Array(256);
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    table[n] = c >>> 0;
  }
  return table;
})();

export function crc32(bytes: Uint8Array): number {
  let c = 0xffffffff;
  for (const byte of bytes) c = CRC_TABLE[(c ^ byte) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

/**
 * The PNG with a pHYs chunk (pixels per metre, unit = metre; ISO/IEC 15948 §11.3.5.3)
 * after IHDR, replacing any the encoder wrote. IHDR is always the first chunk, 8 + 25 bytes in.
 */
export function withResolution(png: Uint8Array, dpi: number): Uint8Array {
  const perMetre = Math.round(dpi / 0.0254);
  const chunk = Buffer.alloc(21);
  chunk.writeUInt32BE(9, 0);
  chunk.write('pHYs', 4, 'latin1');
  chunk.writeUInt32BE(perMetre, 8);
  chunk.writeUInt32BE(perMetre, 12);
  chunk.writeUInt8(1, 16);
  chunk.writeUInt32BE(crc32(chunk.subarray(4, 17)), 17);
  const source = Buffer.from(png.buffer, png.byteOffset, png.byteLength);
  const parts: Buffer[] = [source.subarray(0, 33), chunk];
  // Copy the remaining chunks, leaving out an existing pHYs.
  for (let at = 33; at < source.length; ) {
    const length = source.readUInt32BE(at);
    const type = source.toString('latin1', at + 4, at + 8);
    const end = at + 12 + length;
    if (type !== 'pHYs') parts.push(source.subarray(at, end));
    at = end;
  }
  return new Uint8Array(Buffer.concat(parts));
}
