/**
 * Label halos for the PDF. The drawings put a white outline behind labels that sit on
 * lines or fills (`stroke` + `paint-order="stroke"`, engine/render/text.ts). PDF text has
 * no paint order: its fill-then-stroke mode would paint the white outline over the
 * letters, and svg-to-pdfkit ignores `paint-order`. Drawing the label twice as text would
 * put every such label twice in the PDF's text layer (search and copy would find it
 * twice). So the halo becomes a path: the glyph outlines of the label, laid out by fontkit
 * from the same font file the PDF embeds, stroked white just before the text, which stays
 * real text drawn once. Cost: O(characters) per label.
 */
import { readFileSync } from 'node:fs';
import { create, type Font, type PathCommand } from 'fontkit';
import type { FontFiles } from './export-fonts.js';
import { inherited } from './svg-sheet.js';

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

function isHalo(text: Element): boolean {
  const order = text.getAttribute('paint-order');
  const stroke = text.getAttribute('stroke');
  return order !== null && /^\s*stroke\b/.test(order) && stroke !== null && stroke !== 'none';
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

/**
 * Replaces every haloed label's stroke by a stroked outline path placed just before it.
 * Without font files the halo is dropped (the label stays legible, lines may cross it).
 * Returns the number of halos outlined.
 */
export function outlineHalos(root: Element, fonts: FontFiles | null): number {
  let outlined = 0;
  for (const text of Array.from(root.querySelectorAll('text'))) {
    if (!isHalo(text)) continue;
    const content = (text.textContent ?? '').replace(/\s+/g, ' ').trim();
    const sizeMm = Number(inherited(text, 'font-size'));
    const x = Number((text.getAttribute('x') ?? '0').split(/[\s,]+/)[0]);
    const y = Number((text.getAttribute('y') ?? '0').split(/[\s,]+/)[0]);
    if (fonts !== null && content !== '' && sizeMm > 0 && Number.isFinite(x) && Number.isFinite(y)) {
      const bold = /^(bold|bolder|[6-9]00)$/.test(inherited(text, 'font-weight') ?? '');
      const italic = /^(italic|oblique)$/.test(inherited(text, 'font-style') ?? '');
      const font = loadFont(fontFileFor(fonts, bold, italic));
      const path = text.ownerDocument.createElementNS('http://www.w3.org/2000/svg', 'path');
      path.setAttribute('d', labelOutline(font, content, x, y, sizeMm, inherited(text, 'text-anchor') ?? 'start'));
      path.setAttribute('fill', 'none');
      for (const name of HALO_ATTRIBUTES) {
        const value = text.getAttribute(name);
        if (value !== null && name !== 'paint-order') path.setAttribute(name, value);
      }
      const transform = text.getAttribute('transform');
      if (transform !== null) path.setAttribute('transform', transform);
      path.setAttribute('data-role', 'label-halo');
      text.parentNode?.insertBefore(path, text);
      outlined += 1;
    }
    for (const name of HALO_ATTRIBUTES) text.removeAttribute(name);
  }
  return outlined;
}
