/**
 * Text on the page. Everything goes through svg.js `plain()`, which makes a DOM text node:
 * user text (line names, dates, shot ids) is escaped by the serialiser, never parsed as markup.
 */
import type { Container, Text } from '@svgdotjs/svg.js';
import { INK } from './palette.js';
import { round3 } from './format.js';
import { textWidthMm, WRAP_CHAR_WIDTH_EM } from './page.js';

export interface TextStyle {
  sizeMm: number;
  anchor?: 'start' | 'middle' | 'end';
  weight?: 'normal' | 'bold';
  fill?: string;
  italic?: boolean;
  /** White outline behind the glyphs, for labels that sit on lines or fills. */
  halo?: boolean;
  role?: string;
  /** Rotation about the anchor point, degrees (SVG sense: clockwise on the page). */
  rotateDeg?: number;
}

export function addText(parent: Container, content: string, xMm: number, yMm: number, style: TextStyle): Text {
  const text = parent.plain(content);
  const x = round3(xMm);
  const y = round3(yMm);
  text.attr({ x, y, 'font-size': style.sizeMm });
  if (style.anchor && style.anchor !== 'start') text.attr('text-anchor', style.anchor);
  if (style.weight === 'bold') text.attr('font-weight', 'bold');
  if (style.italic) text.attr('font-style', 'italic');
  if (style.fill) text.attr('fill', style.fill);
  if (style.halo) {
    text.attr({ stroke: INK.halo, 'stroke-width': round3(style.sizeMm * 0.28), 'stroke-linejoin': 'round', 'paint-order': 'stroke' });
  }
  if (style.role) text.attr('data-role', style.role);
  if (style.rotateDeg) text.attr('transform', `rotate(${round3(style.rotateDeg)} ${x} ${y})`);
  return text;
}

/**
 * Greedy word wrap to a width on the page, by estimated glyph widths.
 * A single word longer than the line is kept whole on its own line.
 */
export function wrapText(content: string, widthMm: number, sizeMm: number): string[] {
  const words = content.split(/\s+/).filter((w) => w.length > 0);
  const lines: string[] = [];
  let line = '';
  for (const word of words) {
    const candidate = line ? `${line} ${word}` : word;
    if (line && textWidthMm(candidate, sizeMm, WRAP_CHAR_WIDTH_EM) > widthMm) {
      lines.push(line);
      line = word;
    } else {
      line = candidate;
    }
  }
  if (line) lines.push(line);
  return lines;
}
