/**
 * Rows of values under the section, aligned with the geophones above them: geophone
 * numbers, the depth to each refractor, and each refractor's velocity as bars along the
 * line. A row's values are written every n-th geophone, n the smallest of LABEL_INTERVALS
 * at which no two labels can touch anywhere on the line (so a long line is thinned evenly,
 * never overprinted). Values are the interpretation's, formatted only.
 */
import type { Container } from '@svgdotjs/svg.js';
import type { Station } from '../output/interpretation.js';
import type { SectionFrame } from './section-frame.js';
import { stationSource } from './refractor-sources.js';
import { fixed, formatVelocity, round3 } from './format.js';
import { INK, SECTION_COLOURS } from './palette.js';
import { textWidthMm } from './page.js';
import { addText } from './text.js';

/** Row type size, mm (the floor for type on the sheet is 2 mm). */
export const ROW_TEXT_MM = 2.2;
/** Height of one row, mm. */
export const ROW_MM = 3.6;
/** Clear space kept between neighbouring labels in a row, mm. */
export const LABEL_GAP_MM = 0.8;
/** Label every n-th geophone, n from this ladder (counts a reader can follow). */
export const LABEL_INTERVALS: readonly number[] = [1, 2, 5, 10, 20, 50, 100, 200, 500, 1000];

/**
 * The smallest interval at which labels `widthMm` wide, centred on geophones i, i + n, …,
 * keep LABEL_GAP_MM apart everywhere on the line at `mmPerM`. O(G) per interval tried.
 */
export function labelInterval(geophoneXs: readonly number[], mmPerM: number, widthMm: number): number {
  for (const n of LABEL_INTERVALS) {
    let ok = true;
    for (let i = 0; i + n < geophoneXs.length && ok; i += n) ok = (geophoneXs[i + n] - geophoneXs[i]) * mmPerM >= widthMm + LABEL_GAP_MM;
    if (ok) return n;
  }
  return LABEL_INTERVALS[LABEL_INTERVALS.length - 1];
}

/** Depth as written in a row: "8.1" from both sides, "(8.1)" with phantomed arrivals or one-way, "~8.1" interpolated, "–" none. */
export function depthLabel(station: Station, index: number): string {
  const depth = station.depths?.[index] ?? (index === 0 ? station.depth : null);
  const source = stationSource(station, index);
  if (source === null || depth === null || depth === undefined) return '–';
  const text = fixed(depth, 1);
  return source === 'one-sided' ? `(${text})` : source === 'interpolated' ? `~${text}` : text;
}

/** Width of the widest label a row of the line will hold, mm. */
export function widestRowLabelMm(texts: readonly string[]): number {
  return Math.max(0, ...texts.map((t) => textWidthMm(t, ROW_TEXT_MM)));
}

export interface LabelRow {
  kind: 'labels';
  caption: string;
  role: string;
  /** One text per geophone (index as in the survey). */
  texts: readonly string[];
}

export interface BarRow {
  kind: 'bars';
  caption: string;
  role: string;
  segments: readonly { from: number; to: number; velocity: number }[];
  colour: string;
}

export type StationRow = LabelRow | BarRow;

export interface RowsPlacement {
  frame: SectionFrame;
  geophoneXs: readonly number[];
  /** Every n-th geophone is labelled, from the first. */
  interval: number;
  /** Chainage shown on this sheet. */
  fromM: number;
  toM: number;
  /** A label on the match line at toM belongs to the next sheet, except on the last sheet. */
  lastSheet: boolean;
  captionXMm: number;
  topMm: number;
}

/** Draws the rows top down from `topMm`; returns their height, mm. O(G + segments). */
export function stationRows(parent: Container, rows: readonly StationRow[], at: RowsPlacement): number {
  const group = parent.group().attr('data-role', 'station-rows');
  const { frame } = at;
  rows.forEach((row, r) => {
    const baseline = at.topMm + r * ROW_MM + ROW_TEXT_MM * 0.95;
    const one = group.group().attr({ 'data-role': row.role, 'data-interval': row.kind === 'labels' ? at.interval : null });
    addText(one, row.caption, at.captionXMm, baseline, { sizeMm: ROW_TEXT_MM, fill: INK.muted, role: 'row-caption' });
    if (row.kind === 'labels') {
      for (let i = 0; i < at.geophoneXs.length; i += at.interval) {
        const x = at.geophoneXs[i];
        if (x < at.fromM - 1e-9 || (at.lastSheet ? x > at.toM + 1e-9 : x >= at.toM - 1e-9)) continue;
        addText(one, row.texts[i], frame.x(x), baseline, { sizeMm: ROW_TEXT_MM, anchor: 'middle', role: `${row.role}-label` }).attr({ 'data-index': i, 'data-x': x });
      }
    } else {
      const y = at.topMm + r * ROW_MM + ROW_MM * 0.55;
      let lastLabelEnd = -Infinity;
      for (const seg of row.segments) {
        const lo = Math.max(Math.min(seg.from, seg.to), at.fromM);
        const hi = Math.min(Math.max(seg.from, seg.to), at.toM);
        if (!(hi > lo) || !Number.isFinite(seg.velocity)) continue;
        const x0 = frame.x(lo);
        const x1 = frame.x(hi);
        const bar = one.group().attr({ 'data-role': 'velocity-segment', 'data-from': seg.from, 'data-to': seg.to, 'data-velocity': seg.velocity });
        const stroke = { stroke: row.colour, 'stroke-width': 0.35 };
        const text = formatVelocity(seg.velocity);
        const width = textWidthMm(text, ROW_TEXT_MM);
        const cx = (x0 + x1) / 2;
        // Over the bar when it is long enough; else only if it clears the label before it.
        const labelled = cx - width / 2 >= lastLabelEnd + LABEL_GAP_MM;
        // The bar is broken where its label sits (a halo hugs the glyphs only, so a line drawn
        // through the label shows between them and a printed "2,600 m/s" reads "2;600·m/s").
        const gapFrom = cx - width / 2 - LABEL_GAP_MM;
        const gapTo = cx + width / 2 + LABEL_GAP_MM;
        if (labelled && gapFrom > x0 && gapTo < x1) {
          bar.line(round3(x0), round3(y), round3(gapFrom), round3(y)).attr(stroke);
          bar.line(round3(gapTo), round3(y), round3(x1), round3(y)).attr(stroke);
        } else {
          bar.line(round3(x0), round3(y), round3(x1), round3(y)).attr(stroke);
        }
        // End ticks only where the segment really ends, not where the sheet cuts it.
        if (lo === Math.min(seg.from, seg.to)) bar.line(round3(x0), round3(y - 1.2), round3(x0), round3(y + 1.2)).attr(stroke);
        if (hi === Math.max(seg.from, seg.to)) bar.line(round3(x1), round3(y - 1.2), round3(x1), round3(y + 1.2)).attr(stroke);
        if (labelled) {
          addText(bar, text, cx, y + ROW_TEXT_MM * 0.35, { sizeMm: ROW_TEXT_MM, anchor: 'middle', fill: row.colour, halo: true, role: 'velocity-label' });
          lastLabelEnd = cx + width / 2;
        }
      }
    }
  });
  return rows.length * ROW_MM;
}

/** The velocity rows' colour for each refractor: the refractor's own line colour. */
export const ROW_COLOURS = { first: SECTION_COLOURS.refractor, second: SECTION_COLOURS.refractor2 } as const;
