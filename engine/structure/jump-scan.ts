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
import { leastSquares } from './least-squares.js';
import { addColumn, addColumnOnePass, bestKinkRss, fitWindowLine, fitWindowLineOnePass, windowEnd, windowStart, type ColumnFit, type WindowLine } from './window-fits.js';
import { normalQuantile } from './quantiles.js';

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
  /**
   * A threshold calibrated elsewhere (e.g. by a Monte Carlo test of the profile's own
   * error process, rock-steps.ts) in place of the Bonferroni bound; falseAlarmProbability
   * is then not used.
   */
  threshold?: number;
}

/**
 * Multiples f of W0 = rampWidthAt(c) tried at each centre (see the file comment). Their
 * ramps share one exponential per point: e^(−4u/(W0·f)) = a^p with a = e^(−2u/(3·W0)) and
 * p = 6/f = 6, 4, 3, 2 (fillRampColumns), the exponential being most of a trial's cost.
 */
const WIDTH_FACTORS = [1, 1.5, 2, 3] as const;

/**
 * Smooth ramp from 0 to 1 with its steepest slope 1/width at u = 0: the logistic
 * 1/(1 + e^(−4u/width)). Its tails stand for the slow diffraction tails of a real step.
 */
function ramp(u: number, width: number): number {
  if (width <= 0) return u >= 0 ? 1 : 0;
  return 1 / (1 + Math.exp((-4 * u) / width));
}

/**
 * Work space of a scan: O(n) memory for n points. Typed arrays are dear to allocate for
 * short profiles (a demo line's scans spent more time creating them than fitting), so one
 * work space is kept for the module and grown when a longer profile comes; a scan
 * overwrites every entry it reads, so no result depends on an earlier call.
 */
interface Scratch {
  /** Points it holds room for. */
  capacity: number;
  line: WindowLine;
  /** Window of the last stepFit, x[lo..hi−1]. */
  lo: number;
  hi: number;
  column: Float64Array;
  /** The ramps of the current centre for each width factor at x[columnsStart..columnsEnd − 1]. */
  columns: Float64Array[];
  columnsStart: number;
  columnsEnd: number;
  fit: ColumnFit;
  /** Per trial (2n − 1 centres × the width factors): centre, W0, factor index, RSS_line/σ², statistic, half-width. */
  centres: Float64Array;
  baseWidths: Float64Array;
  factorOf: Uint8Array;
  bounds: Float64Array;
  statistics: Float64Array;
  halfWidths: Float64Array;
  /** Prefix sums over the profile of u, u², v, uv, v² (u = x − x̄, v = y − the profile's chord), n + 1 each. */
  prefix: Float64Array[];
}

let shared: Scratch | null = null;

/** The module's work space, with room for n points. */
function scratchFor(n: number): Scratch {
  if (shared && shared.capacity >= n) return shared;
  const capacity = Math.max(n, 2 * (shared?.capacity ?? 32));
  const slots = 2 * capacity * WIDTH_FACTORS.length;
  shared = {
    capacity,
    line: { n: 0, uMean: 0, yMean: 0, sxx: 0, slope: 0, rss: 0, sumU2: 0 },
    lo: 0,
    hi: 0,
    column: new Float64Array(capacity),
    columns: WIDTH_FACTORS.map(() => new Float64Array(capacity)),
    columnsStart: 0,
    columnsEnd: 0,
    fit: { rss: 0, coefficient: 0, unscaledVariance: 0 },
    centres: new Float64Array(slots),
    baseWidths: new Float64Array(slots),
    factorOf: new Uint8Array(slots),
    bounds: new Float64Array(slots),
    statistics: new Float64Array(slots),
    halfWidths: new Float64Array(slots),
    prefix: [0, 1, 2, 3, 4].map(() => new Float64Array(capacity + 1)),
  };
  return shared;
}

/**
 * The ramps R(u/(W0·f)) of centre c for every width factor at the points x[lo..hi−1], into
 * s.columns (WIDTH_POWERS: one exponential per point); unit steps when W0 = 0. The values
 * depend only on x_i, c and W0, so both passes of the scan see the same numbers. O(m).
 */
function fillRampColumns(x: readonly number[], c: number, w0: number, lo: number, hi: number, s: Scratch): void {
  s.columnsStart = lo;
  s.columnsEnd = hi;
  const [c1, c15, c2, c3] = s.columns;
  for (let i = lo; i < hi; i++) {
    const u = x[i] - c;
    const j = i - lo;
    if (!(w0 > 0)) {
      const step = u >= 0 ? 1 : 0;
      c1[j] = step;
      c15[j] = step;
      c2[j] = step;
      c3[j] = step;
      continue;
    }
    const a = Math.exp((-2 * u) / (3 * w0));
    const a2 = a * a;
    const a3 = a2 * a;
    c1[j] = 1 / (1 + a3 * a3);
    c15[j] = 1 / (1 + a2 * a2);
    c2[j] = 1 / (1 + a3);
    c3[j] = 1 / (1 + a2);
  }
}

/** Half-width of the window of a ramp of width W: W/2 and sidePoints spacings beyond. */
function windowReach(width: number, opts: Pick<JumpScanOptions, 'sidePoints'>, spacing: number): number {
  return width / 2 + opts.sidePoints * spacing;
}

/** Index of the first x ≥ bound within x[from..to−1] (x increasing; `to` if none); binary search. */
function firstAtOrAbove(x: readonly number[], bound: number, from: number, to: number): number {
  let a = from;
  let b = to;
  while (a < b) {
    const mid = (a + b) >> 1;
    if (x[mid] < bound) a = mid + 1;
    else b = mid;
  }
  return a;
}

/** Index of the first x > bound within x[from..to−1] (x increasing; `to` if none); binary search. */
function firstAbove(x: readonly number[], bound: number, from: number, to: number): number {
  let a = from;
  let b = to;
  while (a < b) {
    const mid = (a + b) >> 1;
    if (x[mid] <= bound) a = mid + 1;
    else b = mid;
  }
  return a;
}

/**
 * The window of centre c and width factor k (ramp width W = W0·f_k), searched within
 * x[from..to−1] (a range known to hold it; the same indices as over all of x, in O(log m)):
 * sets s.lo and s.hi and returns true, or false when it has fewer than minSidePoints points
 * beyond either end of the ramp (counted by bisection). A window that passes has at least
 * two such points on each side, hence distinct positions and a line that can be fitted.
 */
function trialWindow(x: readonly number[], c: number, w0: number, k: number, opts: Pick<JumpScanOptions, 'sidePoints' | 'minSidePoints'>, spacing: number, from: number, to: number, s: Scratch): boolean {
  const width = w0 * WIDTH_FACTORS[k];
  const reach = windowReach(width, opts, spacing);
  const lo = windowStart(x, c, reach, from, to);
  const hi = windowEnd(x, c, reach, from, to);
  const nLeft = Math.max(0, Math.min(hi, firstAbove(x, c - width / 2, from, to)) - lo);
  const nRight = Math.max(0, hi - Math.max(lo, firstAtOrAbove(x, c + width / 2, from, to)));
  if (nLeft < opts.minSidePoints || nRight < opts.minSidePoints) return false;
  s.lo = lo;
  s.hi = hi;
  return true;
}

/**
 * Running sums for screenLineRss: u = x − x̄ and v = y less the chord through the
 * profile's end points, so that the sums stay of the size of the profile's departures
 * from a line and window differences keep their precision. O(n).
 */
function fillPrefixSums(x: readonly number[], y: readonly number[], s: Scratch): void {
  const n = x.length;
  let xMean = 0;
  for (let i = 0; i < n; i++) xMean += x[i];
  xMean /= n;
  const chordSlope = (y[n - 1] - y[0]) / (x[n - 1] - x[0]);
  const [pu, puu, pv, puv, pvv] = s.prefix;
  for (let i = 0; i < n; i++) {
    const u = x[i] - xMean;
    const v = y[i] - y[0] - chordSlope * (x[i] - x[0]);
    pu[i + 1] = pu[i] + u;
    puu[i + 1] = puu[i] + u * u;
    pv[i + 1] = pv[i] + v;
    puv[i + 1] = puv[i] + u * v;
    pvv[i + 1] = pvv[i] + v * v;
  }
}

/**
 * RSS of the straight line over x[lo..hi−1] from the running sums, O(1): the first pass's
 * screen. It only decides whether a trial is worth its exact fits (lineFit, stepFit), which
 * the second pass then makes, so its rounding never reaches a result.
 */
function screenLineRss(lo: number, hi: number, s: Scratch): number {
  // Indexed, not destructured: destructuring allocates an iterator, and this runs per trial.
  const p = s.prefix;
  const pu = p[0];
  const puu = p[1];
  const pv = p[2];
  const puv = p[3];
  const pvv = p[4];
  const n = hi - lo;
  const su = pu[hi] - pu[lo];
  const sv = pv[hi] - pv[lo];
  const sxx = puu[hi] - puu[lo] - (su * su) / n;
  const sxv = puv[hi] - puv[lo] - (su * sv) / n;
  const svv = pvv[hi] - pvv[lo] - (sv * sv) / n;
  return sxx > 0 ? Math.max(0, svv - (sxv * sxv) / sxx) : 0;
}

/**
 * Every trial of a scan, screened (the first pass of scanForJumps, shared with
 * maxJumpStatistic): a trial is a centre (each x_i and each midpoint, in order) and a width
 * factor with at least minSidePoints points beyond each end of the ramp; its centre, W0,
 * factor and bound RSS_line/σ² go into s.centres, s.baseWidths, s.factorOf and s.bounds in
 * scan order. Returns how many. O(n·F·log m) for n points, F widths, m points per window.
 */
function screenTrials(x: readonly number[], y: readonly number[], opts: Pick<JumpScanOptions, 'rampWidthAt' | 'sidePoints' | 'minSidePoints'>, spacing: number, sigma2: number, s: Scratch): number {
  const factorCount = WIDTH_FACTORS.length;
  fillPrefixSums(x, y, s);
  let evaluated = 0;
  for (let i = 0; i < x.length; i++) {
    for (let half = 0; half < 2; half++) {
      if (half === 1 && i + 1 >= x.length) break;
      const c = half === 0 ? x[i] : 0.5 * (x[i] + x[i + 1]);
      const w0 = Math.max(0, opts.rampWidthAt(c));
      // The widest ramp's window holds every narrower one's.
      const widest = windowReach(w0 * WIDTH_FACTORS[factorCount - 1], opts, spacing);
      const from = windowStart(x, c, widest);
      const to = windowEnd(x, c, widest);
      for (let k = 0; k < factorCount; k++) {
        if (!trialWindow(x, c, w0, k, opts, spacing, from, to, s)) continue;
        s.centres[evaluated] = c;
        s.baseWidths[evaluated] = w0;
        s.factorOf[evaluated] = k;
        s.bounds[evaluated] = screenLineRss(s.lo, s.hi, s) / sigma2;
        evaluated++;
      }
    }
  }
  return evaluated;
}

/**
 * The step fit of a trial whose window and line are set (s.lo, s.hi, s.line): its
 * ramp computed over the window (fillRampColumns) and added to the line. RSS_step, or NaN
 * when the ramp is (numerically) a line over the window. O(m).
 */
function stepFit(x: readonly number[], y: readonly number[], c: number, w0: number, k: number, s: Scratch): number {
  fillRampColumns(x, c, w0, s.lo, s.hi, s);
  return addColumnOnePass(x, y, s.lo, c, s.line, s.columns[k], s.columnsStart, s.fit) ? s.fit.rss : NaN;
}

/**
 * Maximum-likelihood ramp over one fixed window around a detection: centre within ±W0
 * of the detected one, width from W0 (the smear is never narrower) to the widest tried,
 * by least squares. Comparing
 * fits on the same points makes their residuals comparable, so the width and jump that
 * describe the whole transition are found, not only its steepest part.
 * The line part a + b·(x − c) spans the same functions for every c, so the window's line
 * is fitted once and each (c, W) adds its ramp column (addColumn): O(m) per trial, O(T·m)
 * for T trials.
 */
function refineRamp(x: readonly number[], y: readonly number[], c0: number, w0: number, sigma: number, sidePoints: number, spacing: number, s: Scratch): Pick<JumpDetection, 'centreM' | 'jump' | 'standardError' | 'rampWidthM'> {
  const wMax = Math.max(w0, spacing) * WIDTH_FACTORS[WIDTH_FACTORS.length - 1];
  const reach = wMax / 2 + w0 + sidePoints * spacing;
  const lo = windowStart(x, c0, reach);
  const hi = windowEnd(x, c0, reach);
  let best = { rss: Infinity, centreM: c0, jump: 0, standardError: Infinity, rampWidthM: w0 };
  const dc = spacing / 4;
  if (fitWindowLine(x, y, lo, hi, c0, s.line)) {
    for (let c = c0 - w0; c <= c0 + w0 + 1e-9; c += dc) {
      for (let w = Math.max(w0, spacing); w <= wMax + 1e-9; w += Math.max(w0 / 4, spacing / 2)) {
        for (let i = lo; i < hi; i++) s.column[i - lo] = ramp(x[i] - c, w);
        if (addColumn(x, y, lo, c0, s.line, s.column, s.fit) && s.fit.rss < best.rss) {
          best = { rss: s.fit.rss, centreM: c, jump: s.fit.coefficient, standardError: sigma * Math.sqrt(s.fit.unscaledVariance), rampWidthM: w };
        }
      }
    }
  }
  // The jump itself from the lines beyond the whole transition (the logistic is within
  // 5 % of its end values at ±0.74·W, and a real step's diffraction tails reach about W0
  // either side), with one common slope: the ramp template's jump trades off against its
  // width, the side lines' does not. One small fit per detection (O(sidePoints)).
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

/**
 * Finds jumps in y(x); x strictly increasing, no nulls. Cost O(n·F·log m) to screen n
 * points at F widths (m points per window, growing with the ramp width, i.e. the depth,
 * not with the line length), O(m) more for each trial the screen passes, and O(D·T·m) to
 * refine D detections; O(n) memory.
 *
 * Two passes. The first screens every window by its line's RSS from running sums (O(1)
 * per trial) and counts the trials (the Bonferroni m): a trial is a centre and width with
 * enough points beyond each end of the ramp. Both models nest the line, so
 * RSS_kink − RSS_step ≤ RSS_line − RSS_step ≤ RSS_line, and the statistic cannot pass
 * where RSS_line/σ² does not: the second pass fits the step (and, where
 * (RSS_line − RSS_step)/σ² still passes, the kink) only there. On a profile as smooth as
 * its noise that is almost nowhere, so a scan costs about a line fit per trial. A trial
 * whose step or kink cannot be fitted (the ramp or hinge numerically a line over the
 * window, which points beyond both ramp ends rule out in practice) counts as a trial that
 * did not pass.
 */
export function scanForJumps(x: readonly number[], y: readonly number[], opts: JumpScanOptions): JumpDetection[] {
  if (x.length < 2 * opts.minSidePoints) return [];
  const spacing = (x[x.length - 1] - x[0]) / (x.length - 1);
  const s = scratchFor(x.length);
  const sigma2 = opts.sigma * opts.sigma;
  // Every trial (centre, width) with a line fit, in scan order: centre, W0, width factor,
  // RSS_line/σ² (the statistic's upper bound).
  const { centres, baseWidths, factorOf, bounds, statistics, halfWidths } = s;
  const evaluated = screenTrials(x, y, opts, spacing, sigma2, s);
  if (!evaluated) return [];
  const z = normalQuantile(1 - opts.falseAlarmProbability / (2 * evaluated));
  const threshold = opts.threshold ?? z * z;
  // The screen's rounding is a few ulps of the largest running sum (Σv² over the profile):
  // a margin thousands of times that keeps every trial the exact fit could pass.
  const screen = threshold - (1e-12 * s.prefix[4][x.length]) / sigma2;
  const passing: number[] = [];
  for (let r = 0; r < evaluated; r++) {
    const w0 = baseWidths[r];
    const k = factorOf[r];
    halfWidths[r] = (w0 * WIDTH_FACTORS[k]) / 2;
    if (!(bounds[r] > screen)) continue;
    trialWindow(x, centres[r], w0, k, opts, spacing, 0, x.length, s);
    if (!fitWindowLineOnePass(x, y, s.lo, s.hi, centres[r], s.line)) continue;
    const stepRss = stepFit(x, y, centres[r], w0, k, s);
    if (!((s.line.rss - stepRss) / sigma2 > threshold)) continue;
    const kinkRss = bestKinkRss(x, y, s.lo, s.hi, centres[r], s.line);
    if (!Number.isFinite(kinkRss)) continue;
    statistics[r] = (kinkRss - stepRss) / sigma2;
    if (statistics[r] > threshold) passing.push(r);
  }
  passing.sort((a, b) => statistics[b] - statistics[a]);
  const kept: number[] = [];
  for (const p of passing) {
    // One step per transition zone: a weaker maximum this close is the same step seen off-centre.
    if (kept.some((k) => Math.abs(centres[k] - centres[p]) < halfWidths[k] + halfWidths[p] + 2 * spacing)) continue;
    kept.push(p);
  }
  return kept
    .sort((a, b) => centres[a] - centres[b])
    .map((k) => ({ ...refineRamp(x, y, centres[k], opts.rampWidthAt(centres[k]), opts.sigma, opts.sidePoints, spacing, s), statistic: statistics[k], threshold }));
}

/**
 * The largest statistic (RSS_kink − RSS_step)/σ² over every trial of scanForJumps (same
 * trials, same fits; 0 when no trial has a positive one): the statistic a Monte Carlo
 * test compares between simulated and observed profiles (rock-steps.ts). Branch and
 * bound: trials are taken in decreasing order of their bound RSS_line/σ² (≥ the
 * statistic, see scanForJumps) and the search stops once the bound falls to the best
 * statistic found, so on a profile as smooth as its noise few trials are fitted. Cost
 * O(n·F·log m) to screen, O(T log T) to sort T trials, O(m) per trial fitted.
 */
export function maxJumpStatistic(x: readonly number[], y: readonly number[], opts: Omit<JumpScanOptions, 'falseAlarmProbability' | 'threshold'>): number {
  if (x.length < 2 * opts.minSidePoints) return 0;
  const spacing = (x[x.length - 1] - x[0]) / (x.length - 1);
  const s = scratchFor(x.length);
  const sigma2 = opts.sigma * opts.sigma;
  const evaluated = screenTrials(x, y, opts, spacing, sigma2, s);
  const trials: { c: number; w0: number; k: number; bound: number }[] = [];
  for (let r = 0; r < evaluated; r++) trials.push({ c: s.centres[r], w0: s.baseWidths[r], k: s.factorOf[r], bound: s.bounds[r] });
  trials.sort((a, b) => b.bound - a.bound);
  // The screen's rounding margin, as in scanForJumps.
  const margin = (1e-12 * s.prefix[4][x.length]) / sigma2;
  let best = 0;
  for (const t of trials) {
    if (!(t.bound + margin > best)) break;
    trialWindow(x, t.c, t.w0, t.k, opts, spacing, 0, x.length, s);
    if (!fitWindowLineOnePass(x, y, s.lo, s.hi, t.c, s.line)) continue;
    const stepRss = stepFit(x, y, t.c, t.w0, t.k, s);
    if (!((s.line.rss - stepRss) / sigma2 > best)) continue;
    const kinkRss = bestKinkRss(x, y, s.lo, s.hi, t.c, s.line);
    if (!Number.isFinite(kinkRss)) continue;
    best = Math.max(best, (kinkRss - stepRss) / sigma2);
  }
  return best;
}
