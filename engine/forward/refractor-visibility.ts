/**
 * Which refractors of a layered model give first arrivals over a layout: the check behind
 * POST /api/v1/synthetic's "refractors" and "notes", so a layout that cannot see a
 * refractor (a hidden layer, a velocity inversion, a refractor whose head waves never
 * arrive first within the spread) says so.
 *
 * Which refractor gives a first arrival (our rule): with T_k the first arrival through the
 * model cut below layer k (layer k continued downward), refractor k arrives first at a
 * trace when T_k < T_(k−1) − ε (it beats everything shallower) and T_k ≤ T_full + ε
 * (nothing deeper beats it), ε = VISIBILITY_EPSILON_MS. All models share one grid; the
 * cut models' solves cost (layers − 1) more solves per shot, on a coarser grid when the
 * request is large.
 */
import { SYNTHETIC_LIMITS, type SyntheticRequest } from './synthetic-request.js';
import { DEFAULT_CELL_M, geophoneXs, syntheticGridExtent } from './synthetic.js';
import { buildVelocityGrid, type LayeredModel } from './model.js';
import { sampleTime, solveFirstArrivals } from './eikonal.js';
import { elevationAt } from './polyline.js';
import { nodesAlong } from './velocity-grid.js';

/** Times closer than this (ms) count as equal when deciding which refractor arrives first. */
export const VISIBILITY_EPSILON_MS = 0.02;

export interface RefractorVisibility {
  /** Layer index of the refractor (1 = the first refractor, the top of layer 1). */
  layer: number;
  /** Shot–geophone traces whose first arrival comes through this refractor. */
  firstArrivals: number;
  traces: number;
  seen: boolean;
}

export interface SyntheticNote {
  code: string;
  message: string;
  layer?: number;
}

/**
 * How many first arrivals each refractor gives over the layout (noise-free, all traces),
 * by the rule in the file comment.
 */
export function refractorVisibility(request: SyntheticRequest): RefractorVisibility[] {
  const { model, layout } = request;
  const layerCount = model.layers.length;
  if (layerCount < 2) return [];
  let cellM = request.cellM ?? DEFAULT_CELL_M;
  // The cut models cost (layers − 1) extra solves per shot: keep the whole check within
  // the request's own work limit by coarsening its grid when needed.
  for (;;) {
    const e = syntheticGridExtent(model, layout, cellM);
    const nodes = nodesAlong(e.xMax - e.xMin, cellM) * nodesAlong(e.zMax - e.zMin, cellM);
    if (nodes * layout.shots.length * layerCount <= SYNTHETIC_LIMITS.maxNodeSolves) break;
    cellM *= 1.25;
  }
  const extent = syntheticGridExtent(model, layout, cellM);
  const xs = geophoneXs(layout);
  const traces = xs.length * layout.shots.length;
  // times[k][trace]: first arrival through the model cut below layer k.
  const times: Float64Array[] = [];
  for (let k = 0; k < layerCount; k++) {
    const cut: LayeredModel = { surface: model.surface, layers: model.layers.slice(0, k + 1) };
    const grid = buildVelocityGrid(cut, extent);
    const t = new Float64Array(traces);
    layout.shots.forEach((shot, s) => {
      const source = { x: shot.x, z: elevationAt(model.surface, shot.x) };
      const field = solveFirstArrivals(grid, source);
      xs.forEach((x, i) => {
        t[s * xs.length + i] = Math.abs(x - shot.x) < 1e-6 ? 0 : sampleTime(grid, field, x, elevationAt(model.surface, x), source);
      });
    });
    times.push(t);
  }
  const full = times[layerCount - 1];
  const out: RefractorVisibility[] = [];
  for (let k = 1; k < layerCount; k++) {
    let firstArrivals = 0;
    for (let n = 0; n < traces; n++) {
      if (times[k][n] < times[k - 1][n] - VISIBILITY_EPSILON_MS && times[k][n] <= full[n] + VISIBILITY_EPSILON_MS) firstArrivals++;
    }
    out.push({ layer: k, firstArrivals, traces, seen: firstArrivals > 0 });
  }
  return out;
}

export function visibilityNotes(refractors: RefractorVisibility[]): SyntheticNote[] {
  return refractors
    .filter((r) => !r.seen)
    .map((r) => ({
      code: 'refractor-not-seen',
      layer: r.layer,
      message:
        `The top of layer ${r.layer} gives no first arrival anywhere on this layout: it is a hidden layer (too thin, ` +
        `or slower than a layer above it), or its head waves arrive first only beyond the spread. ` +
        `An interpretation of these picks cannot find it (ASTM D5777 and EM 1110-1-1802 describe such blind zones).`,
    }));
}
