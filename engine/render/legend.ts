/**
 * A legend: a key glyph and a label per item, flowed left to right in rows across a width.
 */
import type { Container, G } from '@svgdotjs/svg.js';
import { TEXT_MM, textWidthMm } from './page.js';
import { addText } from './text.js';

export interface LegendItem {
  label: string;
  /** Draws the key glyph in a box 6 mm wide centred on (cx, cy). */
  glyph: (parent: G, cx: number, cy: number) => void;
}

const GLYPH_MM = 6;
const GAP_MM = 5;
const ROW_MM = 4.6;

/** Height the legend will need, mm, without drawing it. */
export function legendHeightMm(items: LegendItem[], widthMm: number): number {
  return legendRows(items, widthMm).length * ROW_MM;
}

function itemWidthMm(item: LegendItem): number {
  return GLYPH_MM + 1.2 + textWidthMm(item.label, TEXT_MM.legend);
}

function legendRows(items: LegendItem[], widthMm: number): LegendItem[][] {
  const rows: LegendItem[][] = [];
  let row: LegendItem[] = [];
  let used = 0;
  for (const item of items) {
    const w = itemWidthMm(item);
    if (row.length > 0 && used + GAP_MM + w > widthMm) {
      rows.push(row);
      row = [];
      used = 0;
    }
    used += (row.length > 0 ? GAP_MM : 0) + w;
    row.push(item);
  }
  if (row.length > 0) rows.push(row);
  return rows;
}

/** Draws the legend with its first row's centre line at yMm; returns its height, mm. */
export function legend(parent: Container, items: LegendItem[], xMm: number, yMm: number, widthMm: number): number {
  const group = parent.group().attr('data-role', 'legend');
  const rows = legendRows(items, widthMm);
  rows.forEach((row, r) => {
    let x = xMm;
    const cy = yMm + r * ROW_MM;
    for (const item of row) {
      const entry = group.group().attr('data-role', 'legend-item');
      item.glyph(entry, x + GLYPH_MM / 2, cy);
      addText(entry, item.label, x + GLYPH_MM + 1.2, cy + TEXT_MM.legend * 0.35, { sizeMm: TEXT_MM.legend });
      x += itemWidthMm(item) + GAP_MM;
    }
  });
  return rows.length * ROW_MM;
}
