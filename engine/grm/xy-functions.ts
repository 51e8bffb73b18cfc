/**
 * The two functions of the generalised reciprocal method at one XY distance (Palmer,
 * "The generalized reciprocal method of seismic refraction interpretation", SEG, 1980;
 * Palmer, Geophysics 46, 1981, 1508–1518), at G midway between X and Y:
 *   velocity analysis  t_V = (t_AY − t_BX + t_AB)/2       slope 1/V' against x_G
 *   time-depth         t_G = (t_AY + t_BX − (t_AB + XY/V'))/2
 * A the left shot, B the right one, both recording the same refractor's head waves at X
 * and Y; V' the refractor velocity read from t_V at this XY (common-slope least squares
 * over the pairs, velocities/minus-time-velocity.ts, on t_AY − t_BX whose slope is 2/V').
 * The time-depths go through the plus-minus core (xy-pairs.ts says how), so they are
 * weighted, adjusted and combined exactly as plus times are.
 * Cost: O(pairs · geophones) per XY plus the core's adjustment.
 */
import type { OpposingPairInput, RefractorPlusTimes } from '../plus-minus/refractor-plus-times.js';
import { refractorPlusTimes } from '../plus-minus/refractor-plus-times.js';
import { combineMinusTimes } from '../plus-minus/plus-minus.js';
import { minusTimeVelocity, type MinusTimeSeries } from '../velocities/minus-time-velocity.js';
import { zeros, type Doubles } from '../shared/zeros.js';
import { pairsAtXy, xyStations, type XyStations } from './xy-pairs.js';

/** Both functions of one XY, per station G (combined over the pairs), with the measures the optimum is chosen by. */
export interface XyFunctions {
  /** XY = steps geophone intervals; `xyM` its nominal length, m (steps × spacing). */
  steps: number;
  xyM: number;
  stations: XyStations;
  /** V' from this XY's velocity-analysis function, m/s; null when it cannot be fitted (then `velocityUsedMPerS` is the fallback). */
  refractorVelocityMPerS: number | null;
  /** The V' in the XY/V' term, m/s. */
  velocityUsedMPerS: number;
  /** Velocity-analysis function per station, ms, pairs brought to one datum (combineMinusTimes); null where none. */
  velocityAnalysisMs: (number | null)[];
  /** Time-depth function t_G per station, ms; null where none. */
  timeDepthMs: (number | null)[];
  /** One standard deviation of t_G, ms. */
  timeDepthSigmaMs: (number | null)[];
  /** RMS residual of t_V about each pair's straight line, ms: how far t_V is from linear (the optimum's measure). */
  velocityRoughnessMs: number | null;
  /** RMS second difference of t_G, ms: how much detail the time-depths show (reported, not chosen by). */
  timeDepthDetailMs: number | null;
  /** Values counted in `velocityRoughnessMs`. */
  roughnessCount: number;
  /** The core's result at the stations (T+ = 2·t_G per pair), for the caller. */
  core: RefractorPlusTimes;
}

/** t_AY − t_BX per station for one pair (NaN where either is missing or G is not between the shots). O(stations). */
function pairMinus(p: OpposingPairInput, st: XyStations): Doubles {
  const n = st.stationXM.length;
  const out = zeros(n);
  for (let j = 0; j < n; j++) {
    const x = st.stationXM[j];
    const tA = p.leftTimes.timesMs[st.xIndex[j] + st.steps];
    const tB = p.rightTimes.timesMs[st.xIndex[j]];
    out[j] = x > p.left.x && x < p.right.x ? tA - tB : Number.NaN;
  }
  return out;
}

/**
 * RMS residual of each row about its own least-squares straight line (rows with ≥ 3 values),
 * pooled over the rows with n − 2 degrees of freedom each: how far the velocity-analysis
 * functions are from linear (Palmer 1980: at the optimum XY t_V is most nearly linear, the
 * refractor's relief cancelling out). Pick noise adds the same floor at every XY (each
 * t_V is two picks whatever the XY), so the XYs differ by the relief left in t_V. O(n) per row.
 */
export function rmsAboutLines(rows: readonly ArrayLike<number>[], xM: readonly number[]): { rms: number | null; count: number } {
  let sum = 0;
  let dof = 0;
  let count = 0;
  for (const row of rows) {
    let n = 0;
    let sx = 0;
    let sy = 0;
    for (let j = 0; j < xM.length; j++) {
      if (!Number.isFinite(row[j])) continue;
      n++;
      sx += xM[j];
      sy += row[j];
    }
    if (n < 3) continue;
    const mx = sx / n;
    const my = sy / n;
    let sxx = 0;
    let sxy = 0;
    for (let j = 0; j < xM.length; j++) {
      if (!Number.isFinite(row[j])) continue;
      sxx += (xM[j] - mx) ** 2;
      sxy += (xM[j] - mx) * (row[j] - my);
    }
    const slope = sxx > 0 ? sxy / sxx : 0;
    for (let j = 0; j < xM.length; j++) {
      if (!Number.isFinite(row[j])) continue;
      sum += (row[j] - my - slope * (xM[j] - mx)) ** 2;
    }
    dof += n - 2;
    count += n;
  }
  return { rms: dof > 0 ? Math.sqrt(sum / dof) : null, count };
}

/**
 * RMS of the second differences of consecutive values (three neighbouring stations with
 * values), each scaled to the mean station interval so an uneven layout does not count as
 * curvature: Δ² = (s₂ − s₁)·h̄ with s the slopes between neighbours. O(n) per row.
 */
export function rmsSecondDifference(rows: readonly ArrayLike<number>[], xM: readonly number[]): { rms: number | null; count: number } {
  let sum = 0;
  let count = 0;
  for (const row of rows) {
    for (let j = 1; j + 1 < xM.length; j++) {
      const a = row[j - 1];
      const b = row[j];
      const c = row[j + 1];
      if (!Number.isFinite(a) || !Number.isFinite(b) || !Number.isFinite(c)) continue;
      const h1 = xM[j] - xM[j - 1];
      const h2 = xM[j + 1] - xM[j];
      const d2 = ((c - b) / h2 - (b - a) / h1) * ((h1 + h2) / 2);
      sum += d2 * d2;
      count++;
    }
  }
  return { rms: count > 0 ? Math.sqrt(sum / count) : null, count };
}

/** Both GRM functions at XY = `steps` intervals; `fallbackVelocity` (m/s) stands in for V' when t_V cannot be fitted. */
export function xyFunctions(pairs: readonly OpposingPairInput[], geophoneXM: readonly number[], steps: number, spacingM: number, fallbackVelocityMPerS: number): XyFunctions {
  const st = xyStations(geophoneXM, steps);
  const n = st.stationXM.length;
  const minus = pairs.map((p) => pairMinus(p, st));
  // t_V = (t_AY − t_BX + t_AB)/2 per pair; the slope of t_AY − t_BX is 2/V'.
  const tv = minus.map((m, k) => Array.from(m, (v) => (v + pairs[k].reciprocalTimeMs) / 2));
  const series: MinusTimeSeries[] = [];
  for (const m of minus) {
    const xs: number[] = [];
    const ts: number[] = [];
    for (let j = 0; j < n; j++) if (Number.isFinite(m[j])) (xs.push(st.stationXM[j]), ts.push(m[j]));
    if (xs.length >= 3) series.push({ xM: xs, minusTimeMs: ts });
  }
  const fit = series.length > 0 ? minusTimeVelocity(series) : null;
  const fitted = fit && fit.ok && Number.isFinite(fit.velocity) && fit.velocity > 0 ? fit.velocity : null;
  const velocityUsed = fitted ?? fallbackVelocityMPerS;

  const core = refractorPlusTimes(pairsAtXy(pairs, st, velocityUsed), st.stationXM);
  const timeDepthMs = core.combined.plusTimeMs.map((t) => (t === null ? null : t / 2));
  const timeDepthSigmaMs = core.combined.plusSigmaMs.map((s) => (s === null ? null : s / 2));

  // t_V of every pair on one datum for the plot; pick variances as weights.
  const variances = pairs.map((p) => {
    const v = zeros(n);
    for (let j = 0; j < n; j++) v[j] = p.leftTimes.varianceMs2[st.xIndex[j] + steps] + p.rightTimes.varianceMs2[st.xIndex[j]];
    return v;
  });
  const datum = combineMinusTimes(tv.map((r) => Float64Array.from(r)), variances, n);
  const rough = rmsAboutLines(tv, st.stationXM);
  const detail = rmsSecondDifference([timeDepthMs.map((t) => t ?? Number.NaN)], st.stationXM);
  return {
    steps,
    xyM: steps * spacingM,
    stations: st,
    refractorVelocityMPerS: fitted,
    velocityUsedMPerS: velocityUsed,
    velocityAnalysisMs: datum.valueMs,
    timeDepthMs,
    timeDepthSigmaMs,
    velocityRoughnessMs: rough.rms,
    timeDepthDetailMs: detail.rms,
    roughnessCount: rough.count,
    core,
  };
}
