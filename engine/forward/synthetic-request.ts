/**
 * The JSON request for a synthetic line (to be served as POST /api/v1/synthetic) and its
 * validation. Shape (units m, ms, m/s):
 *
 *   {
 *     "model": {
 *       "surface": [{"x": 0, "elevation": 100}, {"x": 94, "elevation": 103}],
 *       "layers": [
 *         {"velocity": 600},
 *         {"velocity": {"contactsX": [40], "velocities": [2400, 3200]},
 *          "top": [{"x": 0, "elevation": 94}, {"x": 47, "elevation": 94}, {"x": 47, "elevation": 91}, {"x": 94, "elevation": 91}]}
 *       ]
 *     },
 *     "layout": {
 *       "geophoneCount": 48, "firstX": 0, "spacing": 2,
 *       "shots": [{"x": -10, "id": "W-off"}, {"x": -1}, {"x": 47}, {"x": 95}, {"x": 105}],
 *       "deadTraces": [17], "deadTraceFraction": 0.02, "name": "Synthetic step"
 *     },
 *     "noiseMs": 0.2, "seed": 42, "cellM": 0.25
 *   }
 *
 * Everything is bounded before any grid is built: at most 1024 geophones, 64 shots,
 * MAX_GRID_NODES grid nodes, and SYNTHETIC_LIMITS.maxNodeSolves nodes × shots in all.
 */
import { checkModel, type LayeredModel } from './model.js';
import { MAX_GRID_NODES, nodesAlong } from './velocity-grid.js';
import { DEFAULT_CELL_M, syntheticGridExtent, syntheticSurvey, type SyntheticLayout, type SyntheticOptions } from './synthetic.js';
import { SURVEY_LIMITS, type Survey } from '../survey/survey.js';
import type { Problem } from '../survey/problem.js';
import { isFiniteNumber } from '../shared/numbers.js';

export interface SyntheticRequest {
  model: LayeredModel;
  layout: SyntheticLayout;
  noiseMs?: number;
  seed?: number;
  cellM?: number;
}

export const SYNTHETIC_LIMITS = {
  maxGeophones: SURVEY_LIMITS.maxGeophones,
  maxShots: SURVEY_LIMITS.maxShots,
  maxNoiseMs: 50,
  minCellM: 0.05,
  maxCellM: 10,
  maxSpacingM: 1000,
  /**
   * Grid nodes × shots. The route solves every shot once for the line and, for the
   * blind-zone check (refractor-visibility.ts), up to this many node-solves again on a
   * coarsened grid: at most twice this many in all. Measured on the 2-core machine (load
   * ≈ 2), 64 shots at the limit: 1.2 s with two layers, 2.9 s with three (0.11–0.21 µs
   * per node-solve for the line, more for the check), so a request stays within a few
   * seconds, and under the service's 10 s time limit (server/compute/pool.ts) on a loaded
   * machine. Was 40 million: 19 s measured at the limit. Our choice.
   */
  maxNodeSolves: 4_000_000,
} as const;

const REQUEST_FIELDS = new Set(['model', 'layout', 'noiseMs', 'seed', 'cellM']);
const LAYOUT_FIELDS = new Set(['geophoneCount', 'firstX', 'spacing', 'shots', 'deadTraces', 'deadTraceFraction', 'name']);

/**
 * Every problem with a synthetic-line request, each with a JSON pointer, a stable code and
 * a sentence; an empty list means syntheticSurveyFromRequest will run.
 */
export function validateSyntheticRequest(input: unknown): Problem[] {
  if (!isObject(input)) {
    return [{ path: '', code: 'request-not-object', message: 'The request must be a JSON object with "model" and "layout".' }];
  }
  const problems: Problem[] = [];
  for (const key of Object.keys(input)) {
    if (!REQUEST_FIELDS.has(key)) {
      problems.push({ path: `/${key}`, code: 'unknown-field', message: `Unknown field "${key}"; the request takes model, layout, noiseMs, seed and cellM.` });
    }
  }
  if (input.model === undefined) {
    problems.push({ path: '/model', code: 'model-missing', message: 'The request needs a "model": ground surface and layers.' });
  }
  if (input.layout === undefined) {
    problems.push({ path: '/layout', code: 'layout-missing', message: 'The request needs a "layout": geophones and shots.' });
  }
  if (problems.length > 0 && (input.model === undefined || input.layout === undefined)) return problems;
  return problems.concat(checkSyntheticInputs(input.model, input.layout, { noiseMs: input.noiseMs, seed: input.seed, cellM: input.cellM }));
}

/** Runs a request that validateSyntheticRequest passed. */
export function syntheticSurveyFromRequest(request: SyntheticRequest): Survey {
  return syntheticSurvey(request.model, request.layout, { noiseMs: request.noiseMs, seed: request.seed, cellM: request.cellM });
}

/** Problems with a model, a layout and options, as paths in the request document. */
export function checkSyntheticInputs(model: unknown, layout: unknown, options: Partial<Record<keyof SyntheticOptions, unknown>>): Problem[] {
  const problems = checkModel(model, '/model');
  const add = (path: string, code: string, message: string): void => {
    problems.push({ path, code, message });
  };
  const layoutOk = checkLayout(layout, add);
  const { noiseMs, seed, cellM } = options;
  if (noiseMs !== undefined && (!isFiniteNumber(noiseMs) || noiseMs < 0 || noiseMs > SYNTHETIC_LIMITS.maxNoiseMs)) {
    add('/noiseMs', 'noise-out-of-range', `noiseMs is the standard deviation of pick noise in ms, from 0 to ${SYNTHETIC_LIMITS.maxNoiseMs}; got ${JSON.stringify(noiseMs)}.`);
  }
  if (seed !== undefined && (!Number.isSafeInteger(seed) || (seed as number) < 0)) {
    add('/seed', 'seed-not-integer', `seed must be a whole number ≥ 0; got ${JSON.stringify(seed)}.`);
  }
  const cellOk = cellM === undefined || (isFiniteNumber(cellM) && cellM >= SYNTHETIC_LIMITS.minCellM && cellM <= SYNTHETIC_LIMITS.maxCellM);
  if (!cellOk) {
    add('/cellM', 'cell-out-of-range', `cellM is the grid cell size in m, from ${SYNTHETIC_LIMITS.minCellM} to ${SYNTHETIC_LIMITS.maxCellM}; got ${JSON.stringify(cellM)}.`);
  }
  if (problems.length === 0 && layoutOk && cellOk) {
    const lay = layout as SyntheticLayout;
    const h = (cellM as number | undefined) ?? DEFAULT_CELL_M;
    const extent = syntheticGridExtent(model as LayeredModel, lay, h);
    const nodes = nodesAlong(extent.xMax - extent.xMin, h) * nodesAlong(extent.zMax - extent.zMin, h);
    if (nodes > MAX_GRID_NODES) {
      add(
        '/cellM',
        'grid-too-large',
        `The section ${fmt(extent.xMax - extent.xMin)} m long and ${fmt(extent.zMax - extent.zMin)} m deep at ${h} m cells needs ${nodes} grid nodes, above the limit of ${MAX_GRID_NODES}; use larger cells or a shallower model.`,
      );
    } else if (nodes * lay.shots.length > SYNTHETIC_LIMITS.maxNodeSolves) {
      add(
        '/layout/shots',
        'too-much-work',
        `${lay.shots.length} shots on a grid of ${nodes} nodes is more than one request may compute (${SYNTHETIC_LIMITS.maxNodeSolves} node-shots); use larger cells or fewer shots.`,
      );
    }
  }
  return problems;
}

/** Checks the layout; true when it is sound enough to size a grid from. */
function checkLayout(layout: unknown, add: (path: string, code: string, message: string) => void): boolean {
  if (!isObject(layout)) {
    add('/layout', 'layout-not-object', 'The layout must be an object with geophoneCount, firstX, spacing and shots.');
    return false;
  }
  let ok = true;
  for (const key of Object.keys(layout)) {
    if (!LAYOUT_FIELDS.has(key)) {
      add(`/layout/${key}`, 'unknown-field', `Unknown layout field "${key}"; the layout takes ${[...LAYOUT_FIELDS].join(', ')}.`);
    }
  }
  const { geophoneCount, firstX, spacing, shots, deadTraces, deadTraceFraction, name } = layout;
  const countOk = Number.isInteger(geophoneCount) && (geophoneCount as number) >= 1 && (geophoneCount as number) <= SYNTHETIC_LIMITS.maxGeophones;
  if (!countOk) {
    add('/layout/geophoneCount', 'geophone-count-out-of-range', `geophoneCount must be a whole number from 1 to ${SYNTHETIC_LIMITS.maxGeophones}; got ${JSON.stringify(geophoneCount)}.`);
    ok = false;
  }
  if (!isFiniteNumber(firstX) || Math.abs(firstX) > SURVEY_LIMITS.maxCoordinateM) {
    add('/layout/firstX', 'first-x-bad', `firstX must be the x of the first geophone in m, within ±${SURVEY_LIMITS.maxCoordinateM}; got ${JSON.stringify(firstX)}.`);
    ok = false;
  }
  if (!isFiniteNumber(spacing) || spacing <= 0 || spacing > SYNTHETIC_LIMITS.maxSpacingM) {
    add('/layout/spacing', 'spacing-out-of-range', `spacing must be the geophone interval in m, above 0 and at most ${SYNTHETIC_LIMITS.maxSpacingM}; got ${JSON.stringify(spacing)}.`);
    ok = false;
  }
  if (!Array.isArray(shots) || shots.length === 0 || shots.length > SYNTHETIC_LIMITS.maxShots) {
    add('/layout/shots', 'shot-count-out-of-range', `shots must be an array of 1 to ${SYNTHETIC_LIMITS.maxShots} shots, each {x, id?}.`);
    ok = false;
  } else {
    const ids = new Set<string>();
    shots.forEach((shot: unknown, s: number) => {
      const at = `/layout/shots/${s}`;
      if (!isObject(shot)) {
        add(at, 'shot-not-object', `Shot ${s} must be an object {x, id?}.`);
        ok = false;
        return;
      }
      if (!isFiniteNumber(shot.x) || Math.abs(shot.x) > SURVEY_LIMITS.maxCoordinateM) {
        add(`${at}/x`, 'shot-x-bad', `Shot ${s}: x must be a number of metres within ±${SURVEY_LIMITS.maxCoordinateM}; got ${JSON.stringify(shot.x)}.`);
        ok = false;
      }
      const id = shot.id === undefined ? `S${s + 1}` : shot.id;
      if (typeof id !== 'string' || id.length === 0 || id.length > SURVEY_LIMITS.maxShotIdLength) {
        add(`${at}/id`, 'shot-id-bad', `Shot ${s}: id must be text of 1 to ${SURVEY_LIMITS.maxShotIdLength} characters; got ${JSON.stringify(shot.id)}.`);
      } else if (ids.has(id)) {
        add(`${at}/id`, 'shot-id-duplicate', `Shot ${s}: id "${id}" is already used by another shot.`);
      } else {
        ids.add(id);
      }
    });
  }
  if (deadTraces !== undefined) {
    if (!Array.isArray(deadTraces) || deadTraces.length > SYNTHETIC_LIMITS.maxGeophones) {
      add('/layout/deadTraces', 'dead-traces-bad', `deadTraces must be an array of at most ${SYNTHETIC_LIMITS.maxGeophones} geophone indices (0-based).`);
    } else {
      deadTraces.forEach((g: unknown, k: number) => {
        if (!Number.isInteger(g) || (g as number) < 0 || (countOk && (g as number) >= (geophoneCount as number))) {
          add(`/layout/deadTraces/${k}`, 'dead-trace-index-bad', `deadTraces[${k}] must be a geophone index from 0 to ${countOk ? (geophoneCount as number) - 1 : 'geophoneCount − 1'}; got ${JSON.stringify(g)}.`);
        }
      });
    }
  }
  if (deadTraceFraction !== undefined && (!isFiniteNumber(deadTraceFraction) || deadTraceFraction < 0 || deadTraceFraction > 1)) {
    add('/layout/deadTraceFraction', 'dead-fraction-out-of-range', `deadTraceFraction is the share of traces to kill, from 0 to 1; got ${JSON.stringify(deadTraceFraction)}.`);
  }
  if (name !== undefined && (typeof name !== 'string' || name.length > SURVEY_LIMITS.maxNameLength)) {
    add('/layout/name', 'name-bad', `name must be text of at most ${SURVEY_LIMITS.maxNameLength} characters.`);
  }
  return ok;
}

function fmt(v: number): string {
  return String(Math.round(v * 100) / 100);
}

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

