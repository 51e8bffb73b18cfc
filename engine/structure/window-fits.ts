/**
 * Least-squares fits over a window x[lo..hi−1] of a sorted profile at the cost of their
 * arithmetic, for the scans of jump-scan.ts: a straight line, the line plus one more
 * column (a ramp template, a step), and the best continuous hinge over every position
 * in the window by running sums. Each gives the same coefficients, variances and RSS as
 * the normal equations of least-squares.ts (tests/engine/structure/window-fits.test.ts
 * checks them against it to 1e-9 relative) without building a matrix or allocating.
 * Units are those of the caller (x in m, y in ms or m).
 */

/**
 * A relative pivot this small means the columns are (numerically) dependent; the same
 * bound as leastSquares (least-squares.ts), so the same fits are refused.
 */
export const SINGULAR_RELATIVE = 1e-12;

/**
 * Straight line y ≈ a + b·u over the window x[lo..hi−1], u = x − origin, kept in centred
 * form (ū, ȳ, Sxx = Σ(u − ū)², slope b = Sxy/Sxx, RSS from the residuals themselves).
 * One object per scan, overwritten by every fit: no allocation per candidate.
 */
export interface WindowLine {
  n: number;
  uMean: number;
  yMean: number;
  sxx: number;
  slope: number;
  rss: number;
  /** Σu² about the origin (not centred): the diagonal entry leastSquares scales its pivot test by. */
  sumU2: number;
}

/** Fits the window's line in two passes; false when it has fewer than 3 points or one x. Cost O(m) for m = hi − lo points. */
export function fitWindowLine(x: readonly number[], y: readonly number[], lo: number, hi: number, origin: number, out: WindowLine): boolean {
  const n = hi - lo;
  if (n < 3) return false;
  let su = 0;
  let sy = 0;
  for (let i = lo; i < hi; i++) {
    su += x[i] - origin;
    sy += y[i];
  }
  const uMean = su / n;
  const yMean = sy / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = lo; i < hi; i++) {
    const du = x[i] - origin - uMean;
    sxx += du * du;
    sxy += du * (y[i] - yMean);
  }
  if (!(sxx > 0)) return false;
  const slope = sxy / sxx;
  let rss = 0;
  for (let i = lo; i < hi; i++) {
    const e = y[i] - yMean - slope * (x[i] - origin - uMean);
    rss += e * e;
  }
  out.n = n;
  out.uMean = uMean;
  out.yMean = yMean;
  out.sxx = sxx;
  out.slope = slope;
  out.rss = rss;
  out.sumU2 = sxx + n * uMean * uMean;
  return true;
}

/**
 * Adds one column g (values in `column[0..m−1]` for the window's points) to the window's
 * line: y ≈ a + b·u + γ·g. By the Frisch–Waugh–Lovell theorem (Frisch & Waugh,
 * Econometrica 1, 1933; Lovell, JASA 58, 1963) γ = ⟨g̃, e⟩/⟨g̃, g̃⟩, its unscaled variance
 * 1/⟨g̃, g̃⟩ and RSS = RSS_line − ⟨g̃, e⟩²/⟨g̃, g̃⟩, where e are the line's residuals and g̃
 * is g with the line fitted to it removed: the same numbers as the 3-column normal
 * equations, without building them. Writes {rss, coefficient, unscaledVariance} into
 * `out`; false when g is (numerically) a line over the window. Cost O(m).
 */
export function addColumn(x: readonly number[], y: readonly number[], lo: number, origin: number, line: WindowLine, column: Float64Array, out: ColumnFit): boolean {
  const n = line.n;
  let gMean = 0;
  let sumG2 = 0;
  for (let j = 0; j < n; j++) {
    gMean += column[j];
    sumG2 += column[j] * column[j];
  }
  gMean /= n;
  let sxg = 0;
  for (let j = 0; j < n; j++) sxg += (x[lo + j] - origin - line.uMean) * (column[j] - gMean);
  const beta = sxg / line.sxx;
  let q = 0;
  let p = 0;
  for (let j = 0; j < n; j++) {
    const du = x[lo + j] - origin - line.uMean;
    const gt = column[j] - gMean - beta * du;
    const e = y[lo + j] - line.yMean - line.slope * du;
    q += gt * gt;
    p += gt * e;
  }
  if (!(q > SINGULAR_RELATIVE * Math.max(n, line.sumU2, sumG2))) return false;
  out.rss = Math.max(0, line.rss - (p * p) / q);
  out.coefficient = p / q;
  out.unscaledVariance = 1 / q;
  return true;
}

/**
 * fitWindowLine in one pass instead of three. y is measured from the window's chord (the
 * line through its end points) before summing: the fit is unchanged by subtracting a line,
 * and the sums are then of residual-sized numbers, so the RSS keeps its precision (sums of
 * raw values would cancel). With the sums Σu, Σu², Σv, Σuv, Σv² (v = y − chord):
 *   Sxx = Σu² − (Σu)²/n,  b = (Σuv − ΣuΣv/n)/Sxx,  RSS = Σv² − (Σv)²/n − b·(Σuv − ΣuΣv/n).
 * Same refusals as fitWindowLine. Cost O(m), no allocation.
 */
export function fitWindowLineOnePass(x: readonly number[], y: readonly number[], lo: number, hi: number, origin: number, out: WindowLine): boolean {
  const n = hi - lo;
  if (n < 3) return false;
  const x0 = x[lo] - origin;
  const span = x[hi - 1] - x[lo];
  if (!(span > 0)) return false;
  const chordSlope = (y[hi - 1] - y[lo]) / span;
  const y0 = y[lo];
  let su = 0;
  let suu = 0;
  let sv = 0;
  let suv = 0;
  let svv = 0;
  for (let i = lo; i < hi; i++) {
    const u = x[i] - origin;
    const v = y[i] - y0 - chordSlope * (u - x0);
    su += u;
    suu += u * u;
    sv += v;
    suv += u * v;
    svv += v * v;
  }
  const uMean = su / n;
  const vMean = sv / n;
  const sxx = suu - su * uMean;
  if (!(sxx > 0)) return false;
  const sxv = suv - su * vMean;
  const vSlope = sxv / sxx;
  out.n = n;
  out.uMean = uMean;
  out.yMean = y0 + chordSlope * (uMean - x0) + vMean;
  out.sxx = sxx;
  out.slope = chordSlope + vSlope;
  out.rss = Math.max(0, svv - sv * vMean - vSlope * sxv);
  out.sumU2 = suu;
  return true;
}

/**
 * addColumn in one pass instead of three, the column read from column[i − columnStart]:
 * with ũ = u − ū and the line's residuals e (orthogonal to 1 and ũ),
 *   ⟨g̃, g̃⟩ = Σg² − (Σg)²/n − (Σgũ)²/Sxx,  ⟨g̃, e⟩ = Σg·e.
 * Same refusal as addColumn. Cost O(m), no allocation.
 */
export function addColumnOnePass(x: readonly number[], y: readonly number[], lo: number, origin: number, line: WindowLine, column: Float64Array, columnStart: number, out: ColumnFit): boolean {
  const n = line.n;
  let sg = 0;
  let sgg = 0;
  let sgu = 0;
  let sge = 0;
  for (let i = lo; i < lo + n; i++) {
    const du = x[i] - origin - line.uMean;
    const e = y[i] - line.yMean - line.slope * du;
    const g = column[i - columnStart];
    sg += g;
    sgg += g * g;
    sgu += g * du;
    sge += g * e;
  }
  const q = sgg - sg * (sg / n) - (sgu * sgu) / line.sxx;
  if (!(q > SINGULAR_RELATIVE * Math.max(n, line.sumU2, sgg))) return false;
  out.rss = Math.max(0, line.rss - (sge * sge) / q);
  out.coefficient = sge / q;
  out.unscaledVariance = 1 / q;
  return true;
}

export interface ColumnFit {
  rss: number;
  coefficient: number;
  unscaledVariance: number;
}

/**
 * Least RSS of the kink model y ≈ a + b·u + d·(u − h)₊ over every hinge h the scan tries
 * (each point u_k of the window and each midpoint ½(u_k + u_(k+1))), Infinity if none can
 * be fitted. For a hinge between u_k and u_(k+1) the column g = (u − h)₊ is nonzero on the
 * points after k only, so with running sums over those points (count N, Σũ, Σũ², Σe, Σũe,
 * ũ = u − ū) the Frisch–Waugh–Lovell reduction of addColumn costs O(1) per hinge:
 *   Σg = Σũ − h̃N, Σg² = Σũ² − 2h̃Σũ + h̃²N, Σũg = Σũ² − h̃Σũ, Σg·e = Σũe − h̃Σe  (h̃ = h − ū),
 *   ⟨g̃, g̃⟩ = Σg² − (Σg)²/n − (Σũg)²/Sxx.
 * Cost O(m) for the window, no allocation.
 */
export function bestKinkRss(x: readonly number[], y: readonly number[], lo: number, hi: number, origin: number, line: WindowLine): number {
  const n = line.n;
  let count = 0;
  let su = 0;
  let su2 = 0;
  let se = 0;
  let sue = 0;
  let best = Infinity;
  for (let k = hi - 1; k >= lo; k--) {
    const uk = x[k] - origin;
    if (k < hi - 1) {
      const un = x[k + 1] - origin;
      for (let pass = 0; pass < 2; pass++) {
        const h = (pass === 0 ? uk : 0.5 * (uk + un)) - line.uMean;
        const sg = su - h * count;
        const sg2 = su2 - 2 * h * su + h * h * count;
        const sug = su2 - h * su;
        const sge = sue - h * se;
        const q = sg2 - (sg * sg) / n - (sug * sug) / line.sxx;
        // Σg² about the origin equals sg2: g does not depend on where u is measured from.
        if (!(q > SINGULAR_RELATIVE * Math.max(n, line.sumU2, sg2))) continue;
        const rss = Math.max(0, line.rss - (sge * sge) / q);
        if (rss < best) best = rss;
      }
    }
    const du = uk - line.uMean;
    const e = y[k] - line.yMean - line.slope * du;
    count++;
    su += du;
    su2 += du * du;
    se += e;
    sue += du * e;
  }
  return best;
}

/**
 * First index with |x_i − c| ≤ reach (x increasing); binary search over x[from..to−1]
 * (default all of x; a caller that knows the window lies within a range searches only
 * that), O(log(to − from)).
 */
export function windowStart(x: readonly number[], c: number, reach: number, from = 0, to = x.length): number {
  let a = from;
  let b = to;
  while (a < b) {
    const mid = (a + b) >> 1;
    if (x[mid] < c && c - x[mid] > reach) a = mid + 1;
    else b = mid;
  }
  return a;
}

/** One past the last index with |x_i − c| ≤ reach; binary search over x[from..to−1], O(log(to − from)). */
export function windowEnd(x: readonly number[], c: number, reach: number, from = 0, to = x.length): number {
  let a = from;
  let b = to;
  while (a < b) {
    const mid = (a + b) >> 1;
    if (x[mid] > c && x[mid] - c > reach) b = mid;
    else a = mid + 1;
  }
  return a;
}
