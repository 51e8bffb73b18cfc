/**
 * Hidden layers and velocity inversions: what first arrivals cannot show.
 *
 * Hidden layer (Soske, Geophysics 24, 1959; also ASTM D5777 and USACE EM 1110-1-1802 as
 * general references): an intermediate layer (velocity V2, thickness h2) between a top
 * layer (V1, h1) and a faster refractor (V3) gives first arrivals only over the offsets
 * where its head wave beats both the direct wave and the deeper head wave, i.e. between
 * the crossover distances
 *   x12 = t_i2 / (1/V1 − 1/V2)              (direct wave → layer-2 head wave)
 *   x23 = (t_i3 − t_i2) / (1/V2 − 1/V3)     (layer-2 → layer-3 head wave)
 * with intercept times t_i2 = 2·h1·cos θ12/V1 and t_i3 = 2·h1·cos θ13/V1 + 2·h2·cos θ23/V2,
 * sin θ_ij = V_i/V_j (Kearey, Brooks & Hill 2002 ch. 5). Without a spread, the layer is
 * hidden when x23 ≤ x12. On a spread it is hidden when fewer than `minFirstArrivalPicks`
 * geophone offsets (default 3, common practice: fewer picks do not make a branch) fall
 * in (x12, x23). x23 grows linearly with h2, so the largest hidden thickness solves
 * x23 = X, X = x12 or the minFirstArrivalPicks-th offset beyond x12:
 *   h2_max = V2·[X·(1/V2 − 1/V3) − 2·h1·(cos θ13 − cos θ12)/V1] / (2·cos θ23).
 * Velocity inversion: a layer slower than the one above never gives a head wave, so
 * first arrivals cannot see it at all (same references); a decreasing sequence of
 * interpreted velocities is itself a sign of a wrong branch assignment.
 * Units: m, m/s (times internally in s).
 */
import type { Warning } from '../output/interpretation.js';
import { StructureInputError } from './structure-input.js';
import { zeros } from '../shared/zeros.js';
import { lengthText, velocityNumber, velocityWords } from '../qc/wording.js';

export interface HiddenLayerInput {
  /** Top-layer velocity and thickness. */
  v1MPerS: number;
  topThicknessM: number;
  /** Velocity of the possible intermediate layer (V1 < V2 < V3). */
  hiddenVelocityMPerS: number;
  /** Velocity of the refractor below it. */
  refractorVelocityMPerS: number;
  /** Source–geophone offsets of the spread, m; absent: the pure crossover condition x23 ≤ x12. */
  offsetsM?: number[];
  minFirstArrivalPicks?: number;
}

export interface HiddenLayerBound {
  /** Largest hidden thickness, m; null when no thickness would show on this spread. */
  maxThicknessM: number | null;
  /** Crossover from the direct wave to the intermediate layer, m. */
  crossoverDirectM: number;
  /** The offset that x23 must not pass for the layer to stay hidden, m (null: none on the spread). */
  limitOffsetM: number | null;
}

function positive(value: number, field: string): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) throw new StructureInputError(field, `must be a positive finite number, got ${String(value)}`);
}

function cosCritical(vUpper: number, vLower: number): number {
  const s = vUpper / vLower;
  return Math.sqrt(1 - s * s);
}

function checkOrder(v1: number, v2: number, v3: number): void {
  if (!(v1 < v2 && v2 < v3)) {
    throw new StructureInputError('hiddenVelocityMPerS', `must lie between the top-layer velocity ${v1} m/s and the refractor velocity ${v3} m/s, got ${v2} m/s`);
  }
}

function checkOffsets(offsetsM: unknown): void {
  if (!Array.isArray(offsetsM)) throw new StructureInputError('offsetsM', 'must be an array of offsets in m');
  offsetsM.forEach((o, i) => {
    if (typeof o !== 'number' || !Number.isFinite(o)) throw new StructureInputError(`offsetsM[${i}]`, `must be a finite offset in m, got ${String(o)}`);
  });
}

/** |offset| of every geophone, increasing. O(n log n), once per spread. */
function sortedDistances(offsetsM: readonly number[]): number[] {
  return offsetsM.map(Math.abs).sort((a, b) => a - b);
}

/**
 * The limit offset X for given crossover x12: x12 itself, or the k-th offset beyond it.
 * The offsets beyond x12 start at the first sorted distance > x12 (bisection): O(log n).
 */
function limitOffset(x12: number, distances: number[] | undefined, minPicks: number): number | null {
  if (!distances) return x12;
  let a = 0;
  let b = distances.length;
  while (a < b) {
    const mid = (a + b) >> 1;
    if (distances[mid] > x12) b = mid;
    else a = mid + 1;
  }
  const k = a + minPicks - 1;
  return k < distances.length ? distances[k] : null;
}

/** Largest thickness of a layer of velocity V2 under a top layer (V1, h1) that first arrivals would not show. */
export function maxHiddenLayerThickness(input: HiddenLayerInput): HiddenLayerBound {
  const { v1MPerS: v1, hiddenVelocityMPerS: v2, refractorVelocityMPerS: v3, topThicknessM: h1 } = input;
  positive(v1, 'v1MPerS');
  positive(v2, 'hiddenVelocityMPerS');
  positive(v3, 'refractorVelocityMPerS');
  if (!(h1 >= 0) || !Number.isFinite(h1)) throw new StructureInputError('topThicknessM', `must be a finite thickness ≥ 0 m, got ${String(h1)}`);
  checkOrder(v1, v2, v3);
  const minPicks = input.minFirstArrivalPicks ?? 3;
  if (!Number.isInteger(minPicks) || minPicks < 1) throw new StructureInputError('minFirstArrivalPicks', `must be an integer ≥ 1, got ${String(minPicks)}`);
  if (input.offsetsM !== undefined) checkOffsets(input.offsetsM);
  return hiddenBound(v1, v2, v3, h1, input.offsetsM ? sortedDistances(input.offsetsM) : undefined, minPicks);
}

/**
 * The smallest limit offset over all spreads as a function of x12 (Infinity where no spread
 * has one): limitOffset of each spread only changes where x12 passes one of its distances,
 * so the minimum is tabulated once on the merged distances, O(B·S·log n) for B distinct
 * distances, and read by one bisection, O(log B), instead of S bisections per test.
 */
function nearestLimitOffset(distances: number[][], minPicks: number): (x12: number) => number {
  const breaks = [...new Set(distances.flat())].sort((a, b) => a - b);
  // minLimit[j] holds for x12 with exactly j breaks ≤ x12 (x12 in [breaks[j−1], breaks[j])).
  // Each spread's first distance > x12 only moves forward as x12 grows: one pointer per
  // spread, O(B·S) for the table.
  const minLimit = zeros(breaks.length + 1);
  const next = zeros(distances.length);
  for (let j = 0; j <= breaks.length; j++) {
    const x12 = j === 0 ? -Infinity : breaks[j - 1];
    let min = Infinity;
    for (let k = 0; k < distances.length; k++) {
      const d = distances[k];
      let i = next[k];
      while (i < d.length && !(d[i] > x12)) i++;
      next[k] = i;
      const at = i + minPicks - 1;
      if (at < d.length && d[at] < min) min = d[at];
    }
    minLimit[j] = min;
  }
  return (x12: number): number => {
    let a = 0;
    let b = breaks.length;
    while (a < b) {
      const mid = (a + b) >> 1;
      if (breaks[mid] > x12) b = mid;
      else a = mid + 1;
    }
    return minLimit[a];
  };
}

/** maxHiddenLayerThickness on checked input, the spread as sorted distances. O(log n). */
function hiddenBound(v1: number, v2: number, v3: number, h1: number, distances: number[] | undefined, minPicks: number): HiddenLayerBound {
  const c12 = cosCritical(v1, v2);
  const c13 = cosCritical(v1, v3);
  const c23 = cosCritical(v2, v3);
  const ti2 = (2 * h1 * c12) / v1;
  const x12 = ti2 / (1 / v1 - 1 / v2);
  const limit = limitOffset(x12, distances, minPicks);
  if (limit === null) return { maxThicknessM: null, crossoverDirectM: x12, limitOffsetM: null };
  const h2 = (v2 * (limit * (1 / v2 - 1 / v3) - (2 * h1 * (c13 - c12)) / v1)) / (2 * c23);
  return { maxThicknessM: Math.max(0, h2), crossoverDirectM: x12, limitOffsetM: limit };
}

/** Whether a given intermediate layer would stay hidden on the spread. */
export function isLayerHidden(input: HiddenLayerInput & { hiddenThicknessM: number }): boolean {
  if (!(input.hiddenThicknessM >= 0)) throw new StructureInputError('hiddenThicknessM', `must be a thickness ≥ 0 m, got ${String(input.hiddenThicknessM)}`);
  const bound = maxHiddenLayerThickness(input);
  return bound.maxThicknessM === null || input.hiddenThicknessM <= bound.maxThicknessM;
}

/** One warning per place where a deeper velocity is not above the one over it. */
export function velocityInversion(velocitiesMPerS: number[]): Warning[] {
  if (!Array.isArray(velocitiesMPerS)) throw new StructureInputError('velocitiesMPerS', 'must be an array of layer velocities in m/s, top first');
  velocitiesMPerS.forEach((v, i) => positive(v, `velocitiesMPerS[${i}]`));
  const warnings: Warning[] = [];
  for (let i = 1; i < velocitiesMPerS.length; i++) {
    if (!(velocitiesMPerS[i] > velocitiesMPerS[i - 1])) {
      warnings.push({
        code: 'velocity-inversion',
        message: `Layer ${i + 1} (${velocityWords(velocitiesMPerS[i])}) is not faster than layer ${i} above it (${velocityWords(velocitiesMPerS[i - 1])}). A slower layer gives no head wave, so refraction first arrivals cannot see it and depths below it are not reliable; check the branch assignment.`,
      });
    }
  }
  return warnings;
}

export interface HiddenLayerWarningInput {
  /** Interpreted top-layer and refractor velocities, m/s. */
  v1MPerS: number;
  refractorVelocityMPerS: number;
  /** Interpreted (two-layer) depth to the refractor, m. */
  depthM: number;
  /** Source–geophone offsets of one spread, m (used when spreadsM is absent). */
  offsetsM?: number[];
  /**
   * Offsets of every shot side of the line, m, one array per side. The layer is hidden
   * only if it is hidden on every one of them: a far off-end shot whose nearest geophone
   * is tens of metres out cannot hide what the end shots' near offsets would show.
   */
  spreadsM?: number[][];
  /** Velocity assumed for the possible hidden layer; default √(V1·V3), our choice of a representative value. */
  hiddenVelocityMPerS?: number;
  minFirstArrivalPicks?: number;
  /** Where the warning applies, m. */
  x?: number;
}

/** What a hidden layer could do to a two-layer depth: its largest thickness and how much deeper the refractor would be, m. */
export interface HiddenLayerAllowance {
  /** Largest thickness of the layer that stays hidden on every spread, m. */
  thicknessM: number;
  /** Top-layer thickness left over it (the observed delay time held), m. */
  topThicknessM: number;
  /** How much deeper than the two-layer depth the refractor would then lie, m. */
  extraDepthM: number;
  /** Velocity the layer was checked at, m/s. */
  velocityMPerS: number;
}

/**
 * How much a hidden layer could deepen a two-layer depth (see hiddenLayerWarning), or null
 * when no layer could hide. The observed delay time t = z·cos θ13/V1 is kept fixed, so a
 * hidden layer of thickness h2 leaves h1 = (t − h2·cos θ23/V2)·V1/cos θ13 for the top
 * layer; h2 is hidden when it is hidden on every spread (each spread's bound from
 * maxHiddenLayerThickness); the largest such h2 is found on a ladder of 200 steps (by
 * bisection over the steps, hidden() being monotone) and 50 bisections.
 */
export function hiddenLayerAllowance(input: HiddenLayerWarningInput): HiddenLayerAllowance | null {
  return hiddenLayerAllowances(input, [input.depthM])[0];
}

/**
 * hiddenLayerAllowance at several two-layer depths on the same spreads and velocities
 * (input.depthM is ignored): the input is checked and each spread sorted once. Cost
 * O(S·n log n) for S spreads of n offsets and O(B·S) for the limit table (B distinct offsets),
 * then O(58 · log B) per depth.
 */
export function hiddenLayerAllowances(input: HiddenLayerWarningInput, depthsM: readonly number[]): (HiddenLayerAllowance | null)[] {
  const v1 = input.v1MPerS;
  const v3 = input.refractorVelocityMPerS;
  positive(v1, 'v1MPerS');
  positive(v3, 'refractorVelocityMPerS');
  if (!(v3 > v1)) throw new StructureInputError('refractorVelocityMPerS', `must exceed the top-layer velocity ${v1} m/s, got ${v3} m/s`);
  depthsM.forEach((d, i) => positive(d, depthsM.length === 1 ? 'depthM' : `depthsM[${i}]`));
  const v2 = input.hiddenVelocityMPerS ?? Math.sqrt(v1 * v3);
  checkOrder(v1, v2, v3);
  const spreads = input.spreadsM ?? (input.offsetsM ? [input.offsetsM] : null);
  if (!spreads || spreads.length === 0) throw new StructureInputError('spreadsM', 'must give the offsets of at least one spread (or offsetsM)');
  const minPicks = input.minFirstArrivalPicks ?? 3;
  if (!Number.isInteger(minPicks) || minPicks < 1) throw new StructureInputError('minFirstArrivalPicks', `must be an integer ≥ 1, got ${String(minPicks)}`);
  const distances = spreads.map((offsetsM) => {
    checkOffsets(offsetsM);
    return sortedDistances(offsetsM);
  });
  const nearestLimit = nearestLimitOffset(distances, minPicks);
  const c12 = cosCritical(v1, v2);
  const c13 = cosCritical(v1, v3);
  const c23 = cosCritical(v2, v3);
  return depthsM.map((depthM) => {
    const delayS = (depthM * c13) / v1;
    const h1Of = (h2: number): number => ((delayS - (h2 * c23) / v2) * v1) / c13;
    const h2AtZeroTop = (delayS * v2) / c23;
    // hiddenBound's arithmetic for every spread at once: the bound grows with the limit
    // offset, so the spread with the nearest limit is the binding one (nearestLimitOffset).
    const hidden = (h2: number): boolean => {
      const h1 = Math.max(0, h1Of(h2));
      const x12 = ((2 * h1 * c12) / v1) / (1 / v1 - 1 / v2);
      const limit = nearestLimit(x12);
      if (limit === Infinity) return true;
      const bound = Math.max(0, (v2 * (limit * (1 / v2 - 1 / v3) - (2 * h1 * (c13 - c12)) / v1)) / (2 * c23));
      return h2 <= bound;
    };
    // The first visible thickness of the 200-step ladder h2_k = h2AtZeroTop·k/200, then
    // bisect the boundary. hidden() is monotone in h2 (true up to one thickness, false
    // beyond): as h2 grows, h1 and with it x12 shrink, so the nearest limit offset can only
    // fall, and between its jumps h2 − bound grows with slope cos θ12/cos θ13 > 0. So the
    // first visible rung is found by bisection over k, O(log 200) tests, the same rung a
    // scan up the ladder finds.
    const n = 200;
    const rung = (k: number): number => (h2AtZeroTop * k) / n;
    let firstVisible = n + 1;
    for (let a = 1, b = n + 1; a < b; ) {
      const mid = (a + b) >> 1;
      if (hidden(rung(mid))) a = mid + 1;
      else b = firstVisible = mid;
    }
    let lo = firstVisible > 1 ? rung(firstVisible - 1) : 0;
    const hi: number | null = firstVisible <= n ? rung(firstVisible) : null;
    if (hi !== null) {
      let upper: number = hi;
      for (let it = 0; it < 50; it++) {
        const mid: number = 0.5 * (lo + upper);
        if (hidden(mid)) lo = mid;
        else upper = mid;
      }
    }
    if (lo <= 0) return null;
    const topThicknessM = Math.max(0, h1Of(lo));
    return { thicknessM: lo, topThicknessM, extraDepthM: Math.max(0, topThicknessM + lo - depthM), velocityMPerS: v2 };
  });
}

/**
 * Warning about a layer that the interpreted two-layer section could be hiding
 * (hiddenLayerAllowance); null when no such layer could hide on these spreads.
 */
export function hiddenLayerWarning(input: HiddenLayerWarningInput): Warning | null {
  const allowance = hiddenLayerAllowance(input);
  return allowance === null ? null : hiddenLayerWarningFor(input, allowance);
}

/** The warning's words for an allowance already computed (hiddenLayerAllowances). */
export function hiddenLayerWarningFor(input: HiddenLayerWarningInput, allowance: HiddenLayerAllowance): Warning {
  const r = lengthText;
  const where = input.spreadsM && input.spreadsM.length > 1 ? 'on any shot of this line' : 'on this spread';
  return {
    code: 'hidden-layer',
    message: `A layer of up to ${r(allowance.thicknessM)} m with a velocity between ${velocityNumber(input.v1MPerS)} and ${velocityWords(input.refractorVelocityMPerS)} (checked at ${velocityWords(allowance.velocityMPerS)}) could be hidden above the refractor ${where}; the refractor would then be up to ${r(allowance.extraDepthM)} m deeper than shown.`,
    ...(input.x !== undefined ? { x: input.x } : {}),
  };
}
