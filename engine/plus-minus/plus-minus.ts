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
 */

export interface PlusMinusPairInput {
  /** Shot positions along the line, m; leftShotXM < rightShotXM. */
  leftShotXM: number;
  rightShotXM: number;
  /** Geophone positions along the line, m, in survey order. */
  geophoneXM: number[];
  /** Head-wave arrivals from the left shot at each geophone (picked or phantomed), ms; null where none. */
  leftTimesMs: (number | null)[];
  /** Head-wave arrivals from the right shot at each geophone, ms; null where none. */
  rightTimesMs: (number | null)[];
  /** Reciprocal time tAB between the two shots, ms. */
  reciprocalTimeMs: number;
}

export interface PlusMinusPairResult {
  /** T+ per geophone, ms; null where the geophone is not strictly between the shots or lacks an arrival. */
  plusTimeMs: (number | null)[];
  /** T− per geophone, ms; null where T+ is null. */
  minusTimeMs: (number | null)[];
}

/**
 * Plus and minus times of one opposing shot pair at every geophone it covers.
 * @example
 * plusMinus({ leftShotXM: 0, rightShotXM: 30, geophoneXM: [10, 20],
 *   leftTimesMs: [15, 19], rightTimesMs: [19, 15], reciprocalTimeMs: 22 })
 * // → { plusTimeMs: [12, 12], minusTimeMs: [-4, 4] }
 */
export function plusMinus(input: PlusMinusPairInput): PlusMinusPairResult {
  const { leftShotXM, rightShotXM, geophoneXM, leftTimesMs, rightTimesMs, reciprocalTimeMs } = input;
  const plusTimeMs: (number | null)[] = [];
  const minusTimeMs: (number | null)[] = [];
  for (let i = 0; i < geophoneXM.length; i++) {
    const x = geophoneXM[i];
    const tA = leftTimesMs[i];
    const tB = rightTimesMs[i];
    const between = x > leftShotXM && x < rightShotXM;
    if (!between || !isTime(tA) || !isTime(tB) || !isTime(reciprocalTimeMs)) {
      plusTimeMs.push(null);
      minusTimeMs.push(null);
      continue;
    }
    plusTimeMs.push(tA + tB - reciprocalTimeMs);
    minusTimeMs.push(tA - tB);
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
 * leaves the value out.
 */
export function combineWeighted(values: (number | null)[][], variances: (number | null)[][], geophoneCount: number): WeightedCombination {
  const out: WeightedCombination = { valueMs: [], sigmaMs: [], pairCount: [], chiSquare: [] };
  for (let i = 0; i < geophoneCount; i++) {
    let sw = 0;
    let swv = 0;
    const used: [number, number][] = [];
    values.forEach((pair, k) => {
      const v = pair[i];
      const variance = variances[k]?.[i];
      if (!isTime(v) || !isTime(variance) || !(variance > 0)) return;
      sw += 1 / variance;
      swv += v / variance;
      used.push([v, 1 / variance]);
    });
    const mean = sw > 0 ? swv / sw : null;
    out.valueMs.push(mean);
    out.sigmaMs.push(sw > 0 ? 1 / Math.sqrt(sw) : null);
    out.pairCount.push(used.length);
    out.chiSquare.push(mean !== null && used.length > 1 ? used.reduce((s, [v, w]) => s + w * (v - mean) ** 2, 0) : null);
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
 */
export function combineMinusTimes(values: (number | null)[][], variances: (number | null)[][], geophoneCount: number): WeightedCombination {
  const has = (k: number, i: number): boolean => isTime(values[k][i]) && isTime(variances[k][i]) && (variances[k][i] as number) > 0;
  const count = (k: number): number => values[k].filter((_, i) => has(k, i)).length;
  const order = values.map((_, k) => k).filter((k) => count(k) > 0).sort((p, q) => count(q) - count(p) || p - q);
  if (order.length === 0) return combineWeighted([], [], geophoneCount);
  const shifted: (number | null)[][] = [values[order[0]]];
  const shiftedVar: (number | null)[][] = [variances[order[0]]];
  const pending = order.slice(1);
  while (pending.length > 0) {
    const current = combineWeighted(shifted, shiftedVar, geophoneCount).valueMs;
    let best = -1;
    let bestOverlap = 0;
    pending.forEach((k, j) => {
      const overlap = current.filter((c, i) => c !== null && has(k, i)).length;
      if (overlap > bestOverlap) {
        bestOverlap = overlap;
        best = j;
      }
    });
    if (best < 0) break;
    const k = pending.splice(best, 1)[0];
    let sw = 0;
    let swd = 0;
    current.forEach((c, i) => {
      if (c === null || !has(k, i)) return;
      const w = 1 / (variances[k][i] as number);
      sw += w;
      swd += w * ((values[k][i] as number) - c);
    });
    const offset = swd / sw;
    shifted.push(values[k].map((v) => (isTime(v) ? v - offset : null)));
    shiftedVar.push(variances[k]);
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
