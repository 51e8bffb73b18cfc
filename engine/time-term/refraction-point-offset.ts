import type { TimeTermObservation } from './time-terms.js';

/**
 * Time terms at the refraction points rather than at the stations. A head wave leaves the
 * refractor not below the geophone but offset toward the shot by about z·tan(ic) (and enters
 * it offset from the shot toward the geophone by as much): the delay time belongs to that
 * point (Barry, Geophysical Prospecting 15, 1967, from memory; Palmer 1980, the GRM's XY:
 * forward and reverse rays that leave the refractor at one point reach the ground XY apart,
 * XY ≈ 2·z·tan(ic)). One delay per station whatever the ray's direction is exact over a plane
 * but smears a curved refractor, worst where coverage is one-sided (near the line's ends).
 *
 * So each pick is read as t = f(x_g ∓ h) + f(x_s ± h) + Σ s_k·L_k (L_k still between shot
 * and geophone), f the delay along the line at the stations and h one offset for the line, a
 * whole number of geophone intervals (as the GRM uses one XY per line, in whole intervals;
 * one h also keeps a planar refractor exact: for a linear f the two shifts cancel). In the
 * inversion's terms: the pick's geophone term is the station's h toward the shot (beyond the
 * spread's ends, a term of its own that only such picks share, so that one-sided picks there
 * do not pull the end stations' terms), and a shot on the spread becomes two shots, one at
 * x_s + h for its picks to the right and one at x_s − h for those to its left, each tied to
 * the stations there as any shot is (time-terms.ts). A shot off the spread keeps one free term
 * (it takes its own leg whatever the offset). The structure of the solve is unchanged (one
 * station term per row), so is its cost.
 */

/** The line's offset h = z̄·tan(ic) from the mean of the station terms, m (z = a·V1/cos ic). O(N). */
export function refractionPointOffsetM(termsMs: readonly (number | null)[], v1MPerS: number, v2MPerS: number): number {
  if (!(v2MPerS > v1MPerS && v1MPerS > 0)) return 0;
  const known = termsMs.filter((a): a is number => a !== null && Number.isFinite(a));
  if (known.length === 0) return 0;
  const meanMs = known.reduce((s, a) => s + a, 0) / known.length;
  // h = z·tan(ic) = a·V1/cos(ic)·tan(ic) = a·V1²·V2/(V2² − V1²), a in s.
  const h = ((meanMs / 1000) * v1MPerS * v1MPerS * v2MPerS) / (v2MPerS * v2MPerS - v1MPerS * v1MPerS);
  return Math.max(0, h);
}

/** Observations re-pointed at the refraction points, the shots they now refer to, and which of them stand for each real shot. */
export interface AtRefractionPoints {
  observations: TimeTermObservation[];
  shotXsM: number[];
  /** The stations, then the refraction points beyond the spread's ends (their terms are not stations'). */
  geophoneXsM: number[];
  /** Indices into shotXsM of each real shot's leg terms (two for a shot on the spread, one off it). */
  legsOfShot: number[][];
}

/**
 * The picks re-pointed at the refraction points for a shift of `steps` geophone intervals
 * (see the file comment). O(picks · log N + N log N).
 */
export function atRefractionPoints(geophoneXsM: readonly number[], shotXsM: readonly number[], observations: readonly TimeTermObservation[], shiftM: number): AtRefractionPoints {
  const order = geophoneXsM.map((_, j) => j).sort((a, b) => geophoneXsM[a] - geophoneXsM[b]);
  const sorted = order.map((j) => geophoneXsM[j]);
  const lo = sorted[0];
  const hi = sorted[sorted.length - 1];
  /**
   * The geophone nearest x (beyond the spread's ends, a refraction point's own term); of several
   * at that position (a rolling line) one the same shot was recorded on, else the one nearest
   * in the list to geophone j (a rolling line lists each spread's geophones together).
   * O(log N + repeats).
   */
  const xsG = [...geophoneXsM];
  const beyond = new Map<number, number>();
  const recorded = new Set(observations.map((o) => o.shot * geophoneXsM.length + o.geophone));
  const nearest = (x: number, j: number, shot: number): number => {
    if (x < lo - SAME_POSITION_M || x > hi + SAME_POSITION_M) {
      const key = Math.round(x / SAME_POSITION_M);
      if (!beyond.has(key)) beyond.set(key, xsG.push(x) - 1);
      return beyond.get(key)!;
    }
    const target = Math.min(hi, Math.max(lo, x));
    let a = 0;
    let b = sorted.length - 1;
    while (b - a > 1) {
      const mid = (a + b) >> 1;
      if (sorted[mid] <= target) a = mid;
      else b = mid;
    }
    const k = target - sorted[a] <= sorted[b] - target ? a : b;
    let best = order[k];
    const rank = (g: number): number => (recorded.has(shot * geophoneXsM.length + g) ? 0 : 1) * geophoneXsM.length + Math.abs(g - j);
    for (const step of [-1, 1]) {
      for (let m = k; m >= 0 && m < sorted.length && sorted[m] === sorted[k]; m += step) {
        if (rank(order[m]) < rank(best)) best = order[m];
      }
    }
    return best;
  };
  const xs: number[] = [];
  const legsOfShot = shotXsM.map((x) => {
    // Off the spread: placed at ±∞ so that no term ties it (nor a refraction point's own term
    // beyond the ends, which would sit beside it); the picks' spans keep the slowness lengths.
    if (x < lo - SAME_POSITION_M) return [xs.push(-Infinity) - 1];
    if (x > hi + SAME_POSITION_M) return [xs.push(Infinity) - 1];
    return [xs.push(x + shiftM) - 1, xs.push(x - shiftM) - 1];
  });
  const out = observations.map((o) => {
    const xg = geophoneXsM[o.geophone];
    const xsReal = shotXsM[o.shot];
    const rightward = xsReal < xg;
    const legs = legsOfShot[o.shot];
    return {
      shot: legs.length === 1 ? legs[0] : rightward ? legs[0] : legs[1],
      geophone: nearest(rightward ? xg - shiftM : xg + shiftM, o.geophone, o.shot),
      timeMs: o.timeMs,
      spanM: [Math.min(xg, xsReal), Math.max(xg, xsReal)] as const,
    };
  });
  return { observations: out, geophoneXsM: xsG, shotXsM: xs, legsOfShot };
}

/** A shot this close to the spread's end is on it, m (time-terms.ts's tie tolerance). */
const SAME_POSITION_M = 1e-3;
