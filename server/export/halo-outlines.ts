/**
 * Label halos for the PDF. The drawings put a white outline behind labels that sit on
 * lines or fills (`stroke` + `paint-order="stroke"`, engine/render/text.ts). PDF text has
 * no paint order: its fill-then-stroke mode would paint the white outline over the
 * letters, and svg-to-pdfkit ignores `paint-order`. Drawing the label twice as text would
 * put every such label twice in the PDF's text layer (search and copy would find it
 * twice). So the halo becomes a path: the glyph outlines of the label, laid out by fontkit
 * from the same font file the PDF embeds, stroked white just before the text, which stays
 * real text drawn once. Cost: O(length of the SVG) to find the labels, O(characters) per label.
 */
import { readFileSync } from 'node:fs';
import { create, type Font, type PathCommand } from 'fontkit';
import type { FontFiles } from './export-fonts.js';
import { attributes, attributeText, decodeXml } from './svg-sheet.js';

const HALO_ATTRIBUTES = ['stroke', 'stroke-width', 'stroke-linejoin', 'stroke-opacity', 'paint-order'] as const;

/** Fonts are read once per worker thread and kept. */
const fontCache = new Map<string, Font>();
function loadFont(path: string): Font {
  let font = fontCache.get(path);
  if (font === undefined) {
    font = create(readFileSync(path));
    fontCache.set(path, font);
  }
  return font;
}

/** The face a text element asks for, falling back to the regular face when the family lacks it. */
export function fontFileFor(fonts: FontFiles, bold: boolean, italic: boolean): string {
  if (bold && italic) return fonts.boldItalic ?? fonts.bold ?? fonts.regular;
  if (bold) return fonts.bold ?? fonts.regular;
  if (italic) return fonts.italic ?? fonts.regular;
  return fonts.regular;
}

const round3 = (value: number): string => String(Math.round(value * 1000) / 1000);

/**
 * Outline of `content` set at (x, y) in `font` at `sizeMm`, as SVG path data in the
 * drawing's units (y down). `anchor` is SVG's text-anchor.
 */
export function labelOutline(font: Font, content: string, x: number, y: number, sizeMm: number, anchor: string): string {
  const { glyphs, positions } = font.layout(content);
  const k = sizeMm / font.unitsPerEm;
  const advance = positions.reduce((sum, p) => sum + p.xAdvance, 0) * k;
  let penX = anchor === 'middle' ? x - advance / 2 : anchor === 'end' ? x - advance : x;
  const parts: string[] = [];
  glyphs.forEach((glyph, i) => {
    const ox = penX + positions[i].xOffset * k;
    const oy = y - positions[i].yOffset * k;
    const point = (gx: number, gy: number): string => `${round3(ox + gx * k)} ${round3(oy - gy * k)}`;
    for (const { command, args } of glyph.path.commands as PathCommand[]) {
      if (command === 'closePath') parts.push('Z');
      else {
        const points: string[] = [];
        for (let j = 0; j + 1 < args.length; j += 2) points.push(point(args[j], args[j + 1]));
        const letter = { moveTo: 'M', lineTo: 'L', quadraticCurveTo: 'Q', bezierCurveTo: 'C' }[command];
        parts.push(`${letter}${points.join(' ')}`);
      }
    }
    penX += positions[i].xAdvance * k;
  });
  return parts.join('');
}

/** A `<text>` without child elements (every label the renderer writes: text.ts uses a plain text node). */
const PLAIN_TEXT = /<text((?:\s+[\w:.-]+\s*=\s*"[^"]*")*)\s*>([^<]*)<\/text>/g;

/**
 * Every haloed label's stroke replaced by a stroked outline path placed just before it.
 * Without font files, or where a label does not state its size, the halo is dropped (the
 * label stays legible; lines may cross it). `outlined` counts the halos drawn as outlines.
 */
export function outlineHalos(svg: string, fonts: FontFiles | null): { svg: string; outlined: number } {
  let outlined = 0;
  const result = svg.replace(PLAIN_TEXT, (whole, attributeSource: string, escaped: string) => {
    const values = attributes(attributeSource);
    const stroke = values.get('stroke');
    if (!/^\s*stroke\b/.test(values.get('paint-order') ?? '') || stroke === undefined || stroke === 'none') return whole;
    const content = decodeXml(escaped).replace(/\s+/g, ' ').trim();
    const sizeMm = Number(values.get('font-size'));
    const x = Number((values.get('x') ?? '0').split(/[\s,]+/)[0]);
    const y = Number((values.get('y') ?? '0').split(/[\s,]+/)[0]);
    let halo = '';
    if (fonts !== null && content !== '' && sizeMm > 0 && Number.isFinite(x) && Number.isFinite(y)) {
      const bold = /^(bold|bolder|[6-9]00)$/.test(values.get('font-weight') ?? '');
      const italic = /^(italic|oblique)$/.test(values.get('font-style') ?? '');
      const font = loadFont(fontFileFor(fonts, bold, italic));
      const path = new Map<string, string>([['d', labelOutline(font, content, x, y, sizeMm, values.get('text-anchor') ?? 'start')], ['fill', 'none']]);
      for (const name of HALO_ATTRIBUTES) {
        const value = values.get(name);
        if (value !== undefined && name !== 'paint-order') path.set(name, value);
      }
      const transform = values.get('transform');
      if (transform !== undefined) path.set('transform', transform);
      path.set('data-role', 'label-halo');
      halo = `<path${attributeText(path)}></path>`;
      outlined += 1;
    }
    for (const name of HALO_ATTRIBUTES) values.delete(name);
    return `${halo}<text${attributeText(values)}>${escaped}</text>`;
  });
  return { svg: result, outlined };
}
