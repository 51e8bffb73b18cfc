/**
 * Lateral changes of refractor velocity from the minus-time profile.
 *
 * Plus-minus (Hagedoorn, Geophys. Prospect. 7, 1959): for a geophone G between opposing
 * shots A (at −x) and B (at +x), T− = t_AG − t_BG = 2·x/V2 + const, so the slope of T−
 * against x is 2/V2 and V2 = 2/|dT−/dx| (×1000 with x in m and T− in ms gives m/s).
 * Where V2 changes, T− stays continuous (both branches still meet the same refractor) and
 * only its slope changes, so the profile is a continuous piecewise-linear ("hinge")
 * function: T−(x) = a + b·(x − x̄) + Σ_k c_k·(x − ξ_k)₊.
 *
 * Method: binary segmentation (Scott & Knott, Biometrics 30, 1974) adapted to the
 * continuous hinge model: at each stage the one new hinge ξ that most lowers the residual
 * sum of squares is found by trying every candidate position, the other hinges' positions
 * are then re-optimised, and the hinge is kept only when the penalised likelihood
 * improves, i.e. ΔRSS/σ² > β (with σ known, −2·log-likelihood is RSS/σ²). The penalty is
 * set from the noise level for a stated false-alarm probability α (default 1 %) over all
 * candidate positions: under "no change", ΔRSS/σ² at one fixed position is χ² with one
 * degree of freedom, and the Bonferroni bound over the m candidate positions gives
 * β = z², z = Φ⁻¹(1 − α/(2m)) (for 48 geophones, m ≈ 90 and β ≈ 15). This is a penalised
 * likelihood in the sense of Yao (Stat. Probab. Lett. 6, 1988) with a stricter penalty
 * than BIC's 2·ln n ≈ 7.7: with BIC and a 3σ ratio test, an earlier version gave 6 false
 * changes in the 150 uniform profiles of tests/engine/structure/velocity-changes.test.ts
 * (this penalty gives 0). Each surviving change
 * must also pass a Wald test on the velocity ratio, |ln(V_right/V_left)| / SE ≥ zMin
 * (default the same z), and differ by at least minRelativeChange (default 5 %, common
 * practice: smaller lateral changes are below what a refraction line resolves). The least
 * significant hinge is dropped and the fit redone until all pass.
 *
 * Noise: σ_T− = √2 · pickSigmaMs (difference of two independent picks), raised to the
 * robust data estimate (noise-level.ts) when the picks are noisier than stated, so an
 * optimistic pickSigmaMs cannot manufacture changes.
 *
 * Units: x in m, T− in ms, velocities in m/s. Cost per stage O(n·K + m·K² + n·log n) for
 * n points, m ≈ 2n candidate positions and K hinges (bestWith), where trying every
 * candidate by a dense fit was O(m·n·K²) = O(n²·K²).
 */
import { combinationVariance, leastSquares, type LeastSquaresFit } from './least-squares.js';
import { robustNoiseSigma } from './noise-level.js';
import { normalQuantile } from './quantiles.js';
import { checkPositions, checkPositive, checkValues, presentPoints, StructureInputError } from './structure-input.js';
import { zeros, type Doubles } from '../shared/zeros.js';

export interface VelocitySegment {
  /** Extent along the line, m. */
  from: number;
  to: number;
  /** Refractor velocity 2/|slope of T−|, m/s. */
  velocity: number;
  /** One standard error of the velocity, m/s. */
  standardError: number;
}

export interface RefractorVelocityChange {
  /** Hinge position, m. */
  x: number;
  /** Velocity on the −x and +x sides, m/s. */
  left: number;
  right: number;
  /** Wald statistic of ln(right/left) against its standard error. */
  zScore: number;
}

export interface VelocityChangeOptions {
  /** Standard deviation of one first-break pick, ms. */
  pickSigmaMs: number;
  /** Fewest T− values between hinges (default 4). */
  minSegmentPoints?: number;
  /** Smallest |ln(V_right/V_left)|/SE kept (default: the Bonferroni z of the penalty). */
  zMin?: number;
  /** False-alarm probability per profile that sets the penalty (default 0.01). */
  falseAlarmProbability?: number;
  /** Smallest relative velocity change kept, |ΔV|/min(V) (default 0.05). */
  minRelativeChange?: number;
  /** Penalty per hinge in units of ΔRSS/σ² (default z², see the file comment). */
  penalty?: number;
}

export interface VelocityChangeResult {
  segments: VelocitySegment[];
  changes: RefractorVelocityChange[];
  /** Noise level of T− used for the tests, ms. */
  noiseSigmaMs: number;
}

interface HingeFit {
  knots: number[];
  fit: LeastSquaresFit;
}

function hingeFit(x: readonly number[], y: readonly number[], knots: readonly number[], xMean: number): HingeFit | null {
  const rows = x.map((xi) => [1, xi - xMean, ...knots.map((k) => Math.max(0, xi - k))]);
  const fit = leastSquares(rows, y);
  return fit ? { knots: [...knots], fit } : null;
}

/** Slope of segment j (0 = left of every hinge) as a coefficient combination. */
function slopeCombination(segment: number, knotCount: number): number[] {
  const a = new Array<number>(2 + knotCount).fill(0);
  a[1] = 1;
  for (let k = 0; k < segment; k++) a[2 + k] = 1;
  return a;
}

/** Number of x (increasing) strictly between lo and hi; two binary searches, O(log n). */
function pointsBetween(x: readonly number[], lo: number, hi: number): number {
  return Math.max(0, firstIndex(x, (v) => v >= hi) - firstIndex(x, (v) => v > lo));
}

/** First index whose value satisfies a predicate that is false then true along x; O(log n). */
function firstIndex(x: readonly number[], past: (v: number) => boolean): number {
  let a = 0;
  let b = x.length;
  while (a < b) {
    const mid = (a + b) >> 1;
    if (past(x[mid])) b = mid;
    else a = mid + 1;
  }
  return a;
}

/** Candidate hinge positions: every point and every midpoint, leaving minSeg points per segment. */
function candidatePositions(x: readonly number[], knots: readonly number[], minSeg: number, skip?: number): number[] {
  const others = knots.filter((_, i) => i !== skip);
  const bounds = [-Infinity, ...others, Infinity];
  const out: number[] = [];
  for (let i = 0; i < x.length; i++) {
    const cands = i + 1 < x.length ? [x[i], 0.5 * (x[i] + x[i + 1])] : [x[i]];
    for (const c of cands) {
      if (others.some((k) => Math.abs(k - c) < 1e-9)) continue;
      const j = bounds.findIndex((b) => b > c);
      const lo = bounds[j - 1];
      const hi = bounds[j];
      // A point exactly at the hinge counts on neither side.
      if (pointsBetween(x, lo, c) < minSeg) continue;
      if (pointsBetween(x, c, hi) < minSeg) continue;
      out.push(c);
    }
  }
  return out;
}

/**
 * The hinge fit with one more knot (or knot `replace` moved) at the candidate position
 * that gives the least RSS. Every candidate is first screened at O(p²) by running sums
 * (screenCandidates); only those whose screened RSS lies within a hair of the least are
 * fitted by the dense normal equations, in candidate order with the same strict "<", so
 * the chosen knot and the returned fit are those of trying every candidate densely.
 * Cost O(n·p + m·p² + n·log n) for n points, m candidates and p = knots + 3 columns,
 * plus O(n·p²) per dense fit (usually one).
 */
function bestWith(x: readonly number[], y: readonly number[], knots: readonly number[], xMean: number, minSeg: number, replace?: number): HingeFit | null {
  const candidates = candidatePositions(x, knots, minSeg, replace);
  const base = replace === undefined ? knots : knots.filter((_, i) => i !== replace);
  const screened = screenCandidates(x, y, base, xMean, candidates);
  let best: HingeFit | null = null;
  for (let m = 0; m < candidates.length; m++) {
    // NaN (screened as dependent) is fitted densely too: the dense fit decides.
    if (screened && screened.rss[m] > screened.cutoff) continue;
    const c = candidates[m];
    const trial = replace === undefined ? [...knots, c] : knots.map((k, i) => (i === replace ? c : k));
    trial.sort((a, b) => a - b);
    const f = hingeFit(x, y, trial, xMean);
    if (f && (!best || f.fit.rss < best.fit.rss)) best = f;
  }
  return best;
}

/**
 * RSS of the base hinge fit (knots `base`) plus one hinge g = (x − c)₊ at every candidate
 * c, by the Frisch–Waugh–Lovell theorem (Frisch & Waugh, Econometrica 1, 1933; Lovell,
 * JASA 58, 1963): RSS = RSS_base − (gᵀe)²/(gᵀg − ‖Qᵀg‖²), with Q an orthonormal basis of
 * the base design (modified Gram–Schmidt, applied twice, "twice is enough": Giraud et
 * al., Numer. Math. 101, 2005) and e the base residuals (orthogonal to Q). g is nonzero only
 * right of c, so gᵀg, gᵀe and Qᵀg come from suffix sums of 1, u, u², e, u·e and of each
 * q_j and q_j·u (u = x − x̄): O(p) per candidate (left of c, with prefix sums, where
 * fewer points lie there). Returns the screened RSS per candidate
 * (NaN where the column is numerically dependent) and a cutoff: the least plus a margin
 * (1e-6·RSS_base) far above the rounding of these sums, so the dense fit of every
 * candidate that could be the least is still made. null when the base design is
 * singular (then every candidate is fitted densely). Cost O(n·p² + m·(p + log n)).
 */
export function screenCandidates(x: readonly number[], y: readonly number[], base: readonly number[], xMean: number, candidates: readonly number[]): { rss: Doubles; cutoff: number } | null {
  const knots = [...base].sort((a, b) => a - b);
  const n = x.length;
  const p = 2 + knots.length;
  if (n <= p) return null;
  // Orthonormal basis of [1, u, (x − k)₊ …], column by column.
  const q: Doubles[] = [];
  for (let j = 0; j < p; j++) {
    const v = zeros(n);
    for (let i = 0; i < n; i++) v[i] = j === 0 ? 1 : j === 1 ? x[i] - xMean : Math.max(0, x[i] - knots[j - 2]);
    let original = 0;
    for (let i = 0; i < n; i++) original += v[i] * v[i];
    for (let pass = 0; pass < 2; pass++) {
      for (const w of q) {
        let d = 0;
        for (let i = 0; i < n; i++) d += w[i] * v[i];
        for (let i = 0; i < n; i++) v[i] -= d * w[i];
      }
    }
    let norm = 0;
    for (let i = 0; i < n; i++) norm += v[i] * v[i];
    // The same relative bound as leastSquares: a column this dependent makes the base singular.
    if (!(norm > 1e-12 * Math.max(original, 1))) return null;
    norm = Math.sqrt(norm);
    for (let i = 0; i < n; i++) v[i] /= norm;
    q.push(v);
  }
  const e = y.slice();
  for (let pass = 0; pass < 2; pass++) {
    for (const w of q) {
      let d = 0;
      for (let i = 0; i < n; i++) d += w[i] * e[i];
      for (let i = 0; i < n; i++) e[i] -= d * w[i];
    }
  }
  let rssBase = 0;
  for (let i = 0; i < n; i++) rssBase += e[i] * e[i];
  // Running sums, row i: [1, u, u², e, u·e, q_0, q_0·u, …] over the points from i to the
  // end (suffix, row n = 0) and over the points before i (prefix, row 0 = 0).
  const width = 5 + 2 * p;
  const suffix = zeros((n + 1) * width);
  const prefix = zeros((n + 1) * width);
  const accumulate = (table: Doubles, row: number, from: number, i: number): void => {
    const u = x[i] - xMean;
    table[row] = table[from] + 1;
    table[row + 1] = table[from + 1] + u;
    table[row + 2] = table[from + 2] + u * u;
    table[row + 3] = table[from + 3] + e[i];
    table[row + 4] = table[from + 4] + u * e[i];
    for (let j = 0; j < p; j++) {
      table[row + 5 + 2 * j] = table[from + 5 + 2 * j] + q[j][i];
      table[row + 6 + 2 * j] = table[from + 6 + 2 * j] + q[j][i] * u;
    }
  };
  for (let i = n - 1; i >= 0; i--) accumulate(suffix, i * width, (i + 1) * width, i);
  for (let i = 0; i < n; i++) accumulate(prefix, (i + 1) * width, i * width, i);
  const rss = zeros(candidates.length);
  let least = Infinity;
  for (let m = 0; m < candidates.length; m++) {
    const c = candidates[m] - xMean;
    const split = firstIndex(x, (v) => v > candidates[m]);
    // (u − c)₊ = (u − c) + (c − u)₊ and u − c lies in the base, so the hinge may be taken
    // on either side of c with the same residualised column: take the side with fewer
    // points, where the running sums cancel least. sign·(u − c) is the hinge there.
    const right = n - split <= split;
    const t = right ? suffix : prefix;
    const row = split * width;
    const sign = right ? 1 : -1;
    const s1 = t[row];
    const su = t[row + 1];
    const gg = t[row + 2] - 2 * c * su + c * c * s1;
    const ge = sign * (t[row + 4] - c * t[row + 3]);
    let projected = 0;
    for (let j = 0; j < p; j++) {
      const sj = t[row + 6 + 2 * j] - c * t[row + 5 + 2 * j];
      projected += sj * sj;
    }
    const qq = gg - projected;
    if (!(qq > 1e-12 * Math.max(gg, 1))) {
      rss[m] = NaN;
      continue;
    }
    rss[m] = Math.max(0, rssBase - (ge * ge) / qq);
    if (rss[m] < least) least = rss[m];
  }
  return { rss, cutoff: least + 1e-6 * rssBase + 1e-12 };
}

function refine(x: readonly number[], y: readonly number[], current: HingeFit, xMean: number, minSeg: number): HingeFit {
  let fit = current;
  for (let sweep = 0; sweep < 2; sweep++) {
    for (let k = 0; k < fit.knots.length; k++) {
      const moved = bestWith(x, y, fit.knots, xMean, minSeg, k);
      if (moved && moved.fit.rss < fit.fit.rss - 1e-12) fit = moved;
    }
  }
  return fit;
}

/**
 * Finds where the refractor velocity changes along the line from T− (ms) at positions xM (m).
 * null entries (no T− at that geophone) are skipped. The sign of T− does not matter
 * (either shot may be the forward one). Throws StructureInputError on malformed input.
 */
export function findRefractorVelocityChanges(xM: number[], minusTimeMs: (number | null)[], opts: VelocityChangeOptions): VelocityChangeResult {
  checkPositions(xM);
  checkValues(minusTimeMs, xM.length, 'minusTimeMs');
  if (!opts || typeof opts !== 'object') throw new StructureInputError('opts', 'must be an object with pickSigmaMs');
  checkPositive(opts.pickSigmaMs, 'opts.pickSigmaMs');
  const minSeg = opts.minSegmentPoints ?? 4;
  if (!Number.isInteger(minSeg) || minSeg < 2) throw new StructureInputError('opts.minSegmentPoints', `must be an integer ≥ 2, got ${String(minSeg)}`);
  const minRelativeChange = opts.minRelativeChange ?? 0.05;

  const { x, y } = presentPoints(xM, minusTimeMs);
  const stated = Math.SQRT2 * opts.pickSigmaMs;
  const robust = robustNoiseSigma(x, y);
  const sigma = Math.max(stated, robust ?? 0);
  if (x.length < 2) return { segments: [], changes: [], noiseSigmaMs: sigma };
  const n = x.length;
  const xMean = x.reduce((s, v) => s + v, 0) / n;
  const alpha = opts.falseAlarmProbability ?? 0.01;
  if (!(alpha > 0 && alpha < 1)) throw new StructureInputError('opts.falseAlarmProbability', `must lie in (0, 1), got ${String(alpha)}`);
  const candidateCount = Math.max(1, candidatePositions(x, [], minSeg).length);
  const zBonferroni = normalQuantile(1 - alpha / (2 * candidateCount));
  const penalty = opts.penalty ?? zBonferroni * zBonferroni;
  const zMin = opts.zMin ?? zBonferroni;

  let current = hingeFit(x, y, [], xMean);
  if (!current) return { segments: [], changes: [], noiseSigmaMs: sigma };

  // Forward stage: add hinges while the penalised likelihood improves.
  for (;;) {
    const next = bestWith(x, y, current.knots, xMean, minSeg);
    if (!next) break;
    const refined = refine(x, y, next, xMean, minSeg);
    if ((current.fit.rss - refined.fit.rss) / (sigma * sigma) <= penalty) break;
    current = refined;
  }

  // Backward stage: drop the weakest hinge until every change is significant and large enough.
  for (;;) {
    const k = current.knots.length;
    let weakest = -1;
    let weakestZ = Infinity;
    for (let j = 0; j < k; j++) {
      const sl = slopeOf(current, j, sigma);
      const sr = slopeOf(current, j + 1, sigma);
      const z = ratioZ(current, j, sigma);
      const relative = Math.abs(Math.abs(sl.slope) - Math.abs(sr.slope)) / Math.min(Math.abs(sl.slope), Math.abs(sr.slope));
      const fails = !(z >= zMin) || !(relative >= minRelativeChange) || sl.slope * sr.slope <= 0;
      if (fails && z < weakestZ) {
        weakestZ = z;
        weakest = j;
      }
      if (fails && weakest === -1) weakest = j;
    }
    if (weakest < 0) break;
    const remaining: number[] = current.knots.filter((_, i) => i !== weakest);
    const refit = hingeFit(x, y, remaining, xMean);
    if (!refit) break;
    current = remaining.length ? refine(x, y, refit, xMean, minSeg) : refit;
  }

  const edges = [x[0], ...current.knots, x[n - 1]];
  const segments: VelocitySegment[] = [];
  for (let j = 0; j <= current.knots.length; j++) {
    const { slope, se } = slopeOf(current, j, sigma);
    const velocity = 2000 / Math.abs(slope);
    segments.push({ from: edges[j], to: edges[j + 1], velocity, standardError: (velocity * se) / Math.abs(slope) });
  }
  const changes = current.knots.map((knot, j) => ({
    x: knot,
    left: segments[j].velocity,
    right: segments[j + 1].velocity,
    zScore: ratioZ(current, j, sigma),
  }));
  return { segments, changes, noiseSigmaMs: sigma };
}

function slopeOf(h: HingeFit, segment: number, sigma: number): { slope: number; se: number } {
  const a = slopeCombination(segment, h.knots.length);
  const slope = a.reduce((s, ai, i) => s + ai * h.fit.coefficients[i], 0);
  const se = sigma * Math.sqrt(combinationVariance(h.fit.unscaledCovariance, a));
  return { slope, se };
}

/** Wald statistic for ln(V_right/V_left) = ln(s_left/s_right), by the delta method. */
function ratioZ(h: HingeFit, knot: number, sigma: number): number {
  const k = h.knots.length;
  const aL = slopeCombination(knot, k);
  const aR = slopeCombination(knot + 1, k);
  const sL = aL.reduce((s, ai, i) => s + ai * h.fit.coefficients[i], 0);
  const sR = aR.reduce((s, ai, i) => s + ai * h.fit.coefficients[i], 0);
  if (sL * sR <= 0) return 0;
  // Gradient of ln|sL| − ln|sR| with respect to the coefficients.
  const g = aL.map((ai, i) => ai / sL - aR[i] / sR);
  const se = sigma * Math.sqrt(combinationVariance(h.fit.unscaledCovariance, g));
  return Math.abs(Math.log(Math.abs(sL / sR))) / se;
}
