/**
 * First-arrival travel times on a 2-D grid: the eikonal equation |∇t| = s(x, z) solved by
 * fast marching (Sethian, "A fast marching level set method for monotonically advancing
 * fronts", PNAS 93, 1996), with the second-order upwind differences of Sethian, "Level Set
 * Methods and Fast Marching Methods", Cambridge University Press, 1999, ch. 8, wherever the
 * two upwind nodes in a direction are known and lie in cells of one slowness.
 *
 * Grid and units: see velocity-grid.ts (x along the line, z elevation upward, m; slowness
 * in ms/m on cells; times in ms on nodes).
 *
 * Discretisation (cell-based, our arrangement of the standard upwind update):
 * - a node is updated from each of its four quadrants (the cell between it and one
 *   horizontal and one vertical neighbour) with that cell's slowness s:
 *     Σ_d a_d (t − c_d)² = (h·s)²,  first order a_d = 1, c_d = t1;
 *     second order a_d = 9/4, c_d = (4·t1 − t2)/3  (from ∂t/∂x ≈ (3t − 4t1 + t2)/(2h));
 * - and along each grid edge alone with the smaller slowness of the two cells beside the
 *   edge, t = t1 + h·min(s_a, s_b), so a wave runs along an interface at the faster velocity
 *   (this is what carries head waves);
 * - the node keeps the least candidate that is not earlier than the neighbours it used.
 * Near the source a disc of nodes (DEFAULT_INIT_RADIUS_M, at least MIN_INIT_RADIUS_CELLS,
 * shrunk until its cells share the source cell's slowness) gets the straight-ray time t = r·s, so the point-source singularity does
 * not spoil the field; the source may lie anywhere, not only on a node.
 *
 * Cost: O(N log N) for N nodes; memory about 26 bytes per node. Several shots on one grid
 * share one MarchWorkspace (the padded slownesses built once, the work arrays reused), and a
 * march told which nodes are wanted (`stopAfter`) ends once they are all accepted: fast
 * marching accepts nodes in order of time and never changes an accepted one, so those
 * nodes read exactly what the whole march gives them.
 */
import { NodeHeap } from './node-heap.js';
import { GridError, checkGridSize, type VelocityGrid } from './velocity-grid.js';

export interface SourcePoint {
  /** Distance along the line, m. */
  x: number;
  /** Elevation, m. */
  z: number;
}

export interface EikonalOptions {
  /** 2 (default): second-order upwind where neighbours allow; 1: first order throughout. */
  order?: 1 | 2;
  /**
   * Radius of the straight-ray start around the source, in cells. Default: the larger of
   * MIN_INIT_RADIUS_CELLS and DEFAULT_INIT_RADIUS_M; either way it shrinks until the disc
   * is uniform.
   */
  initRadiusCells?: number;
}

/**
 * The work arrays of fast marching on one grid, built once and reused by every source solved
 * on it (the residual check solves every shot of a line on one grid): the slownesses padded
 * with air (O(N) to build, once), the times, the node states and the heap (about 25 bytes
 * per node). The times a solve returns are the workspace's own array, overwritten by the
 * next solve on it.
 */
export class MarchWorkspace {
  readonly grid: VelocityGrid;
  readonly slow: Float64Array;
  readonly times: Float64Array;
  readonly state: Uint8Array;
  readonly heap: NodeHeap;

  /** @throws GridError when the grid's size or slowness count is wrong. */
  constructor(grid: VelocityGrid) {
    const { nx, nz, cellM } = grid;
    checkGridSize(nx, nz, cellM);
    if (grid.cellSlownessMsPerM.length !== (nx - 1) * (nz - 1)) {
      throw new GridError('cellSlownessMsPerM', `Expected ${(nx - 1) * (nz - 1)} cell slownesses, got ${grid.cellSlownessMsPerM.length}.`);
    }
    this.grid = grid;
    this.slow = paddedSlowness(grid);
    this.times = new Float64Array(nx * nz);
    this.state = new Uint8Array(nx * nz);
    this.heap = new NodeHeap(this.times);
  }
}

/** Fewest cells of straight-ray start around the source (when the medium allows). */
export const MIN_INIT_RADIUS_CELLS = 5;
/**
 * Default radius of the straight-ray start, m. A start of fixed size in metres, not in
 * cells, keeps the source error shrinking at second order as the grid is refined; a start
 * of fixed cell count leaves first-order convergence (measured: docs/developers/forward.md).
 */
export const DEFAULT_INIT_RADIUS_M = 2;

// Node states; a new Uint8Array starts every node at 0, far (not yet reached).
const TRIAL = 1;
const ACCEPTED = 2;

/**
 * Travel time from the source to every node, ms; Infinity where no ground path reaches
 * (air nodes). Node k = j·nx + i (see velocity-grid.ts).
 * @throws GridError when the source lies outside the grid or in the air.
 * @example
 *   // homogeneous 1000 m/s: a node 10 m from the source reads 10 ms
 *   solveFirstArrivals(grid, { x: 5, z: 0 })
 */
export function solveFirstArrivals(grid: VelocityGrid, source: SourcePoint, options: EikonalOptions = {}): Float64Array {
  return solveOnWorkspace(new MarchWorkspace(grid), source, options);
}

/**
 * As solveFirstArrivals, on a workspace reused from shot to shot; returns the workspace's
 * times array (valid until its next solve). With `stopAfter` (node indices, e.g.
 * samplingNodes of the receivers), the march ends once every one of them that touches the
 * ground is accepted: those nodes hold their final times, nodes reached later hold
 * Infinity or a provisional time. Cost O(N log N) at most, less when the wanted nodes are
 * reached before the far corners of the grid.
 * @throws GridError when the source lies outside the grid or in the air.
 */
export function solveOnWorkspace(workspace: MarchWorkspace, source: SourcePoint, options: EikonalOptions = {}, stopAfter?: ArrayLike<number>): Float64Array {
  const { grid, slow, times, state, heap } = workspace;
  const { nx, nz, cellM: h } = grid;
  const secondOrder = (options.order ?? 2) === 2;
  const initRadiusCells = Math.max(
    1,
    Math.floor(options.initRadiusCells ?? Math.max(MIN_INIT_RADIUS_CELLS, Math.ceil(DEFAULT_INIT_RADIUS_M / h))),
  );
  times.fill(Infinity);
  state.fill(0);
  heap.clear();
  const ctx: MarchContext = { nx, nz, h, times, state, slow, secondOrder };

  const initialised = startAtSource(grid, slow, source, initRadiusCells, times, state);
  // Wanted nodes still to accept; only ground nodes count (an air node is never reached).
  // A wanted node that could never be reached leaves the march to run to its end, as without stopAfter.
  let wanted: Uint8Array | null = null;
  let remaining = 0;
  if (stopAfter) {
    wanted = new Uint8Array(nx * nz);
    for (let m = 0; m < stopAfter.length; m++) {
      const k = stopAfter[m];
      const i = k % nx;
      const j = (k - i) / nx;
      if (wanted[k] || !touchesGround(slow, nx, i, j)) continue;
      wanted[k] = 1;
      if (state[k] !== ACCEPTED) remaining++;
    }
    if (remaining === 0) return times;
  }
  for (let m = 0; m < initialised.length; m++) pushNeighbours(ctx, heap, initialised[m]);

  for (;;) {
    const k = heap.pop();
    if (k < 0) break;
    state[k] = ACCEPTED;
    if (wanted !== null && wanted[k] === 1 && --remaining === 0) break;
    pushNeighbours(ctx, heap, k);
  }
  return times;
}

/**
 * The nodes sampleTime may read for a point: the corners of the cell holding it and of the
 * cells whose edge it lies on (the same cells, found by the same rule). Empty for a point
 * outside the grid (sampleTime throws there).
 */
export function samplingNodes(grid: VelocityGrid, x: number, z: number): number[] {
  const cells = candidateCells(grid, x, z);
  if (!cells) return [];
  const { nx } = grid;
  const out: number[] = [];
  for (const j of cells.jList) for (const i of cells.iList) out.push(j * nx + i, j * nx + i + 1, (j + 1) * nx + i, (j + 1) * nx + i + 1);
  return out;
}

/** The cells a point's time is read from (see sampleTime), or null outside the grid. */
function candidateCells(grid: VelocityGrid, x: number, z: number): { u: number; w: number; iList: number[]; jList: number[] } | null {
  const { nx, nz, xMin, zMin, cellM: h } = grid;
  const u = (x - xMin) / h;
  const w = (z - zMin) / h;
  const tol = 1e-9;
  if (!(u >= -tol && u <= nx - 1 + tol) || !(w >= -tol && w <= nz - 1 + tol)) return null;
  const i0 = clampInt(Math.floor(u), 0, nx - 2);
  const j0 = clampInt(Math.floor(w), 0, nz - 2);
  // Candidate cells: the one holding the point, then neighbours when the point is on their edge.
  const iList = [i0];
  const jList = [j0];
  if (Math.abs(u - i0) < 1e-7 && i0 > 0) iList.push(i0 - 1);
  if (Math.abs(u - (i0 + 1)) < 1e-7 && i0 + 1 <= nx - 2) iList.push(i0 + 1);
  if (Math.abs(w - j0) < 1e-7 && j0 > 0) jList.push(j0 - 1);
  if (Math.abs(w - (j0 + 1)) < 1e-7 && j0 + 1 <= nz - 2) jList.push(j0 + 1);
  return { u, w, iList, jList };
}

/**
 * Travel time at any point (x along the line, z elevation, m) by bilinear interpolation
 * of the node times, ms. A point on a cell edge uses the neighbouring cell whose corners
 * were all reached, so a receiver on a ground surface that falls on a node row reads the
 * ground below, not the air above. Pass the source to make points near it exact (the
 * straight-ray cone is taken out before interpolating and put back after).
 * @throws GridError when the point (or the source) lies outside the grid.
 */
export function sampleTime(grid: VelocityGrid, times: Float64Array, x: number, z: number, source?: SourcePoint): number {
  const { nx, xMin, zMin, cellM: h } = grid;
  // With the source known, interpolate the smooth remainder t − s0·r and add s0·r back:
  // near the source the cone t = s0·r is exact instead of cut by a bilinear chord.
  const s0 = source ? locateSource(grid, source).srcSlowness : 0;
  const sx = source ? source.x : 0;
  const sz = source ? source.z : 0;
  const cone = (px: number, pz: number): number => (s0 === 0 ? 0 : s0 * Math.hypot(px - sx, pz - sz));
  const cells = candidateCells(grid, x, z);
  if (!cells) throw new GridError('point', `Point x=${x} m, elevation ${z} m lies outside the model grid.`);
  const { u, w, iList, jList } = cells;
  for (const j of jList) {
    for (const i of iList) {
      const k = j * nx + i;
      if (!Number.isFinite(times[k] + times[k + 1] + times[k + nx] + times[k + nx + 1])) continue;
      const x0 = xMin + i * h;
      const z0 = zMin + j * h;
      const t00 = times[k] - cone(x0, z0);
      const t10 = times[k + 1] - cone(x0 + h, z0);
      const t01 = times[k + nx] - cone(x0, z0 + h);
      const t11 = times[k + nx + 1] - cone(x0 + h, z0 + h);
      const fu = Math.min(1, Math.max(0, u - i));
      const fw = Math.min(1, Math.max(0, w - j));
      return (1 - fw) * ((1 - fu) * t00 + fu * t10) + fw * ((1 - fu) * t01 + fu * t11) + cone(x, z);
    }
  }
  return Infinity;
}

interface MarchContext {
  nx: number;
  nz: number;
  h: number;
  times: Float64Array;
  state: Uint8Array;
  /** Cell slowness padded by one ring of air: cell (i, j) at (j + 1)·(nx + 1) + i + 1. */
  slow: Float64Array;
  secondOrder: boolean;
}

function clampInt(v: number, lo: number, hi: number): number {
  return v < lo ? lo : v > hi ? hi : v;
}

/** Cell slownesses with a ring of air around them, so neighbour look-ups need no bounds tests. */
function paddedSlowness(grid: VelocityGrid): Float64Array {
  const { nx, nz } = grid;
  const w = nx + 1;
  const padded = new Float64Array(w * (nz + 1)).fill(Infinity);
  const src = grid.cellSlownessMsPerM;
  for (let j = 0; j < nz - 1; j++) {
    padded.set(src.subarray(j * (nx - 1), (j + 1) * (nx - 1)), (j + 1) * w + 1);
  }
  return padded;
}

/**
 * Straight-ray times t = r·s_source in a disc around the source; returns the nodes set.
 * The disc shrinks until every ground cell it touches has the source cell's slowness (a
 * straight ray is only right in a uniform medium); at radius 1 with mixed cells around,
 * only the corners of the source cell are started.
 */
function startAtSource(
  grid: VelocityGrid,
  slow: Float64Array,
  source: SourcePoint,
  initRadiusCells: number,
  times: Float64Array,
  state: Uint8Array,
): number[] {
  const { nx, nz, xMin, zMin, cellM: h } = grid;
  const u = (source.x - xMin) / h;
  const w = (source.z - zMin) / h;
  const { srcI, srcJ, srcSlowness } = locateSource(grid, source);

  let radius = initRadiusCells;
  for (; radius >= 1; radius--) {
    if (discIsUniform(slow, nx, nz, u, w, radius, srcSlowness)) break;
  }
  const set: number[] = [];
  const setNode = (i: number, j: number): void => {
    const k = j * nx + i;
    if (state[k] === ACCEPTED || !touchesGround(slow, nx, i, j)) return;
    const dx = (i - u) * h;
    const dz = (j - w) * h;
    times[k] = Math.sqrt(dx * dx + dz * dz) * srcSlowness;
    state[k] = ACCEPTED;
    set.push(k);
  };
  if (radius >= 1) {
    const r2 = radius * radius;
    for (let j = Math.max(0, Math.ceil(w - radius)); j <= Math.min(nz - 1, Math.floor(w + radius)); j++) {
      for (let i = Math.max(0, Math.ceil(u - radius)); i <= Math.min(nx - 1, Math.floor(u + radius)); i++) {
        if ((i - u) * (i - u) + (j - w) * (j - w) <= r2) setNode(i, j);
      }
    }
  }
  // The source cell's corners always start, whatever the disc held.
  setNode(srcI, srcJ);
  setNode(srcI + 1, srcJ);
  setNode(srcI, srcJ + 1);
  setNode(srcI + 1, srcJ + 1);
  return set;
}

/**
 * The cell holding the source (a ground cell it touches when it sits on a cell edge) and
 * that cell's slowness, ms/m.
 * @throws GridError when the source is outside the grid or in the air.
 */
export function locateSource(grid: VelocityGrid, source: SourcePoint): { srcI: number; srcJ: number; srcSlowness: number } {
  const { nx, nz, xMin, zMin, cellM: h } = grid;
  if (!Number.isFinite(source.x) || !Number.isFinite(source.z)) {
    throw new GridError('source', `Source position must be finite numbers, got x=${source.x}, z=${source.z}.`);
  }
  const u = (source.x - xMin) / h;
  const w = (source.z - zMin) / h;
  const tol = 1e-9;
  if (u < -tol || u > nx - 1 + tol || w < -tol || w > nz - 1 + tol) {
    throw new GridError('source', `Source at x=${source.x} m, elevation ${source.z} m lies outside the model grid.`);
  }
  const cellsX = nx - 1;
  let srcI = -1;
  let srcJ = -1;
  let srcSlowness = Infinity;
  const baseI = clampInt(Math.floor(u), 0, nx - 2);
  const baseJ = clampInt(Math.floor(w), 0, nz - 2);
  for (let dj = 1; dj >= -1; dj--) {
    for (let di = 1; di >= -1; di--) {
      const ci = baseI + di;
      const cj = baseJ + dj;
      if (ci < 0 || cj < 0 || ci > nx - 2 || cj > nz - 2) continue;
      const inside = u >= ci - 1e-7 && u <= ci + 1 + 1e-7 && w >= cj - 1e-7 && w <= cj + 1 + 1e-7;
      if (!inside) continue;
      const s = grid.cellSlownessMsPerM[cj * cellsX + ci];
      // Prefer the cell that holds the point; else the first ground cell whose edge it is on.
      const holds = ci === baseI && cj === baseJ;
      if (s < Infinity && (holds || srcSlowness === Infinity)) {
        srcSlowness = s;
        srcI = ci;
        srcJ = cj;
        if (holds) return { srcI, srcJ, srcSlowness };
      }
    }
  }
  if (!Number.isFinite(srcSlowness)) {
    throw new GridError('source', `Source at x=${source.x} m, elevation ${source.z} m lies in the air above the ground surface.`);
  }
  return { srcI, srcJ, srcSlowness };
}

/** True when every ground cell meeting the disc (radius in cells) has slowness s. */
function discIsUniform(slow: Float64Array, nx: number, nz: number, u: number, w: number, radius: number, s: number): boolean {
  const pw = nx + 1;
  const iLo = Math.max(0, Math.floor(u - radius) - 1);
  const iHi = Math.min(nx - 2, Math.ceil(u + radius));
  const jLo = Math.max(0, Math.floor(w - radius) - 1);
  const jHi = Math.min(nz - 2, Math.ceil(w + radius));
  for (let j = jLo; j <= jHi; j++) {
    for (let i = iLo; i <= iHi; i++) {
      const c = slow[(j + 1) * pw + i + 1];
      if (c !== Infinity && Math.abs(c - s) > 1e-12 * s) return false;
    }
  }
  return true;
}

/** True when node (i, j) is a corner of at least one ground (finite-slowness) cell. */
function touchesGround(slow: Float64Array, nx: number, i: number, j: number): boolean {
  const pw = nx + 1;
  const c = j * pw + i; // padded index of cell (i − 1, j − 1)
  return (
    slow[c] !== Infinity || slow[c + 1] !== Infinity || slow[c + pw] !== Infinity || slow[c + pw + 1] !== Infinity
  );
}

/** Recomputes the four neighbours of a just-accepted node and moves them into the front. */
function pushNeighbours(ctx: MarchContext, heap: NodeHeap, k: number): void {
  const { nx, nz, state } = ctx;
  const i = k % nx;
  const j = (k - i) / nx;
  if (i > 0 && state[k - 1] !== ACCEPTED) relax(ctx, heap, k - 1, i - 1, j);
  if (i < nx - 1 && state[k + 1] !== ACCEPTED) relax(ctx, heap, k + 1, i + 1, j);
  if (j > 0 && state[k - nx] !== ACCEPTED) relax(ctx, heap, k - nx, i, j - 1);
  if (j < nz - 1 && state[k + nx] !== ACCEPTED) relax(ctx, heap, k + nx, i, j + 1);
}

function relax(ctx: MarchContext, heap: NodeHeap, k: number, i: number, j: number): void {
  const t = updatedTime(ctx, k, i, j);
  if (t < ctx.times[k]) {
    ctx.times[k] = t;
    ctx.state[k] = TRIAL;
    heap.pushOrDecrease(k);
  }
}

/**
 * The least upwind candidate time at node (i, j) from its accepted neighbours (see the file
 * comment for the stencils). Neighbour names: L/R along −x/+x, D/U along −z/+z; a "2" suffix
 * is the node two steps away, used for second order.
 */
function updatedTime(ctx: MarchContext, k: number, i: number, j: number): number {
  const { nx, nz, h, times: T, state: S, slow, secondOrder } = ctx;
  const pw = nx + 1;
  // Padded indices of the four cells around the node.
  const cLD = j * pw + i;
  const cRD = cLD + 1;
  const cLU = cLD + pw;
  const cRU = cLU + 1;
  const sLD = slow[cLD];
  const sRD = slow[cRD];
  const sLU = slow[cLU];
  const sRU = slow[cRU];

  let tL = Infinity;
  let tL2 = Infinity;
  let tR = Infinity;
  let tR2 = Infinity;
  let tD = Infinity;
  let tD2 = Infinity;
  let tU = Infinity;
  let tU2 = Infinity;
  if (i > 0 && S[k - 1] === ACCEPTED) {
    tL = T[k - 1];
    if (secondOrder && i > 1 && S[k - 2] === ACCEPTED && T[k - 2] <= tL) tL2 = T[k - 2];
  }
  if (i < nx - 1 && S[k + 1] === ACCEPTED) {
    tR = T[k + 1];
    if (secondOrder && i < nx - 2 && S[k + 2] === ACCEPTED && T[k + 2] <= tR) tR2 = T[k + 2];
  }
  if (j > 0 && S[k - nx] === ACCEPTED) {
    tD = T[k - nx];
    if (secondOrder && j > 1 && S[k - 2 * nx] === ACCEPTED && T[k - 2 * nx] <= tD) tD2 = T[k - 2 * nx];
  }
  if (j < nz - 1 && S[k + nx] === ACCEPTED) {
    tU = T[k + nx];
    if (secondOrder && j < nz - 2 && S[k + 2 * nx] === ACCEPTED && T[k + 2 * nx] <= tU) tU2 = T[k + 2 * nx];
  }

  let best = Infinity;
  // Along one edge: the faster of the two cells beside it.
  if (tL < Infinity) {
    const s = sLD < sLU ? sLD : sLU;
    const sFar = Math.min(slow[cLD - 1], slow[cLU - 1]);
    best = Math.min(best, oneSided(tL, tL2 < Infinity && sFar === s ? tL2 : Infinity, h * s));
  }
  if (tR < Infinity) {
    const s = sRD < sRU ? sRD : sRU;
    const sFar = Math.min(slow[cRD + 1], slow[cRU + 1]);
    best = Math.min(best, oneSided(tR, tR2 < Infinity && sFar === s ? tR2 : Infinity, h * s));
  }
  if (tD < Infinity) {
    const s = sLD < sRD ? sLD : sRD;
    const sFar = Math.min(slow[cLD - pw], slow[cRD - pw]);
    best = Math.min(best, oneSided(tD, tD2 < Infinity && sFar === s ? tD2 : Infinity, h * s));
  }
  if (tU < Infinity) {
    const s = sLU < sRU ? sLU : sRU;
    const sFar = Math.min(slow[cLU + pw], slow[cRU + pw]);
    best = Math.min(best, oneSided(tU, tU2 < Infinity && sFar === s ? tU2 : Infinity, h * s));
  }
  // Quadrants: one horizontal and one vertical neighbour, slowness of the cell between.
  if (tL < Infinity && tD < Infinity && sLD < Infinity) {
    best = Math.min(
      best,
      twoSided(tL, slow[cLD - 1] === sLD ? tL2 : Infinity, tD, slow[cLD - pw] === sLD ? tD2 : Infinity, h * sLD),
    );
  }
  if (tR < Infinity && tD < Infinity && sRD < Infinity) {
    best = Math.min(
      best,
      twoSided(tR, slow[cRD + 1] === sRD ? tR2 : Infinity, tD, slow[cRD - pw] === sRD ? tD2 : Infinity, h * sRD),
    );
  }
  if (tL < Infinity && tU < Infinity && sLU < Infinity) {
    best = Math.min(
      best,
      twoSided(tL, slow[cLU - 1] === sLU ? tL2 : Infinity, tU, slow[cLU + pw] === sLU ? tU2 : Infinity, h * sLU),
    );
  }
  if (tR < Infinity && tU < Infinity && sRU < Infinity) {
    best = Math.min(
      best,
      twoSided(tR, slow[cRU + 1] === sRU ? tR2 : Infinity, tU, slow[cRU + pw] === sRU ? tU2 : Infinity, h * sRU),
    );
  }
  return best;
}

/** One-direction update: first order t1 + h·s, second order (4·t1 − t2)/3 + (2/3)·h·s. */
function oneSided(t1: number, t2: number, hs: number): number {
  if (!(hs < Infinity)) return Infinity;
  if (t2 < Infinity) return (4 * t1 - t2) / 3 + (2 / 3) * hs;
  return t1 + hs;
}

/**
 * Two-direction update: solve a1·(t − c1)² + a2·(t − c2)² = (h·s)² for its larger root,
 * a = 9/4 and c = (4·t1 − t2)/3 where a second upwind node is given, a = 1 and c = t1
 * otherwise. Valid only when t is not earlier than either upwind neighbour (causality);
 * a failed second-order solve retries at first order.
 */
function twoSided(tA: number, tA2: number, tB: number, tB2: number, hs: number): number {
  if (tA2 < Infinity || tB2 < Infinity) {
    const a1 = tA2 < Infinity ? 2.25 : 1;
    const c1 = tA2 < Infinity ? (4 * tA - tA2) / 3 : tA;
    const a2 = tB2 < Infinity ? 2.25 : 1;
    const c2 = tB2 < Infinity ? (4 * tB - tB2) / 3 : tB;
    const sum = a1 + a2;
    const d = c1 - c2;
    const disc = sum * hs * hs - a1 * a2 * d * d;
    if (disc >= 0) {
      const t = (a1 * c1 + a2 * c2 + Math.sqrt(disc)) / sum;
      if (t >= tA && t >= tB) return t;
    }
  }
  const d = tA - tB;
  if (d >= hs || -d >= hs) return Infinity;
  return 0.5 * (tA + tB + Math.sqrt(2 * hs * hs - d * d));
}
