/**
 * Axes with ticks at 1/2/5 × 10^n steps, labelled and titled. Each tick carries its data
 * value (data-value) so a reader of the SVG — or a test — can recover the scale.
 */
import type { Container } from '@svgdotjs/svg.js';
import type { LinearScale } from './scale.js';
import { niceStep, tickValues } from './ticks.js';
import { formatTick, round3 } from './format.js';
import { INK } from './palette.js';
import { TEXT_MM } from './page.js';
import { addText } from './text.js';

export interface AxisOptions {
  /** Where the axis line sits across the plot: y (mm) for a bottom axis, x (mm) for a left one. */
  atMm: number;
  title: string;
  /** Largest number of tick intervals wanted. */
  maxTicks: number;
  /** Light grid lines across the plot, up to this coordinate (mm) on the other axis. */
  gridToMm?: number;
  /** Role prefix for data-role attributes, e.g. "x" → "x-axis", "x-tick". */
  role: string;
}

export interface AxisResult {
  step: number;
  values: number[];
}

const TICK_MM = 1.2;

/** Tick step and values (1, 2, 5 × 10ⁿ) over a scale's domain, and the axis group. */
function axisTicks(parent: Container, scale: LinearScale, options: AxisOptions): AxisResult & { group: ReturnType<Container['group']> } {
  const [d0, d1] = scale.domain;
  const lo = Math.min(d0, d1);
  const hi = Math.max(d0, d1);
  const step = niceStep(hi - lo, options.maxTicks);
  return { step, values: tickValues(lo, hi, step), group: parent.group().attr('data-role', `${options.role}-axis`) };
}

/** Horizontal axis below a plot: ticks downward, labels under them, title centred below. */
export function bottomAxis(parent: Container, scale: LinearScale, options: AxisOptions): AxisResult {
  const { step, values, group } = axisTicks(parent, scale, options);
  const [r0, r1] = scale.range;
  const y = round3(options.atMm);
  group.line(round3(Math.min(r0, r1)), y, round3(Math.max(r0, r1)), y).attr({ stroke: INK.frame, 'stroke-width': 0.3 });
  for (const value of values) {
    const x = round3(scale(value));
    if (options.gridToMm !== undefined) {
      group.line(x, y, x, round3(options.gridToMm)).attr({ stroke: INK.grid, 'stroke-width': 0.2, 'data-role': `${options.role}-grid` });
    }
    group.line(x, y, x, round3(y + TICK_MM)).attr({ stroke: INK.frame, 'stroke-width': 0.3, 'data-role': `${options.role}-tick`, 'data-value': value });
    addText(group, formatTick(value, step), x, y + TICK_MM + TEXT_MM.tick * 1.05, { sizeMm: TEXT_MM.tick, anchor: 'middle', fill: INK.text, role: `${options.role}-tick-label` });
  }
  addText(group, options.title, (r0 + r1) / 2, y + TICK_MM + TEXT_MM.tick * 1.05 + TEXT_MM.label * 1.35, {
    sizeMm: TEXT_MM.label,
    anchor: 'middle',
    role: `${options.role}-title`,
  });
  return { step, values };
}

/** Vertical axis left of a plot: ticks leftward, labels right-aligned, title rotated. */
export function leftAxis(parent: Container, scale: LinearScale, options: AxisOptions & { titleXMm: number }): AxisResult {
  const { step, values, group } = axisTicks(parent, scale, options);
  const [r0, r1] = scale.range;
  const x = round3(options.atMm);
  group.line(x, round3(Math.min(r0, r1)), x, round3(Math.max(r0, r1))).attr({ stroke: INK.frame, 'stroke-width': 0.3 });
  for (const value of values) {
    const y = round3(scale(value));
    if (options.gridToMm !== undefined) {
      group.line(x, y, round3(options.gridToMm), y).attr({ stroke: INK.grid, 'stroke-width': 0.2, 'data-role': `${options.role}-grid` });
    }
    group.line(round3(x - TICK_MM), y, x, y).attr({ stroke: INK.frame, 'stroke-width': 0.3, 'data-role': `${options.role}-tick`, 'data-value': value });
    addText(group, formatTick(value, step), x - TICK_MM - 0.8, y + TEXT_MM.tick * 0.35, { sizeMm: TEXT_MM.tick, anchor: 'end', role: `${options.role}-tick-label` });
  }
  addText(group, options.title, options.titleXMm, (r0 + r1) / 2, {
    sizeMm: TEXT_MM.label,
    anchor: 'middle',
    rotateDeg: -90,
    role: `${options.role}-title`,
  });
  return { step, values };
}
