/**
 * Time-term inversion of head-wave arrivals (Scheidegger & Willmore, Geophysics 22, 1957;
 * Willmore & Bancroft, Geophysical Journal 3, 1960): every head-wave pick of every shot is
 *   t = a_shot + a_geophone + Σ_k s_k·L_k,
 * a time term at each end of the ray and the refractor slowness s_k times the length L_k of
 * the shot–geophone distance within slowness segment k (one segment: constant slowness).
 * A shot within 1 mm of a geophone shares that geophone's time term (the usual tie); a shot
 * between geophones gets its own term, tied to the linear interpolation of its two
 * neighbours' terms by one more row of unit weight (our choice: the tie is trusted as one
 * pick is); a shot off the spread has a free term. The time term is the delay time, so the
 * depth below a geophone is a·V1/cos(ic) as in plus-minus (normalDepthFromDelayM).
 *
 * Solved as one least-squares problem through its normal equations, by their structure,
 * exactly and without forming them densely: every row holds at most one geophone term that
 * no shot shares (R), the rest (shot terms, the geophone terms shots share or are tied to,
 * the slownesses: S) are few. With N = [D B; Bᵀ C] (D diagonal over R), eliminating R
 * leaves the Schur complement Sc = C − BᵀD⁻¹B of size |S| (Golub & Van Loan, Matrix
 * Computations, 4th ed., 2013, §3.2.10 block elimination; §4.2 Cholesky), factorised once:
 *   x_S = Sc⁻¹(g_S − BᵀD⁻¹g_R),   x_R = D⁻¹(g_R − B·x_S),
 *   diag(N⁻¹)_R = 1/d_j + b_jᵀ·Sc⁻¹·b_j / d_j²,   diag(N⁻¹)_S = diag(Sc⁻¹),
 * b_j the row of B for geophone j. This gives the exact covariance of the time terms (an
 * iterative solver's estimate of it, LSQR's, was measured 67 % off on small random systems:
 * its Lanczos vectors lose orthogonality). Cost O(nnz + Σ_j |b_j|² + |S|³) for nnz entries,
 * i.e. linear in picks for a line of many geophones and tens of shots; memory O(nnz + |S|²).
 * Units: m, ms, m/s (slowness in ms/m).
 */
import { factorInPlace, inverseFromFactor } from '../shared/dense-cholesky.js';

/** One head-wave pick: shot index, geophone index, time (ms). */
export interface TimeTermObservation {
  shot: number;
  geophone: number;
  timeMs: number;
  /**
   * Where the ray runs from and to along the line, m, when its time terms are taken at other
   * positions than its shot's and geophone's (the refraction points, refraction-point-offset.ts);
   * default the geophone's and the shot's positions. Gives the slowness lengths.
   */
  spanM?: readonly [number, number];
}

export interface TimeTermInput {
  geophoneXsM: readonly number[];
  shotXsM: readonly number[];
  /** Head-wave arrivals on one refractor (picks at a shot's own position are left out). */
  observations: readonly TimeTermObservation[];
  /** Chainages where the refractor slowness may change, increasing; none: one slowness. */
  slownessBreaksM?: readonly number[];
  /** Pick uncertainty, ms: the floor of the noise the covariances are scaled by. */
  pickSigmaMs: number;
}

export interface TimeTermSegment {
  fromM: number;
  toM: number;
  velocityMPerS: number;
  /** One standard deviation of the velocity, m/s. */
  standardErrorMPerS: number;
}

export interface TimeTermSolution {
  ok: true;
  /** Time term (delay time) at each geophone, ms; null where no pick or tie reaches it. */
  geophoneTermMs: (number | null)[];
  /** One standard deviation of each geophone's time term, ms. */
  geophoneTermSigmaMs: (number | null)[];
  shotTermMs: number[];
  shotTermSigmaMs: number[];
  segments: TimeTermSegment[];
  /** pick − model for each observation, ms, in input order. */
  residualMs: number[];
  rmsMs: number;
  /** Noise the covariances are scaled by: the larger of the pick uncertainty and the residuals' own estimate RSS/(m − n), ms. */
  sigmaMs: number;
  count: number;
  unknowns: number;
}

export interface TimeTermFailure {
  ok: false;
  reason: string;
}

/** Relative pivot below which the reduced normal matrix is singular (unknowns not determined by the picks). */
const SINGULAR_RELATIVE = 1e-10;
/** A shot this close to a geophone shares its time term, m. */
const SAME_POSITION_M = 1e-3;

interface Entry {
  col: number;
  value: number;
}

/** The time terms and refractor slowness of a line's head-wave picks (see the file comment). */
export function invertTimeTerms(input: TimeTermInput): TimeTermSolution | TimeTermFailure {
  const { geophoneXsM: gx, shotXsM: sx } = input;
  const breaks = [...(input.slownessBreaksM ?? [])];
  const segmentCount = breaks.length + 1;
  const span = (o: TimeTermObservation): readonly [number, number] => o.spanM ?? [Math.min(gx[o.geophone], sx[o.shot]), Math.max(gx[o.geophone], sx[o.shot])];
  const observations = input.observations.filter((o) => span(o)[1] - span(o)[0] > SAME_POSITION_M && Number.isFinite(o.timeMs));
  if (observations.length === 0) return { ok: false, reason: 'no head-wave picks to invert' };

  // Columns: geophone terms (those a pick or a tie reaches), own shot terms, slownesses.
  const geophoneCol = new Int32Array(gx.length).fill(-1);
  let columns = 0;
  const useGeophone = (j: number): number => (geophoneCol[j] >= 0 ? geophoneCol[j] : (geophoneCol[j] = columns++));
  for (const o of observations) useGeophone(o.geophone);
  const order = gx.map((_, j) => j).sort((a, b) => gx[a] - gx[b]);
  const shotCol = new Int32Array(sx.length).fill(-1);
  const inS: boolean[] = [];
  const ties: Entry[][] = [];
  const shotsUsed = new Set(observations.map((o) => o.shot));
  for (const i of shotsUsed) {
    const at = order.find((j) => Math.abs(gx[j] - sx[i]) <= SAME_POSITION_M);
    if (at !== undefined) {
      shotCol[i] = useGeophone(at);
      inS[shotCol[i]] = true;
      continue;
    }
    shotCol[i] = columns++;
    inS[shotCol[i]] = true;
    const right = order.findIndex((j) => gx[j] > sx[i]);
    if (right > 0) {
      // Between geophones a and b: a_shot − (w_a·a_a + w_b·a_b) = 0.
      const a = order[right - 1];
      const b = order[right];
      const wb = (sx[i] - gx[a]) / (gx[b] - gx[a]);
      const ca = useGeophone(a);
      const cb = useGeophone(b);
      inS[ca] = true;
      inS[cb] = true;
      ties.push([{ col: shotCol[i], value: 1 }, { col: ca, value: -(1 - wb) }, { col: cb, value: -wb }]);
    }
  }
  const slownessCol = Array.from({ length: segmentCount }, () => columns++);
  for (const c of slownessCol) inS[c] = true;

  // Rows: observations, then ties (right-hand side 0).
  const rows: { entries: Entry[]; rhs: number }[] = observations.map((o) => {
    const entries: Entry[] = [{ col: shotCol[o.shot], value: 1 }];
    const gc = geophoneCol[o.geophone];
    if (gc === shotCol[o.shot]) entries[0].value += 1;
    else entries.push({ col: gc, value: 1 });
    const [lo, hi] = span(o);
    for (let k = 0; k < segmentCount; k++) {
      const from = k === 0 ? -Infinity : breaks[k - 1];
      const to = k === segmentCount - 1 ? Infinity : breaks[k];
      const length = Math.min(hi, to) - Math.max(lo, from);
      if (length > 0) entries.push({ col: slownessCol[k], value: length });
    }
    return { entries, rhs: o.timeMs };
  });
  for (const t of ties) rows.push({ entries: t, rhs: 0 });
  if (rows.length < columns) return { ok: false, reason: `${rows.length} equations for ${columns} unknowns: too few head-wave picks for time terms` };

  // S: index of every column in the dense block; R: the rest (diagonal block).
  const sIndex = new Int32Array(columns).fill(-1);
  let sSize = 0;
  for (let c = 0; c < columns; c++) if (inS[c]) sIndex[c] = sSize++;
  const d = new Float64Array(columns); // diagonal of N for R columns
  const bRows: Map<number, number>[] = Array.from({ length: columns }, () => new Map());
  const cDense = new Float64Array(sSize * sSize);
  const g = new Float64Array(columns);
  for (const row of rows) {
    const e = row.entries;
    for (let p = 0; p < e.length; p++) {
      g[e[p].col] += e[p].value * row.rhs;
      for (let q = 0; q < e.length; q++) {
        const v = e[p].value * e[q].value;
        const sp = sIndex[e[p].col];
        const sq = sIndex[e[q].col];
        if (sp >= 0 && sq >= 0) cDense[sp * sSize + sq] += v;
        else if (sp < 0 && sq < 0) d[e[p].col] += v; // the one R column of the row with itself
        else if (sp < 0) bRows[e[p].col].set(sq, (bRows[e[p].col].get(sq) ?? 0) + v);
      }
    }
  }
  // Schur complement and its right-hand side.
  const sc = cDense;
  const gs = new Float64Array(sSize);
  for (let c = 0; c < columns; c++) if (sIndex[c] >= 0) gs[sIndex[c]] = g[c];
  for (let c = 0; c < columns; c++) {
    if (sIndex[c] >= 0) continue;
    const b = [...bRows[c]];
    const inv = 1 / d[c];
    for (const [p, vp] of b) {
      gs[p] -= vp * inv * g[c];
      for (const [q, vq] of b) sc[p * sSize + q] -= vp * vq * inv;
    }
  }
  let largest = 0;
  for (let p = 0; p < sSize; p++) largest = Math.max(largest, Math.abs(sc[p * sSize + p]));
  if (!factorInPlace(sc, sSize, SINGULAR_RELATIVE * largest)) {
    return {
      ok: false,
      reason: 'the picks do not fix every time term: shot and geophone terms can trade against each other (no shot at or between geophones ties them); add a shot within the spread',
    };
  }
  const scInverse = inverseFromFactor(sc, sSize);
  const xs = new Float64Array(sSize);
  for (let p = 0; p < sSize; p++) {
    let s = 0;
    for (let q = 0; q < sSize; q++) s += scInverse[p * sSize + q] * gs[q];
    xs[p] = s;
  }
  const x = new Float64Array(columns);
  const inverseDiagonal = new Float64Array(columns);
  for (let c = 0; c < columns; c++) {
    if (sIndex[c] >= 0) {
      x[c] = xs[sIndex[c]];
      inverseDiagonal[c] = scInverse[sIndex[c] * (sSize + 1)];
      continue;
    }
    let bx = 0;
    let quadratic = 0;
    for (const [p, vp] of bRows[c]) {
      bx += vp * xs[p];
      for (const [q, vq] of bRows[c]) quadratic += vp * scInverse[p * sSize + q] * vq;
    }
    x[c] = (g[c] - bx) / d[c];
    inverseDiagonal[c] = 1 / d[c] + quadratic / (d[c] * d[c]);
  }

  // Residuals of every row (observations first, then ties); the RSS counts the ties too.
  const rowResidual = rows.map((row) => {
    let model = 0;
    for (const e of row.entries) model += e.value * x[e.col];
    return row.rhs - model;
  });
  const residualMs = rowResidual.slice(0, observations.length);
  const rss = rowResidual.reduce((sum, r) => sum + r * r, 0);
  const dof = rows.length - columns;
  const sigmaMs = Math.max(input.pickSigmaMs, dof > 0 ? Math.sqrt(rss / dof) : 0);
  const sd = (c: number): number => sigmaMs * Math.sqrt(Math.max(0, inverseDiagonal[c]));
  const rmsMs = Math.sqrt(residualMs.reduce((s, r) => s + r * r, 0) / residualMs.length);
  return {
    ok: true,
    geophoneTermMs: gx.map((_, j) => (geophoneCol[j] >= 0 ? x[geophoneCol[j]] : null)),
    geophoneTermSigmaMs: gx.map((_, j) => (geophoneCol[j] >= 0 ? sd(geophoneCol[j]) : null)),
    shotTermMs: sx.map((_, i) => (shotCol[i] >= 0 ? x[shotCol[i]] : NaN)),
    shotTermSigmaMs: sx.map((_, i) => (shotCol[i] >= 0 ? sd(shotCol[i]) : NaN)),
    segments: slownessCol.map((c, k) => {
      const s = x[c];
      // v = 1000/s (s in ms/m); σ_v = 1000·σ_s/s² (first order).
      return {
        fromM: k === 0 ? -Infinity : breaks[k - 1],
        toM: k === segmentCount - 1 ? Infinity : breaks[k],
        velocityMPerS: 1000 / s,
        standardErrorMPerS: (1000 * sd(c)) / (s * s),
      };
    }),
    residualMs,
    rmsMs,
    sigmaMs,
    count: observations.length,
    unknowns: columns,
  };
}
