/**
 * Synthetic refraction lines: first arrivals computed through a layered model with the
 * eikonal solver (eikonal.ts), laid out like a field line, with seeded pick noise and dead
 * traces, returned as a survey document (engine/survey.ts, api-v1.md).
 *
 * Geometry: geophones at x = firstX + i·spacing (m); shots at the given x, anywhere (off
 * either end, at an end, inside). Both sit on the model's ground surface, elevations read
 * from it (rounded to the millimetre). A shot at a geophone's x records 0 ms there (before
 * noise). Times: the solver's first arrival + N(0, noiseMs²) from a seeded generator,
 * clipped at 0, rounded to 0.01 ms. Dead traces give null picks: listed geophones in every
 * shot, and a seeded share of all shot–geophone traces.
 */
import type { Survey, Shot } from '../survey/survey.js';
import { solveFirstArrivals, sampleTime } from './eikonal.js';
import { buildVelocityGrid, GROUND_SKIN_CELLS, type GridExtent, type LayeredModel } from './model.js';
import { elevationAt } from './polyline.js';
import { seededUniform, standardNormal } from './seeded-random.js';
import { checkSyntheticInputs } from './synthetic-request.js';
import type { Problem } from '../survey/problem.js';
import { roundTo } from '../shared/numbers.js';

export interface SyntheticLayout {
  /** Number of geophones, 1–1024. */
  geophoneCount: number;
  /** x of the first geophone, m. */
  firstX: number;
  /** Geophone spacing, m (> 0). */
  spacing: number;
  /** Shots, 1–64, anywhere along the line. Ids default to "S1", "S2", … */
  shots: { x: number; id?: string }[];
  /** Geophone indices (0-based) whose trace is dead in every shot. */
  deadTraces?: number[];
  /** Share of all shot–geophone traces to kill at random (seeded), 0–1. */
  deadTraceFraction?: number;
  /** Name of the line, copied to the survey. */
  name?: string;
}

export interface SyntheticOptions {
  /** Standard deviation of the Gaussian pick noise, ms (default 0: exact times). */
  noiseMs?: number;
  /** Seed of the noise and dead-trace draws (default 1). */
  seed?: number;
  /** Grid cell size, m (default DEFAULT_CELL_M). */
  cellM?: number;
}

/** Production cell size, m: head-wave error under 0.1 % in the reference tests. */
export const DEFAULT_CELL_M = 0.25;
/** Grid margin beyond the outermost shot or geophone, m. */
export const GRID_MARGIN_X_M = 2;
/** Grid depth below the lowest surface or interface point in the section, m. */
export const GRID_DEPTH_BELOW_M = 5;
/** Decimal places of the picks, in ms (0.01 ms). */
export const PICK_DECIMALS = 2;

/** Thrown for inputs that fail checkSyntheticInputs; carries every problem. */
export class SyntheticError extends Error {
  constructor(readonly problems: Problem[]) {
    super(problems.map((p) => `${p.path}: ${p.message}`).join(' '));
    this.name = 'SyntheticError';
  }
}

/** x of every geophone, m. */
export function geophoneXs(layout: Pick<SyntheticLayout, 'geophoneCount' | 'firstX' | 'spacing'>): number[] {
  const xs: number[] = [];
  for (let i = 0; i < layout.geophoneCount; i++) xs.push(layout.firstX + i * layout.spacing);
  return xs;
}

/**
 * The section a synthetic line is gridded over: the x span of all shots and geophones
 * plus GRID_MARGIN_X_M, from GRID_DEPTH_BELOW_M under the lowest surface or interface point
 * in that span up to the highest surface point plus the ground skin.
 */
export function syntheticGridExtent(model: LayeredModel, layout: SyntheticLayout, cellM: number): GridExtent {
  const xs = geophoneXs(layout).concat(layout.shots.map((s) => s.x));
  const xMin = Math.min(...xs) - GRID_MARGIN_X_M;
  const xMax = Math.max(...xs) + GRID_MARGIN_X_M;
  const surfaceRange = polylineRange(model.surface, xMin, xMax);
  let lowest = surfaceRange.min;
  for (let m = 1; m < model.layers.length; m++) {
    const top = model.layers[m].top;
    if (top) lowest = Math.min(lowest, polylineRange(top, xMin, xMax).min);
  }
  return {
    xMin,
    xMax,
    zMin: lowest - GRID_DEPTH_BELOW_M,
    zMax: surfaceRange.max + (GROUND_SKIN_CELLS + 1) * cellM,
    cellM,
  };
}

/**
 * A synthetic survey through a model (see the file comment).
 * @throws SyntheticError listing every problem with the model, layout or options (paths
 *   "/model/…", "/layout/…", "/noiseMs", …); GridError when the grid is too large.
 * @example
 *   syntheticSurvey(model, { geophoneCount: 24, firstX: 0, spacing: 2, shots: [{ x: -1 }] }, { noiseMs: 0.2, seed: 7 })
 */
export function syntheticSurvey(model: LayeredModel, layout: SyntheticLayout, options: SyntheticOptions = {}): Survey {
  const problems = checkSyntheticInputs(model, layout, options);
  if (problems.length > 0) throw new SyntheticError(problems);
  const cellM = options.cellM ?? DEFAULT_CELL_M;
  const noiseMs = options.noiseMs ?? 0;
  const seed = options.seed ?? 1;

  const grid = buildVelocityGrid(model, syntheticGridExtent(model, layout, cellM));
  const xs = geophoneXs(layout);
  const geophones = xs.map((x) => ({ x, elevation: roundTo(elevationAt(model.surface, x), 3) }));
  const noise = seededUniform(seed);
  // A separate stream for dead traces, so killing traces never changes the noise of the rest.
  const deadDraws = seededUniform(seed ^ 0x5bd1e995);
  const dead = deadTraceMask(layout, deadDraws);

  const shots: Shot[] = layout.shots.map((shotLayout, s) => {
    const elevation = roundTo(elevationAt(model.surface, shotLayout.x), 3);
    const source = { x: shotLayout.x, z: elevation };
    const times = solveFirstArrivals(grid, source);
    const picks = geophones.map((g, i) => {
      const atShot = Math.abs(g.x - source.x) < 1e-6 && Math.abs(g.elevation - elevation) < 1e-6;
      const exactMs = atShot ? 0 : sampleTime(grid, times, g.x, g.elevation, source);
      // Draw for every trace, dead or not, so the noise of a trace depends only on the seed and its place.
      const noisyMs = exactMs + (noiseMs > 0 ? noiseMs * standardNormal(noise) : 0);
      if (dead[s * xs.length + i]) return null;
      return roundTo(Math.max(0, noisyMs), PICK_DECIMALS);
    });
    return { id: shotLayout.id ?? `S${s + 1}`, x: shotLayout.x, elevation, times: picks };
  });
  const survey: Survey = { geophones, shots };
  if (layout.name !== undefined) survey.name = layout.name;
  return survey;
}

/** Dead flags per trace (shot-major): listed geophones in every shot plus a seeded share. */
function deadTraceMask(layout: SyntheticLayout, uniform: () => number): Uint8Array {
  const nG = layout.geophoneCount;
  const total = layout.shots.length * nG;
  const mask = new Uint8Array(total);
  for (const g of layout.deadTraces ?? []) {
    for (let s = 0; s < layout.shots.length; s++) mask[s * nG + g] = 1;
  }
  const killCount = Math.round((layout.deadTraceFraction ?? 0) * total);
  if (killCount > 0) {
    // Partial Fisher–Yates shuffle: the first killCount entries are a uniform random subset.
    const order = new Int32Array(total);
    for (let k = 0; k < total; k++) order[k] = k;
    for (let k = 0; k < killCount; k++) {
      const pick = k + Math.floor(uniform() * (total - k));
      const tmp = order[k];
      order[k] = order[pick];
      order[pick] = tmp;
      mask[order[k]] = 1;
    }
  }
  return mask;
}

function polylineRange(points: readonly { x: number; elevation: number }[], xMin: number, xMax: number): { min: number; max: number } {
  let min = Math.min(elevationAt(points, xMin), elevationAt(points, xMax));
  let max = Math.max(elevationAt(points, xMin), elevationAt(points, xMax));
  for (const p of points) {
    if (p.x > xMin && p.x < xMax) {
      min = Math.min(min, p.elevation);
      max = Math.max(max, p.elevation);
    }
  }
  return { min, max };
}

