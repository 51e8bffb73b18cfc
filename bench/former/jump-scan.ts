// The former engine/structure/jump-scan.ts, kept only so that npm run bench can time it beside the current one in the same run.
/**
 * Scan a profile for level jumps with unchanged slope (the shared core of the delay-time
 * and branch step detectors in steps.ts).
 *
 * A step in the refractor shows in a delay-time profile or a branch not as a one-sample
 * jump but as a ramp: plus-minus smears it over about 2·z·tan(ic), and diffraction at the
 * step's corners widens it further on the downthrown side. At each candidate centre c and
 * ramp width W the points within W/2 + sidePoints spacings are fitted, with u = x − c, by
 *   step  y = a + b·u + J·R(u/W),  R(s) = min(1, max(0, s + ½))   (linear ramp, same
 *                                   slope b on both sides, level change J across it)
 *   kink  y = a + b·u + d·max(u − h, 0)   at the best h in the window (d = 0 is a line)
 * A change of slope (dip or velocity change) is continuous and kinked: one kink fits it.
 * A step is a level change between parallel lines: one kink cannot. With the noise σ
 * known, the likelihood-ratio statistic (RSS_kink − RSS_step)/σ² is at most χ² with one
 * degree of freedom when the truth is a line (both models nest the line and add one
 * term) and negative on a clean kink. The threshold is the Bonferroni bound over all
 * m trials (centres × widths) for a false-alarm probability α per profile:
 * T = z², z = Φ⁻¹(1 − α/(2m)) (Bonferroni; e.g. Miller, Simultaneous Statistical
 * Inference, 1981). Detections are thinned to the strongest in each neighbourhood
 * (non-maximum suppression), so one step is reported once, at the centre of its ramp.
 *
 * Ramp widths tried: W = W0·{1, 1.5, 2, 3} with W0 from the caller (2·z·tan(ic) for a
 * delay-time profile). A ramp that wide is, by plus-minus, indistinguishable from a
 * smeared vertical step; a wider one is two changes of dip, not a step.
 */
import { combinationVariance, leastSquares } from '../../engine/structure/least-squares.js';
import { normalQuantile } from '../../engine/structure/quantiles.js';

export interface JumpDetection {
  /** Centre of the ramp, m. */
  centreM: number;
  /** Level on the +x side minus level on the −x side at c, in the units of y. */
  jump: number;
  standardError: number;
  /** Width of the best-fitting ramp, m. */
  rampWidthM: number;
  /** (RSS_kink − RSS_step)/σ². */
  statistic: number;
  threshold: number;
}

export interface JumpScanOptions {
  sigma: number;
  /** Expected ramp width W0 at centre c, m. */
  rampWidthAt: (centreM: number) => number;
  sidePoints: number;
  minSidePoints: number;
  falseAlarmProbability: number;
  /** Multiples of rampWidthAt(c) tried at each centre (default [1, 1.5, 2, 3]). */
  widthFactors?: readonly number[];
}

interface Evaluated extends Omit<JumpDetection, 'threshold' | 'rampWidthM'> {
  halfWidth: number;
  scanCentre: number;
}

/**
 * Smooth ramp from 0 to 1 with its steepest slope 1/width at u = 0: the logistic
 * 1/(1 + e^(−4u/width)). Its tails stand for the slow diffraction tails of a real step.
 */
function ramp(u: number, width: number): number {
  if (width <= 0) return u >= 0 ? 1 : 0;
  return 1 / (1 + Math.exp((-4 * u) / width));
}

function evaluate(x: readonly number[], y: readonly number[], c: number, width: number, opts: JumpScanOptions, spacing: number): Evaluated | null {
  const reach = width / 2 + opts.sidePoints * spacing;
  const idx: number[] = [];
  for (let i = 0; i < x.length; i++) if (Math.abs(x[i] - c) <= reach) idx.push(i);
  let nLeft = 0;
  let nRight = 0;
  for (const i of idx) {
    if (x[i] <= c - width / 2) nLeft++;
    if (x[i] >= c + width / 2) nRight++;
  }
  if (nLeft < opts.minSidePoints || nRight < opts.minSidePoints) return null;
  const ys = idx.map((i) => y[i]);
  const u = idx.map((i) => x[i] - c);
  const step = leastSquares(u.map((ui) => [1, ui, ramp(ui, width)]), ys);
  if (!step) return null;
  let kinkRss = Infinity;
  for (let k = 0; k < u.length; k++) {
    for (const hinge of k + 1 < u.length ? [u[k], 0.5 * (u[k] + u[k + 1])] : [u[k]]) {
      const mk = leastSquares(u.map((ui) => [1, ui, Math.max(ui - hinge, 0)]), ys);
      if (mk && mk.rss < kinkRss) kinkRss = mk.rss;
    }
  }
  if (!Number.isFinite(kinkRss)) return null;
  return {
    centreM: c,
    jump: step.coefficients[2],
    standardError: opts.sigma * Math.sqrt(combinationVariance(step.unscaledCovariance, [0, 0, 1])),
    statistic: (kinkRss - step.rss) / (opts.sigma * opts.sigma),
    halfWidth: width / 2,
    scanCentre: c,
  };
}

/**
 * Maximum-likelihood ramp over one fixed window around a detection: centre within ±W0
 * of the detected one, width from W0 (the smear is never narrower) to the widest tried,
 * by least squares. Comparing
 * fits on the same points makes their residuals comparable, so the width and jump that
 * describe the whole transition are found, not only its steepest part.
 */
function refineRamp(x: readonly number[], y: readonly number[], c0: number, w0: number, sigma: number, sidePoints: number, spacing: number, factors: readonly number[]): Pick<JumpDetection, 'centreM' | 'jump' | 'standardError' | 'rampWidthM'> {
  const wMax = Math.max(w0, spacing) * Math.max(...factors);
  const reach = wMax / 2 + w0 + sidePoints * spacing;
  const idx: number[] = [];
  for (let i = 0; i < x.length; i++) if (Math.abs(x[i] - c0) <= reach) idx.push(i);
  const ys = idx.map((i) => y[i]);
  let best = { rss: Infinity, centreM: c0, jump: 0, standardError: Infinity, rampWidthM: w0 };
  const dc = spacing / 4;
  for (let c = c0 - w0; c <= c0 + w0 + 1e-9; c += dc) {
    for (let w = Math.max(w0, spacing); w <= wMax + 1e-9; w += Math.max(w0 / 4, spacing / 2)) {
      const fit = leastSquares(idx.map((i) => [1, x[i] - c, ramp(x[i] - c, w)]), ys);
      if (fit && fit.rss < best.rss) {
        best = { rss: fit.rss, centreM: c, jump: fit.coefficients[2], standardError: sigma * Math.sqrt(fit.unscaledCovariance[2][2]), rampWidthM: w };
      }
    }
  }
  // The jump itself from the lines beyond the whole transition (the logistic is within
  // 5 % of its end values at ±0.74·W, and a real step's diffraction tails reach about W0
  // either side), with one common slope: the ramp template's jump trades off against its
  // width, the side lines' does not.
  const exclusion = Math.max(0.75 * best.rampWidthM, w0);
  const left: number[] = [];
  const right: number[] = [];
  for (let i = x.length - 1; i >= 0 && left.length < 2 * sidePoints; i--) if (x[i] <= best.centreM - exclusion) left.push(i);
  for (let i = 0; i < x.length && right.length < 2 * sidePoints; i++) if (x[i] >= best.centreM + exclusion) right.push(i);
  if (left.length >= 3 && right.length >= 3) {
    const sideIdx = [...left.reverse(), ...right];
    const sides = leastSquares(
      sideIdx.map((i) => [1, x[i] - best.centreM, x[i] > best.centreM ? 1 : 0]),
      sideIdx.map((i) => y[i]),
    );
    if (sides) {
      return { centreM: best.centreM, jump: sides.coefficients[2], standardError: sigma * Math.sqrt(sides.unscaledCovariance[2][2]), rampWidthM: best.rampWidthM };
    }
  }
  return { centreM: best.centreM, jump: best.jump, standardError: best.standardError, rampWidthM: best.rampWidthM };
}

/** Finds jumps in y(x); x strictly increasing, no nulls. */
export function scanForJumps(x: readonly number[], y: readonly number[], opts: JumpScanOptions): JumpDetection[] {
  if (x.length < 2 * opts.minSidePoints) return [];
  const candidates: number[] = [];
  for (let i = 0; i < x.length; i++) {
    candidates.push(x[i]);
    if (i + 1 < x.length) candidates.push(0.5 * (x[i] + x[i + 1]));
  }
  const evaluated: Evaluated[] = [];
  const factors = opts.widthFactors ?? [1, 1.5, 2, 3];
  const spacing = (x[x.length - 1] - x[0]) / (x.length - 1);
  for (const c of candidates) {
    const w0 = Math.max(0, opts.rampWidthAt(c));
    for (const f of factors) {
      const r = evaluate(x, y, c, w0 * f, opts, spacing);
      if (r) evaluated.push(r);
    }
  }
  if (!evaluated.length) return [];
  const z = normalQuantile(1 - opts.falseAlarmProbability / (2 * evaluated.length));
  const threshold = z * z;
  const passing = evaluated.filter((r) => r.statistic > threshold);
  passing.sort((a, b) => b.statistic - a.statistic);
  const kept: typeof passing = [];
  for (const p of passing) {
    // One step per transition zone: a weaker maximum this close is the same step seen off-centre.
    if (kept.some((k) => Math.abs(k.centreM - p.centreM) < k.halfWidth + p.halfWidth + 2 * spacing)) continue;
    kept.push(p);
  }
  return kept
    .sort((a, b) => a.centreM - b.centreM)
    .map((k) => ({ ...refineRamp(x, y, k.centreM, opts.rampWidthAt(k.centreM), opts.sigma, opts.sidePoints, spacing, factors), statistic: k.statistic, threshold }));
}
