/**
 * The generalised reciprocal method as a stage (Palmer, "The generalized reciprocal method
 * of seismic refraction interpretation", SEG, 1980; Palmer, Geophysics 46, 1981): the
 * velocity-analysis and time-depth functions for every XY of the range (optimum-xy.ts),
 * the optimum XY, and the time-depths at the optimum moved onto the geophones, where the
 * rest of the engine turns them into depths exactly as it turns plus-minus delay times
 * into depths: the time-depth t_G takes the place of the delay time, and the depth
 * conversion factor of Palmer (1980), z = t_G·V·V'/√(V'² − V²), is the normal-depth
 * formula of plus-minus/plus-minus.ts (normalDepthFromDelayM), followed by the same arcs.
 * Pure and deterministic. Cost: O(XYs · (pairs · geophones + adjustment)).
 */
import type { OpposingPairInput } from '../plus-minus/refractor-plus-times.js';
import { xyFunctions, type XyFunctions } from './xy-functions.js';
import { expectedOptimumXyM, optimumIndex, xyStepRange } from './optimum-xy.js';

export interface GrmResult {
  /** The functions at XY = 0, d, 2d, … in order. */
  functions: XyFunctions[];
  /** Index into `functions` of the optimum XY. */
  optimum: number;
  /** Palmer's expectation 2·z·tan(ic) from the plus-minus result's mean delay time, m; null without V1 < V2. */
  expectedOptimumXyM: number | null;
  /** Time-depth at each geophone, ms (the optimum XY's, else the largest smaller XY reaching it). */
  timeDepthMs: (number | null)[];
  /** One standard deviation of T+ = 2·t_G at each geophone, ms (as the plus-minus core reports it). */
  plusSigmaMs: (number | null)[];
  /** XY steps the time-depth at each geophone comes from; null where none. */
  stepsUsed: (number | null)[];
}

export interface GrmInput {
  pairs: readonly OpposingPairInput[];
  geophoneXM: readonly number[];
  spacingM: number;
  /** The plus-minus delay times (XY = 0), ms: they size the range of XY. */
  plusMinusDelayMs: readonly (number | null)[];
  v1MPerS: number | null;
  v2MPerS: number | null;
  /** Forces the XY (in geophone intervals) instead of the optimum; for checks against plus-minus. */
  forcedSteps?: number;
}

/** Linear interpolation of station values onto the geophones, null where a bracketing value is missing. O(N + stations). */
function onGeophones(stationXM: readonly number[], values: readonly (number | null)[], geophoneXM: readonly number[]): (number | null)[] {
  const out: (number | null)[] = [];
  let j = 0;
  for (const x of geophoneXM) {
    while (j + 1 < stationXM.length && stationXM[j + 1] <= x) j++;
    if (stationXM.length === 0 || x < stationXM[0] || x > stationXM[stationXM.length - 1]) {
      out.push(null);
      continue;
    }
    const a = values[j];
    if (stationXM[j] === x) {
      out.push(a);
      continue;
    }
    const b = values[j + 1];
    if (a === null || b === null || b === undefined) {
      out.push(null);
      continue;
    }
    const f = (x - stationXM[j]) / (stationXM[j + 1] - stationXM[j]);
    out.push(a + f * (b - a));
  }
  return out;
}

/** Mean of the values that are numbers, null when none. */
function meanOf(values: readonly (number | null)[]): number | null {
  const v = values.filter((x): x is number => x !== null && Number.isFinite(x));
  return v.length > 0 ? v.reduce((s, x) => s + x, 0) / v.length : null;
}

/** The GRM time-depths of the first refractor from the plus-minus stage's opposing pairs. */
export function grmTimeDepths(input: GrmInput): GrmResult {
  const { pairs, geophoneXM, spacingM, v1MPerS, v2MPerS } = input;
  const meanDelay = meanOf(input.plusMinusDelayMs);
  const maxDelay = input.plusMinusDelayMs.reduce<number | null>((m, d) => (d !== null && (m === null || d > m) ? d : m), null);
  const expected = meanDelay !== null && v1MPerS !== null && v2MPerS !== null ? expectedOptimumXyM(meanDelay, v1MPerS, v2MPerS) : null;
  const expectedMax = maxDelay !== null && v1MPerS !== null && v2MPerS !== null ? expectedOptimumXyM(maxDelay, v1MPerS, v2MPerS) : null;
  const maxSteps = input.forcedSteps ?? xyStepRange(geophoneXM.length, spacingM, expectedMax);
  // V' stand-in where t_V cannot be fitted: the plus-minus V2 (XY = 0 needs none).
  const fallback = v2MPerS !== null && v2MPerS > 0 ? v2MPerS : Number.POSITIVE_INFINITY;
  const functions: XyFunctions[] = [];
  for (let k = 0; k <= maxSteps; k++) functions.push(xyFunctions(pairs, geophoneXM, k, spacingM, fallback));
  const optimum = input.forcedSteps !== undefined ? maxSteps : optimumIndex(functions.map((f) => f.velocityRoughnessMs));

  // At the optimum, then each smaller XY for the geophones it leaves uncovered (our choice:
  // the line's ends, where Y or X falls off the spread, keep a time-depth from a shorter XY).
  const n = geophoneXM.length;
  const timeDepthMs: (number | null)[] = new Array<number | null>(n).fill(null);
  const plusSigmaMs: (number | null)[] = new Array<number | null>(n).fill(null);
  const stepsUsed: (number | null)[] = new Array<number | null>(n).fill(null);
  for (let k = optimum; k >= 0; k--) {
    const f = functions[k];
    const td = onGeophones(f.stations.stationXM, f.timeDepthMs, geophoneXM);
    const sd = onGeophones(f.stations.stationXM, f.timeDepthSigmaMs, geophoneXM);
    for (let i = 0; i < n; i++) {
      if (timeDepthMs[i] !== null || td[i] === null) continue;
      timeDepthMs[i] = td[i];
      plusSigmaMs[i] = sd[i] === null ? null : 2 * sd[i]!;
      stepsUsed[i] = k;
    }
  }
  return { functions, optimum, expectedOptimumXyM: expected, timeDepthMs, plusSigmaMs, stepsUsed };
}
