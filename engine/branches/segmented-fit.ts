/**
 * Segmented straight-line fit of a time–distance curve: the picks of one shot side,
 * ordered by offset, are split into consecutive straight segments (direct wave, first
 * refracted branch, second refracted branch), each fitted by least squares.
 *
 * Model of segment j (offset x in m, time t in ms): t = a_j + s_j·x, where s_j is the
 * slowness in ms/m, so the apparent velocity is 1000 / s_j m/s and a_j the intercept time
 * (Kearey, Brooks & Hill, An Introduction to Geophysical Exploration, 3rd ed., 2002, ch. 5).
 *
 * The breakpoints are the ones that minimise the total squared misfit over every split
 * with enough picks per segment; splits whose apparent velocity does not increase with
 * offset (by at least MIN_VELOCITY_RATIO) are rejected, because first arrivals of a
 * layered earth with velocity increasing downward always speed up with offset.
 * Cost: O(n) for two segments, O(n²) for three (prefix sums make each trial O(1)).
 */
import { median } from 'simple-statistics';
import { zeros, type Doubles } from '../shared/zeros.js';

export interface FitPoint {
  offsetM: number;
  timeMs: number;
}

export interface SegmentLine {
  /** Index range of the segment in the input points, [start, end). */
  start: number;
  end: number;
  /** Slowness, ms per m (1000 / apparent velocity in m/s). */
  slownessMsPerM: number;
  interceptMs: number;
  /** Points used in the line fit (outliers excluded). */
  count: number;
  /** RMS misfit of the fitted points, ms. */
  rmsMs: number;
}

export interface SegmentedFit {
  segments: SegmentLine[];
  /** Per input point: true when it was left out of the line fits as an outlier. */
  outlier: boolean[];
  /** Sum of squared residuals with each residual clipped at the outlier threshold, ms². */
  clippedSseMs2: number;
  /** Bayesian information criterion of the fit (lower is better). */
  bic: number;
}

/**
 * Apparent velocities of consecutive segments must grow by at least this factor.
 * Our choice: real layer contrasts are far larger, while noise alone easily produces
 * a few per cent, which would otherwise invent a layer.
 */
export const MIN_VELOCITY_RATIO = 1.1;
/** A pick is an outlier when its residual exceeds both this (ms) and OUTLIER_SIGMAS robust sigmas. Our choice. */
export const OUTLIER_FLOOR_MS = 1.0;
export const OUTLIER_SIGMAS = 3.5;
/**
 * Smallest floor of the residual variance in the BIC, as an RMS in ms: a noise-free curve
 * would otherwise make ln(0). assignBranches passes the survey's pick uncertainty instead
 * (default 0.5 ms), see robustSegmentedFit; this value is only the last resort.
 */
export const BIC_NOISE_FLOOR_MS = 0.05;
/** Least picks per segment, by number of segments: the direct segment needs 2, extra refracted segments 3. */
export const MIN_PICKS: Record<1 | 2 | 3, number[]> = { 1: [2], 2: [2, 2], 3: [2, 3, 3] };

/** Ordinary least-squares line t = a + s·x through points[i] for the given indices. */
export function fitLine(points: FitPoint[], indices: number[]): { slownessMsPerM: number; interceptMs: number; rmsMs: number } | null {
  const n = indices.length;
  if (n < 2) return null;
  // Centre on the means so that the normal equations do not lose digits.
  let mx = 0;
  let my = 0;
  for (const i of indices) {
    mx += points[i].offsetM;
    my += points[i].timeMs;
  }
  mx /= n;
  my /= n;
  let sxx = 0;
  let sxy = 0;
  for (const i of indices) {
    const dx = points[i].offsetM - mx;
    sxx += dx * dx;
    sxy += dx * (points[i].timeMs - my);
  }
  if (!(sxx > 0)) return null;
  const s = sxy / sxx;
  const a = my - s * mx;
  let sse = 0;
  for (const i of indices) {
    const r = points[i].timeMs - (a + s * points[i].offsetM);
    sse += r * r;
  }
  return { slownessMsPerM: s, interceptMs: a, rmsMs: Math.sqrt(sse / n) };
}

/**
 * BIC for a Gaussian segmented line (Schwarz, Annals of Statistics 6, 1978):
 * −2·ln L + p·ln(n), p = 2 per segment + 1 per breakpoint, with the noise standard
 * deviation σ fitted by maximum likelihood but not below the floor σ_f:
 *   SSE/n ≥ σ_f²:  −2·ln L = n·ln(SSE/n) + n
 *   SSE/n < σ_f²:  −2·ln L = n·ln(σ_f²) + SSE/σ_f²   (known-noise form)
 * (constant n·ln 2π dropped; the two forms meet at SSE/n = σ_f²). With σ_f the pick
 * uncertainty, a misfit below the picks' own scatter earns a model no more than its
 * χ² improvement, which two or three parameters per extra segment must pay for.
 */
export function bicScore(sseMs2: number, n: number, segmentCount: number, noiseFloorMs = BIC_NOISE_FLOOR_MS): number {
  const p = 3 * segmentCount - 1;
  const floor2 = noiseFloorMs * noiseFloorMs;
  const variance = sseMs2 / n;
  const minus2LogL = variance >= floor2 ? n * Math.log(variance) + n : n * Math.log(floor2) + sseMs2 / floor2;
  return minus2LogL + p * Math.log(n);
}

/** Prefix sums of centred x, y and their products, for O(1) line fits of any index range. */
class PrefixSums {
  private readonly c: Doubles[];
  constructor(xs: number[], ys: number[]) {
    const n = xs.length;
    const mx = xs.reduce((s, v) => s + v, 0) / Math.max(n, 1);
    const my = ys.reduce((s, v) => s + v, 0) / Math.max(n, 1);
    this.c = [0, 1, 2, 3, 4].map(() => zeros(n + 1));
    const [sx, sy, sxx, sxy, syy] = this.c;
    for (let i = 0; i < n; i++) {
      const x = xs[i] - mx;
      const y = ys[i] - my;
      sx[i + 1] = sx[i] + x;
      sy[i + 1] = sy[i] + y;
      sxx[i + 1] = sxx[i] + x * x;
      sxy[i + 1] = sxy[i] + x * y;
      syy[i + 1] = syy[i] + y * y;
    }
  }
  /** Slope of the last successful fit. */
  slope = 0;
  /** SSE of the last successful fit. */
  sse = 0;
  /**
   * Least-squares line over [i, j) into this.slope and this.sse; false when the offsets do
   * not vary. Fields, not a returned object: this runs O(n²) times for three segments.
   */
  fit(i: number, j: number): boolean {
    const n = j - i;
    const c = this.c;
    const sx = c[0][j] - c[0][i];
    const sy = c[1][j] - c[1][i];
    const sxx = c[2][j] - c[2][i];
    const sxy = c[3][j] - c[3][i];
    const syy = c[4][j] - c[4][i];
    const dxx = sxx - (sx * sx) / n;
    if (!(dxx > 1e-12)) return false;
    const dxy = sxy - (sx * sy) / n;
    const dyy = syy - (sy * sy) / n;
    const slope = dxy / dxx;
    this.slope = slope;
    this.sse = Math.max(0, dyy - slope * dxy);
    return true;
  }
}

/** Both slownesses positive and the velocity rising by MIN_VELOCITY_RATIO from a to b (v_b / v_a = s_a / s_b). */
function slopesIncrease(a: number, b: number): boolean {
  return a > 0 && b > 0 && a / b >= MIN_VELOCITY_RATIO;
}

/**
 * Best breakpoints for `segmentCount` segments over the points, by least squares.
 * Returns the start index of every segment (first is 0) in the given array, or null when
 * no split satisfies the minimum picks and the increasing-velocity rule.
 */
export function bestBreakpoints(points: FitPoint[], segmentCount: 1 | 2 | 3): number[] | null {
  const n = points.length;
  const min = MIN_PICKS[segmentCount];
  if (n < min.reduce((s, v) => s + v, 0)) return null;
  const sums = new PrefixSums(points.map((p) => p.offsetM), points.map((p) => p.timeMs));
  if (segmentCount === 1) {
    return sums.fit(0, n) && sums.slope > 0 ? [0] : null;
  }
  let best: number[] | null = null;
  let bestSse = Infinity;
  if (segmentCount === 2) {
    for (let k = min[0]; k <= n - min[1]; k++) {
      if (!sums.fit(0, k)) continue;
      const aSlope = sums.slope;
      const aSse = sums.sse;
      if (!sums.fit(k, n) || !slopesIncrease(aSlope, sums.slope)) continue;
      if (aSse + sums.sse < bestSse) {
        bestSse = aSse + sums.sse;
        best = [0, k];
      }
    }
    return best;
  }
  // The last segment's line for every start k (NaN slope: none), O(n).
  const tailSlope = zeros(n + 1).fill(Number.NaN);
  const tailSse = zeros(n + 1);
  for (let k = 0; k <= n - min[2]; k++) {
    if (sums.fit(k, n)) {
      tailSlope[k] = sums.slope;
      tailSse[k] = sums.sse;
    }
  }
  for (let k1 = min[0]; k1 <= n - min[1] - min[2]; k1++) {
    if (!sums.fit(0, k1)) continue;
    const aSlope = sums.slope;
    const aSse = sums.sse;
    if (!(aSlope > 0)) continue;
    for (let k2 = k1 + min[1]; k2 <= n - min[2]; k2++) {
      const cSlope = tailSlope[k2];
      if (!(cSlope > 0) || aSlope / cSlope < MIN_VELOCITY_RATIO * MIN_VELOCITY_RATIO) continue;
      if (!sums.fit(k1, k2) || !slopesIncrease(aSlope, sums.slope) || !slopesIncrease(sums.slope, cSlope)) continue;
      const sse = aSse + sums.sse + tailSse[k2];
      if (sse < bestSse) {
        bestSse = sse;
        best = [0, k1, k2];
      }
    }
  }
  return best;
}

function linesFor(points: FitPoint[], starts: number[], keep: boolean[]): SegmentLine[] | null {
  const lines: SegmentLine[] = [];
  for (let j = 0; j < starts.length; j++) {
    const start = starts[j];
    const end = j + 1 < starts.length ? starts[j + 1] : points.length;
    const idx: number[] = [];
    for (let i = start; i < end; i++) if (keep[i]) idx.push(i);
    const l = fitLine(points, idx);
    if (!l) return null;
    lines.push({ start, end, slownessMsPerM: l.slownessMsPerM, interceptMs: l.interceptMs, count: idx.length, rmsMs: l.rmsMs });
  }
  return lines;
}

function residualOf(p: FitPoint, l: SegmentLine): number {
  return p.timeMs - (l.interceptMs + l.slownessMsPerM * p.offsetM);
}

/**
 * Segmented fit with one round of outlier rejection: fit, flag picks whose residual
 * exceeds max(OUTLIER_FLOOR_MS, OUTLIER_SIGMAS·1.4826·MAD) (at most a fifth of the picks),
 * search the breakpoints again without them, and give each flagged pick to the segment
 * that spans its offset (between two segments: the one whose line is closer).
 * The BIC uses residuals clipped at the threshold so that fits with different
 * segment counts are compared on the same picks, and a residual variance no smaller than
 * noiseFloorMs²: misfits below the pick uncertainty cannot tell two models apart, so the
 * extra segments' penalty then decides (a known-noise reading of Schwarz's criterion).
 */
export function robustSegmentedFit(points: FitPoint[], segmentCount: 1 | 2 | 3, noiseFloorMs = BIC_NOISE_FLOOR_MS): SegmentedFit | null {
  const n = points.length;
  const firstStarts = bestBreakpoints(points, segmentCount);
  if (!firstStarts) return null;
  const all = points.map(() => true);
  const first = linesFor(points, firstStarts, all);
  if (!first) return null;
  const residuals = points.map((p, i) => residualOf(p, first[segmentIndex(first, i)]));
  const absRes = residuals.map(Math.abs);
  const robustSigma = 1.4826 * median(absRes);
  const threshold = Math.max(OUTLIER_FLOOR_MS, OUTLIER_SIGMAS * robustSigma);
  const maxOutliers = Math.floor(n / 5);
  const flaggedOrder = absRes
    .map((r, i) => ({ r, i }))
    .filter((e) => e.r > threshold)
    .sort((a, b) => b.r - a.r)
    .slice(0, maxOutliers);
  const outlier = points.map(() => false);
  for (const e of flaggedOrder) outlier[e.i] = true;

  let lines = first;
  if (flaggedOrder.length > 0) {
    const inlierIdx = points.map((_, i) => i).filter((i) => !outlier[i]);
    const inliers = inlierIdx.map((i) => points[i]);
    const starts = bestBreakpoints(inliers, segmentCount);
    if (starts) {
      // Map breakpoints back to the full array: an outlier in a gap goes to the nearer line.
      const inlierLines = linesFor(inliers, starts, inliers.map(() => true));
      if (inlierLines) {
        const fullStarts = [0];
        for (let j = 1; j < starts.length; j++) {
          const lastOfPrev = inlierIdx[starts[j] - 1];
          const firstOfNext = inlierIdx[starts[j]];
          let cut = firstOfNext;
          for (let i = lastOfPrev + 1; i < firstOfNext; i++) {
            const rPrev = Math.abs(residualOf(points[i], inlierLines[j - 1]));
            const rNext = Math.abs(residualOf(points[i], inlierLines[j]));
            if (rNext < rPrev) {
              cut = i;
              break;
            }
          }
          fullStarts.push(cut);
        }
        const refit = linesFor(points, fullStarts, outlier.map((o) => !o));
        if (refit) lines = refit;
      }
    } else {
      const refit = linesFor(points, firstStarts, outlier.map((o) => !o));
      if (refit) lines = refit;
    }
  }
  let clipped = 0;
  points.forEach((p, i) => {
    const r = residualOf(p, lines[segmentIndex(lines, i)]);
    clipped += Math.min(r * r, threshold * threshold);
  });
  return { segments: lines, outlier, clippedSseMs2: clipped, bic: bicScore(clipped, n, segmentCount, noiseFloorMs) };
}

function segmentIndex(lines: SegmentLine[], i: number): number {
  for (let j = lines.length - 1; j >= 0; j--) if (i >= lines[j].start) return j;
  return 0;
}
