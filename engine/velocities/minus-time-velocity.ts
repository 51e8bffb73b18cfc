/**
 * Refractor velocity from minus times (Hagedoorn, Geophysical Prospecting 7, 1959).
 *
 * For one opposing pair, T−(x) = tAG − tBG = 2x/V2 + const, so the least-squares slope of
 * T− against x is 2/V2 (ms per m = 2000/V2 with V2 in m/s). Several pairs have the same
 * slope but different constants (their shots sit at different places), so they are fitted
 * with one common slope and one intercept per pair: each pair's x and T− are centred on
 * the pair's means, and the pooled centred points are fitted by ordinary least squares
 * (the common-slope estimate of the analysis of covariance; the arithmetic of
 * simple-statistics `linearRegression`, inlined over typed arrays).
 *
 * Standard error of the slope (ordinary least squares):
 *   s² = Σ residual² / (n − k − 1),   SE(slope) = s / sqrt(Σ (x − x̄_pair)²)
 * with n points and k pairs (n − 2 degrees of freedom for a single pair).
 * Propagated to the velocity by the first-order (delta-method) rule:
 *   V2 = 2000/slope,   SE(V2) = 2000·SE(slope)/slope².
 *
 * Over a planar refractor dipping θ with flat ground, the slope is 2·cos θ/V2: the velocity
 * found is the refractor velocity divided by cos θ (0.4 % high at 5°, 1 % at 8°). It is
 * reported as measured; the caller documents the bias.
 */
import { zeros } from '../shared/zeros.js';
export interface MinusTimeSeries {
  /** Geophone positions, m. */
  xM: ArrayLike<number>;
  /** T− at those geophones, ms (same length as xM). */
  minusTimeMs: ArrayLike<number>;
}

export type MinusTimeVelocityResult =
  | {
      ok: true;
      /** V2 = 2000/slope, m/s. */
      velocity: number;
      /** One standard error of V2, m/s. */
      standardError: number;
      /** Points used. */
      count: number;
      /** Slope of T− against x, ms per m, and its standard error. */
      slopeMsPerM: number;
      slopeStandardErrorMsPerM: number;
      /** Residual degrees of freedom, n − k − 1. */
      degreesOfFreedom: number;
    }
  | {
      ok: false;
      reason: 'too-few-points' | 'non-positive-slope';
      count: number;
      slopeMsPerM: number | null;
    };

/**
 * Fits V2 to the minus times of one or more opposing pairs (common slope).
 * Needs at least one residual degree of freedom (n ≥ k + 2) and a spread of x.
 * @example
 * minusTimeVelocity([{ xM: [0, 10, 20], minusTimeMs: [-8, 0, 8] }]) // V2 = 2000/0.8 = 2500 m/s
 */
export function minusTimeVelocity(series: MinusTimeSeries[]): MinusTimeVelocityResult {
  // Centred points in two typed arrays (no tuple per point: this runs once per segment and
  // pass over every pair's T−, and the tuples were most of the garbage). O(n) for n points.
  let capacity = 0;
  for (const s of series) capacity += Math.min(s.xM.length, s.minusTimeMs.length);
  const cx = zeros(capacity);
  const ct = zeros(capacity);
  let count = 0;
  let groups = 0;
  for (const s of series) {
    const start = count;
    const n = Math.min(s.xM.length, s.minusTimeMs.length);
    for (let i = 0; i < n; i++) {
      const x = s.xM[i];
      const t = s.minusTimeMs[i];
      if (Number.isFinite(x) && Number.isFinite(t)) {
        cx[count] = x;
        ct[count] = t;
        count++;
      }
    }
    const points = count - start;
    // A pair with one point only fixes its own intercept and says nothing about the slope.
    if (points < 2) {
      count = start;
      continue;
    }
    let sumX = 0;
    let sumT = 0;
    for (let i = start; i < count; i++) sumX += cx[i];
    for (let i = start; i < count; i++) sumT += ct[i];
    const meanX = sumX / points;
    const meanT = sumT / points;
    for (let i = start; i < count; i++) {
      cx[i] -= meanX;
      ct[i] -= meanT;
    }
    groups++;
  }
  const degreesOfFreedom = count - groups - 1;
  let sumXX = 0;
  for (let i = 0; i < count; i++) sumXX += cx[i] * cx[i];
  if (degreesOfFreedom < 1 || !(sumXX > 0)) return { ok: false, reason: 'too-few-points', count, slopeMsPerM: null };

  // Ordinary least squares of the pooled centred points, in the order of simple-statistics'
  // linearRegression (means first, then the centred cross products), which this replaced.
  let sumPX = 0;
  let sumPT = 0;
  for (let i = 0; i < count; i++) {
    sumPX += cx[i];
    sumPT += ct[i];
  }
  const meanPX = sumPX / count;
  const meanPT = sumPT / count;
  let sumXT = 0;
  let sumDXX = 0;
  for (let i = 0; i < count; i++) {
    const dx = cx[i] - meanPX;
    sumXT += dx * (ct[i] - meanPT);
    sumDXX += dx * dx;
  }
  const slope = sumXT / sumDXX;
  const intercept = meanPT - slope * meanPX;
  if (!(slope > 0) || !Number.isFinite(slope)) {
    return { ok: false, reason: 'non-positive-slope', count, slopeMsPerM: Number.isFinite(slope) ? slope : null };
  }
  let sumSquaredResiduals = 0;
  for (let i = 0; i < count; i++) sumSquaredResiduals += (ct[i] - (slope * cx[i] + intercept)) ** 2;
  const slopeStandardError = Math.sqrt(sumSquaredResiduals / degreesOfFreedom / sumXX);
  const velocity = 2000 / slope;
  const standardError = (2000 * slopeStandardError) / (slope * slope);
  return {
    ok: true,
    velocity,
    standardError,
    count,
    slopeMsPerM: slope,
    slopeStandardErrorMsPerM: slopeStandardError,
    degreesOfFreedom,
  };
}
