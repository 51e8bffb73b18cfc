/**
 * What the structure reference tests share: the layout of their eikonal lines (48
 * geophones at 2 m, x = 0–94 m), the two-layer velocities, and how they interpret a line
 * and measure its depths against the model.
 */
import { interpret } from '../../engine/pipeline/interpret.js';
import type { LayeredModel } from '../../engine/forward/model.js';
import { elevationAt, type ModelPoint } from '../../engine/forward/polyline.js';
import type { Survey } from '../../engine/survey/survey.js';
import type { Interpretation } from '../../engine/output/interpretation.js';

export const SPACING_M = 2;
export const LAYOUT = { geophoneCount: 48, firstX: 0, spacing: SPACING_M };
/** Two off-end shots, two at the ends (half a spacing out), three inside the spread. */
export const SEVEN_SHOTS = [
  { x: -24, id: 'W-off' },
  { x: -1, id: 'W-end' },
  { x: 23, id: 'S23' },
  { x: 47, id: 'S47' },
  { x: 71, id: 'S71' },
  { x: 95, id: 'E-end' },
  { x: 118, id: 'E-off' },
];
export const CELL_M = 0.25;
export const V1 = 600;
export const V2 = 2400;

/** A level polyline at `elevation`, m, reaching well beyond every layout. */
export const level = (elevation: number): ModelPoint[] => [
  { x: -1000, elevation },
  { x: 1000, elevation },
];

/**
 * Interprets with the layer count left to the engine (a step, a velocity change or inside
 * shots must not be read as a third layer). Residuals are skipped: not under test here, and
 * they cost an eikonal run per shot.
 */
export function run(survey: Survey, extra: Record<string, unknown> = {}): Interpretation {
  return interpret({ ...survey, options: { residuals: false, ...extra } });
}

/** Vertical depth of the model's first refractor below the ground at x, m. */
export function trueDepthM(model: LayeredModel, x: number): number {
  return elevationAt(model.surface, x) - elevationAt(model.layers[1].top as ModelPoint[], x);
}

/** Prints a measured figure on a `[structure]` line (the README quotes them). */
export function report(name: string, values: Record<string, unknown>): void {
  console.log(`[structure] ${name}: ${JSON.stringify(values)}`);
}
