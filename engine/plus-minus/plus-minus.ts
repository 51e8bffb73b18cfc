/**
 * The plus-minus method (Hagedoorn, "The plus-minus method of interpreting seismic
 * refraction sections", Geophysical Prospecting 7, 1959, 158–182).
 *
 * For a geophone G between two opposing shots A (left, smaller x) and B (right), both
 * recording head waves from the same refractor at G:
 *   T+ = tAG + tBG − tAB          (plus time, ms)
 *   T− = tAG − tBG                (minus time, ms)
 * where tAB is the reciprocal time (A to B's position, equal to B to A's by reciprocity).
 * In delay-time form t(S, G) = aS + aG + L(S, G)/V2, with L measured along the refractor
 * between the feet of the perpendiculars; for G between A and B, L(A,G) + L(G,B) = L(A,B),
 * so T+ = 2·aG: the delay time at G is T+/2, whatever the shots' own delays and elevations.
 * T− = 2·L(A,G)/V2 + const, so T− against x has slope 2/V2 (see minus-time-velocity.ts).
 *
 * Normal depth (radius of G's depth arc): aG = zG·cos(ic)/V1 with sin(ic) = V1/V2, so
 *   zG = (T+/2)·V1·V2 / sqrt(V2² − V1²)            (T+ in s, V in m/s, z in m).
 * Per-pair arrays are arrays of doubles with NaN for "none" (shared/nan-none.ts).
 */
import type { NanNone } from '../shared/nan-none.js';
import { zeros } from '../shared/zeros.js';

export interface PlusMinusPairInput {
  /** Shot positions along the line, m; leftShotXM < rightShotXM. */
  leftShotXM: number;
  rightShotXM: number;
  /** Geophone positions along the line, m, in survey order. */
  geophoneXM: number[];
  /** Head-wave arrivals from the left shot at each geophone (picked or phantomed), ms; NaN where none. */
  leftTimesMs: NanNone;
  /** Head-wave arrivals from the right shot at each geophone, ms; NaN where none. */
  rightTimesMs: NanNone;
  /** Reciprocal time tAB between the two shots, ms. */
  reciprocalTimeMs: number;
}

export interface PlusMinusPairResult {
  /** T+ per geophone, ms; NaN where the geophone is not strictly between the shots or lacks an arrival. */
  plusTimeMs: NanNone;
  /** T− per geophone, ms; NaN where T+ is NaN. */
  minusTimeMs: NanNone;
}

/**
 * Plus and minus times of one opposing shot pair at every geophone it covers.
 * @example
 * plusMinus({ leftShotXM: 0, rightShotXM: 30, geophoneXM: [10, 20],
 *   leftTimesMs: [15, 19], rightTimesMs: [19, 15], reciprocalTimeMs: 22 })
 * // → { plusTimeMs: [12, 12], minusTimeMs: [-4, 4] }
 * Cost O(N), two arrays of N.
 */
export function plusMinus(input: PlusMinusPairInput): PlusMinusPairResult {
  const { leftShotXM, rightShotXM, geophoneXM, leftTimesMs, rightTimesMs, reciprocalTimeMs } = input;
  const n = geophoneXM.length;
  const plusTimeMs = zeros(n);
  const minusTimeMs = zeros(n);
  const tabOk = isTime(reciprocalTimeMs);
  for (let i = 0; i < n; i++) {
    const x = geophoneXM[i];
    const tA = leftTimesMs[i];
    const tB = rightTimesMs[i];
    const between = x > leftShotXM && x < rightShotXM;
    if (!between || !Number.isFinite(tA) || !Number.isFinite(tB) || !tabOk) {
      plusTimeMs[i] = Number.NaN;
      minusTimeMs[i] = Number.NaN;
      continue;
    }
    plusTimeMs[i] = tA + tB - reciprocalTimeMs;
    minusTimeMs[i] = tA - tB;
  }
  return { plusTimeMs, minusTimeMs };
}

export interface WeightedCombination {
  /** Inverse-variance weighted mean at each geophone, ms; null where no pair covers it. */
  valueMs: (number | null)[];
  /** One standard deviation of that mean, 1/√(Σ w), ms; null where none. */
  sigmaMs: (number | null)[];
  /** Number of pairs that contributed at each geophone. */
  pairCount: number[];
  /**
   * Consistency of the pairs at each geophone, χ² = Σ w_k·(v_k − mean)² with
   * pairCount − 1 degrees of freedom; null with fewer than two pairs.
   */
  chiSquare: (number | null)[];
}

/**
 * Combines per-pair values at each geophone (T+ of several opposing pairs, or T− with each
 * pair's constant removed) by inverse-variance weighting: w_k = 1/var_k,
 * mean = Σ w_k·v_k / Σ w_k, σ = 1/√(Σ w_k) (Bevington & Robinson, Data Reduction and Error
 * Analysis, 3rd ed., 2003, ch. 4). Every pair estimates the same 2·aG (Hagedoorn 1959), so
 * the weighting only decides how much each is trusted. A missing or non-positive variance
 * leaves the value out. Cost O(K·N) for K pairs and N geophones, no allocation per
 * geophone (two passes over the pairs at each geophone: the sums, then χ² about the mean).
 */
export function combineWeighted(values: readonly NanNone[], variances: readonly NanNone[], geophoneCount: number): WeightedCombination {
  // Pair by pair along each pair's row (its arrays are read in order, not one element of
  // every pair per geophone), into per-geophone sums; each geophone still adds its pairs in
  // pair order, so the sums are the same numbers. O(K·N), three arrays of N.
  const sw = zeros(geophoneCount);
  const swv = zeros(geophoneCount);
  const used = zeros(geophoneCount);
  for (let k = 0; k < values.length; k++) {
    const row = values[k];
    const rowVariance = variances[k];
    if (rowVariance === undefined) continue;
    for (let i = 0; i < geophoneCount; i++) {
      const v = row[i];
      const variance = rowVariance[i];
      if (!Number.isFinite(v) || !Number.isFinite(variance) || !(variance > 0)) continue;
      sw[i] += 1 / variance;
      swv[i] += v / variance;
      used[i]++;
    }
  }
  const mean = zeros(geophoneCount);
  for (let i = 0; i < geophoneCount; i++) mean[i] = sw[i] > 0 ? swv[i] / sw[i] : NaN;
  // Σ w_k·(v_k − mean)² over the same pairs, in the same order, where more than one pair.
  const chi = zeros(geophoneCount);
  for (let k = 0; k < values.length; k++) {
    const row = values[k];
    const rowVariance = variances[k];
    if (rowVariance === undefined) continue;
    for (let i = 0; i < geophoneCount; i++) {
      if (used[i] < 2) continue;
      const v = row[i];
      const variance = rowVariance[i];
      if (!Number.isFinite(v) || !Number.isFinite(variance) || !(variance > 0)) continue;
      chi[i] = chi[i] + (1 / variance) * (v - mean[i]) ** 2;
    }
  }
  const out: WeightedCombination = { valueMs: [], sigmaMs: [], pairCount: [], chiSquare: [] };
  for (let i = 0; i < geophoneCount; i++) {
    const has = sw[i] > 0;
    out.valueMs.push(has ? mean[i] : null);
    out.sigmaMs.push(has ? 1 / Math.sqrt(sw[i]) : null);
    out.pairCount.push(used[i]);
    out.chiSquare.push(has && used[i] > 1 ? chi[i] : null);
  }
  return out;
}

/**
 * Minus times of several pairs on one datum. T− of a pair is 2·∫slowness along the
 * refractor + a constant set by its shots (Hagedoorn 1959), so two pairs differ by a
 * constant wherever both are head waves, whatever the refractor velocity does. The pair
 * covering most geophones is the reference; every other pair (most overlap first) is
 * shifted by the weighted mean of its difference from the profile built so far over
 * their common geophones, then all are combined by inverse-variance weighting. Pairs that
 * share no geophone with the rest are left out.
 *
 * Cost O(K·N + K²) for K pairs and N geophones: the profile built so far is kept as
 * running sums Σw, Σw·v per geophone (added to in the order combineWeighted would add,
 * so its mean is the same number), and each pending pair's overlap with it as a count
 * raised when a geophone is first covered (each geophone once); choosing the next pair
 * is a scan of the K counts. The plain form (recombining everything for every pair added,
 * O(K²·N)) is tests/helpers/plain-minus-times.ts, compared with this one in
 * tests/engine/combine-minus-times.test.ts.
 */
export function combineMinusTimes(values: readonly NanNone[], variances: readonly NanNone[], geophoneCount: number): WeightedCombination {
  const pairCount = values.length;
  const n = geophoneCount;
  // has[k·N + i]: pair k has a usable value at geophone i. O(K·N).
  const has = zeros(pairCount * n);
  const count = zeros(pairCount);
  for (let k = 0; k < pairCount; k++) {
    for (let i = 0; i < n; i++) {
      const v = values[k][i];
      const variance = variances[k][i];
      if (Number.isFinite(v) && Number.isFinite(variance) && variance > 0) {
        has[k * n + i] = 1;
        count[k]++;
      }
    }
  }
  const order: number[] = [];
  for (let k = 0; k < pairCount; k++) if (count[k] > 0) order.push(k);
  order.sort((p, q) => count[q] - count[p] || p - q);
  if (order.length === 0) return combineWeighted([], [], geophoneCount);

  const sw = zeros(n);
  const swv = zeros(n);
  const overlap = zeros(pairCount);
  const pending = order.slice(1);
  const shifted: NanNone[] = [];
  const shiftedVar: NanNone[] = [];
  /** Adds one (shifted) pair to the running sums; counts newly covered geophones for the pending pairs. O(N + K·new). */
  const add = (row: NanNone, rowVar: NanNone): void => {
    shifted.push(row);
    shiftedVar.push(rowVar);
    for (let i = 0; i < n; i++) {
      const v = row[i];
      const variance = rowVar[i];
      if (!Number.isFinite(v) || !Number.isFinite(variance) || !(variance > 0)) continue;
      const wasCovered = sw[i] > 0;
      sw[i] += 1 / variance;
      swv[i] += v / variance;
      if (!wasCovered && sw[i] > 0) for (const k of pending) overlap[k] += has[k * n + i];
    }
  };
  add(values[order[0]], variances[order[0]]);
  while (pending.length > 0) {
    // The first pending pair (in order) with the most overlap, as the plain form chooses.
    let best = -1;
    let bestOverlap = 0;
    for (let j = 0; j < pending.length; j++) {
      if (overlap[pending[j]] > bestOverlap) {
        bestOverlap = overlap[pending[j]];
        best = j;
      }
    }
    if (best < 0) break;
    const k = pending.splice(best, 1)[0];
    let sumW = 0;
    let sumWD = 0;
    for (let i = 0; i < n; i++) {
      if (!(sw[i] > 0) || !has[k * n + i]) continue;
      const c = swv[i] / sw[i];
      const w = 1 / variances[k][i];
      sumW += w;
      sumWD += w * (values[k][i] - c);
    }
    const offset = sumWD / sumW;
    add(values[k].map((v) => (Number.isFinite(v) ? v - offset : Number.NaN)), variances[k]);
  }
  return combineWeighted(shifted, shiftedVar, geophoneCount);
}

/**
 * Normal depth (depth measured perpendicular to the refractor) from a delay time, m:
 *   z = (delay/1000)·V1·V2 / sqrt(V2² − V1²)
 * (Hagedoorn 1959; Kearey, Brooks & Hill 2002, ch. 5). Returns null unless V2 > V1 > 0
 * and the delay time is finite; a negative delay time (picks inconsistent with the
 * reciprocal time) gives a negative depth that the caller must reject or report.
 */
export function normalDepthFromDelayM(delayTimeMs: number, v1MPerS: number, v2MPerS: number): number | null {
  if (!isTime(delayTimeMs) || !(v1MPerS > 0) || !(v2MPerS > v1MPerS) || !Number.isFinite(v2MPerS)) return null;
  return ((delayTimeMs / 1000) * v1MPerS * v2MPerS) / Math.sqrt(v2MPerS * v2MPerS - v1MPerS * v1MPerS);
}

function isTime(value: number | null | undefined): value is number {
  return typeof value === 'number' && Number.isFinite(value);
}
