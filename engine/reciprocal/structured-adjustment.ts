/**
 * The reciprocal-time adjustment of reciprocal-adjustment.ts solved through the structure of
 * its normal matrix instead of a dense k×k factorisation. Same least-squares problem, same
 * normal equations, same shifts and variances (diagonal of the inverse); only the order of
 * the arithmetic differs (compared with the dense route to 1e-9 relative in
 * tests/engine/reciprocal-adjustment.test.ts).
 *
 * Structure. At geophone i the pairs present fall into classes of equal pick variance v_c
 * (a pair of two own picks has σ_F² + σ_R²; phantom legs have their own values), so the
 * weight of two pairs a, b there, 1/(v_a + v_b), depends only on their classes. The
 * geophone's part of N, the weighted Laplacian Σ_{a<b} w_ab (e_a − e_b)(e_a − e_b)ᵀ, is then
 *   diag(Σ_d n_d·w_{c(a)d}) − U_i·Ω_i·U_iᵀ,
 * with U_i the 0/1 membership columns of the classes, n_d their sizes and Ω_i the class
 * weight matrix 1/(v_c + v_d) (a Cauchy matrix: positive definite for distinct positive
 * v_c; Schechter 1959, Cauchy's determinant). Geophones whose classes have exactly the same
 * members share one set of columns (their Ω add), and the members change only where a shot
 * or a branch end is crossed, so the whole matrix is
 *   N = Δ − U·Ω·Uᵀ = Δ − V·Vᵀ,  V = U·L_Ω (L_Ω the Cholesky factor of Ω, block by block),
 * Δ diagonal (the prior 1/var(tAB) plus the diagonal above), U k×R with R the number of
 * distinct class columns. By the Sherman–Morrison–Woodbury identity (Golub & Van Loan,
 * Matrix Computations, 4th ed., 2013, §2.1.4)
 *   N⁻¹ = Δ⁻¹ + Δ⁻¹·V·C⁻¹·Vᵀ·Δ⁻¹,  C = I − Vᵀ·Δ⁻¹·V  (R×R, positive definite because N is:
 *   both are Schur complements of [[Δ, V], [Vᵀ, I]]; Haynsworth inertia additivity),
 * so with Y = L_Ω·C⁻¹·L_Ωᵀ the shifts are s = Δ⁻¹b + Δ⁻¹·U·Y·Uᵀ·Δ⁻¹b and the variances
 * (N⁻¹)_pp = 1/Δ_p + (u_pᵀ·Y·u_p)/Δ_p², u_p the columns holding pair p.
 *
 * Cost: O(Σ_i k_i·R_i) to build Δ, b and the classes (k_i pairs and R_i classes at geophone
 * i), O(Σ_p n_p²) for Uᵀ·Δ⁻¹·U and the variances (n_p columns holding pair p, n_p ≤ R),
 * R³/6 for the factor of C and R³/3 for its inverse: O(R³ + Σ_p n_p²) against k³/3 for the
 * dense route. On a full line R is a few times the number of shots and k ≈ shots²/2
 * (96 geophones × 64 shots: k = 1494, R ≈ 250).
 */
import type { AdjustablePair } from './reciprocal-adjustment.js';
import { zeros, type Doubles } from '../shared/zeros.js';
import { factorInPlace, lowerInverse } from '../shared/dense-cholesky.js';

/** Two pick variances within this many times the T+ variance are one class (the rounding of v − var(tAB): 16 ulps). */
const ROUNDING_TOLERANCE = 16 * Number.EPSILON;

/** The shifts and the diagonal of N⁻¹, or the reason the structured route does not serve. */
export type StructuredResult = { shifts: Doubles; inverseDiagonal: Doubles } | 'no-overlap' | 'not-positive-definite';

/** Planned structured solve: what is known after one pass over the geophones. */
export interface StructuredPlan {
  /** Columns R (class columns after merging geophones of equal membership). */
  columns: number;
  /** Σ_p n_p²: the cost of Uᵀ·Δ⁻¹·U and of the variances. */
  pairColumnWork: number;
  /** Σ_i k_i²: the cost of building the dense normal matrix. */
  denseBuildWork: number;
  /** Run the structured solve (or report why it cannot). */
  solve(): StructuredResult;
}

/**
 * One pass over the geophones: Δ, b, the classes and their merged columns. Cost
 * O(Σ_i k_i·R_i + Σ_p n_p); the solve is deferred so that the caller can compare costs.
 */
export function planStructuredAdjustment(pairWork: readonly AdjustablePair[]): StructuredPlan {
  const k = pairWork.length;
  const delta = zeros(k);
  const rhs = zeros(k);
  for (let m = 0; m < k; m++) delta[m] = 1 / Math.max(pairWork[m].reciprocalVarianceMs2, 1e-6);
  const geophones = pairWork.reduce((g, p) => Math.max(g, p.plusTimeMs.length), 0);
  const at = zeros(k);
  const time = zeros(k);
  const variance = zeros(k);
  const plusVariance = zeros(k);
  const classOf = zeros(k);
  let classVariance: number[] = [];
  let denseBuildWork = 0;
  let overlaps = 0;
  // Column groups: one per distinct membership; members[g][c] = pairs of class c; omega[g] = Σ Ω_i.
  const groupMembers: number[][][] = [];
  const groupOmega: Doubles[] = [];
  const groupByKey = new Map<string, number>();
  let previousAt: Doubles = zeros(0);
  let previousClassOf: Doubles = zeros(0);
  let previousGroup = -1;
  for (let i = 0; i < geophones; i++) {
    let count = 0;
    for (let m = 0; m < k; m++) {
      const p = pairWork[m];
      const t = p.plusTimeMs[i];
      const v = p.plusVarianceMs2[i];
      if (t !== t || v !== v || t === undefined || v === undefined) continue; // NaN: none (shared/nan-none.ts)
      at[count] = m;
      time[count] = t;
      variance[count] = Math.max(v - p.reciprocalVarianceMs2, 1e-6);
      plusVariance[count] = Math.abs(v);
      count++;
    }
    if (count < 2) continue; // one pair alone adds nothing to N
    overlaps++;
    denseBuildWork += count * count;
    // Classes of equal variance, numbered by first appearance (pairs in index order). O(k_i·R_i).
    // Equal means equal up to the rounding of v − var(tAB) (a few ulps of v): the pick
    // variance of a pair is recovered by that subtraction, so pairs of the same pick
    // variance can differ in the last bits. The class keeps its first member's value; the
    // weights change by at most ~1e-14 relative, far below the 1e-9 agreement with the
    // dense route.
    classVariance = [];
    const classScale: number[] = []; // the first member's T+ variance (the rounding's scale)
    for (let a = 0; a < count; a++) {
      let c = 0;
      while (c < classVariance.length && !(Math.abs(classVariance[c] - variance[a]) <= ROUNDING_TOLERANCE * Math.max(plusVariance[a], classScale[c]))) c++;
      if (c === classVariance.length) {
        classVariance.push(variance[a]);
        classScale.push(plusVariance[a]);
      }
      classOf[a] = c;
    }
    const r = classVariance.length;
    const sizes = zeros(r);
    const sums = zeros(r);
    const t0 = time[0]; // T+ relative to one pair's: b is unchanged, and cancellation smaller
    for (let a = 0; a < count; a++) {
      sizes[classOf[a]]++;
      sums[classOf[a]] += time[a] - t0;
    }
    // Per class c: S_c = Σ_d n_d·w_cd (diagonal part) and Σ_d w_cd·T_d (right-hand side). O(R_i²).
    const rowWeight = zeros(r);
    const rowSum = zeros(r);
    for (let c = 0; c < r; c++) {
      for (let d = 0; d < r; d++) {
        const w = 1 / (classVariance[c] + classVariance[d]);
        rowWeight[c] += sizes[d] * w;
        rowSum[c] += w * sums[d];
      }
    }
    // b_a = Σ_{n≠a} w_an (t_a − t_n) = (t_a − t0)·S_c − Σ_d w_cd·T_d (the self term cancels).
    for (let a = 0; a < count; a++) {
      const c = classOf[a];
      delta[at[a]] += rowWeight[c];
      rhs[at[a]] += (time[a] - t0) * rowWeight[c] - rowSum[c];
    }
    // The geophone's column group: the previous geophone's when the membership is the same
    // (the usual case, O(k_i) to check), else by key.
    let group = -1;
    if (previousGroup >= 0 && previousAt.length === count) {
      let same = true;
      for (let a = 0; a < count && same; a++) same = previousAt[a] === at[a] && previousClassOf[a] === classOf[a];
      if (same) group = previousGroup;
    }
    if (group < 0) {
      let key = '';
      for (let a = 0; a < count; a++) key += `${at[a]}:${classOf[a]},`;
      group = groupByKey.get(key) ?? -1;
      if (group < 0) {
        group = groupMembers.length;
        groupByKey.set(key, group);
        const members: number[][] = Array.from({ length: r }, () => []);
        for (let a = 0; a < count; a++) members[classOf[a]].push(at[a]);
        groupMembers.push(members);
        groupOmega.push(zeros(r * r));
      }
      previousAt = at.slice(0, count);
      previousClassOf = classOf.slice(0, count);
      previousGroup = group;
    }
    const omega = groupOmega[group];
    for (let c = 0; c < r; c++) for (let d = 0; d < r; d++) omega[c * r + d] += 1 / (classVariance[c] + classVariance[d]);
  }
  // Columns: group g's classes at offset[g] …; per pair the columns holding it (ascending).
  const offset: number[] = [];
  let columns = 0;
  for (const members of groupMembers) {
    offset.push(columns);
    columns += members.length;
  }
  const pairColumns: number[][] = Array.from({ length: k }, () => []);
  groupMembers.forEach((members, g) => members.forEach((list, c) => list.forEach((m) => pairColumns[m].push(offset[g] + c))));
  const pairColumnWork = pairColumns.reduce((s, cols) => s + cols.length * cols.length, 0);
  return {
    columns,
    pairColumnWork,
    denseBuildWork,
    solve: () => (overlaps === 0 ? 'no-overlap' : solveStructured(delta, rhs, groupOmega, groupMembers, offset, pairColumns, columns)),
  };
}

/**
 * M ← Lᵀ·M·L (lowerFromRight) or L·M·Lᵀ for L block-diagonal (blocks `factors` at `offset`), M dense R×R row-major, in
 * place. Cost O(R·Σ_g R_g²).
 */
function congruenceByBlocks(mat: Doubles, size: number, factors: Doubles[], offset: number[], lowerFromRight: boolean): void {
  const column = zeros(size);
  factors.forEach((l, g) => {
    const r = Math.sqrt(l.length);
    const o = offset[g];
    // Right multiplication of every row by the block: row[o..o+r) ← row[o..o+r)·X.
    for (let row = 0; row < size; row++) {
      const base = row * size + o;
      for (let j = 0; j < r; j++) {
        let s = 0;
        // lowerFromRight: Lᵀ·M·L (right factor L: Σ_{c≥j} m_c·L_cj); else L·M·Lᵀ (right factor Lᵀ: Σ_{c≤j} m_c·L_jc).
        if (lowerFromRight) for (let c = j; c < r; c++) s += mat[base + c] * l[c * r + j];
        else for (let c = 0; c <= j; c++) s += mat[base + c] * l[j * r + c];
        column[j] = s;
      }
      for (let j = 0; j < r; j++) mat[base + j] = column[j];
    }
    // Left multiplication of every column by the block's transpose: col[o..o+r) ← Xᵀ·col.
    for (let col = 0; col < size; col++) {
      for (let j = 0; j < r; j++) {
        let s = 0;
        if (lowerFromRight) for (let c = j; c < r; c++) s += l[c * r + j] * mat[(o + c) * size + col];
        else for (let c = 0; c <= j; c++) s += l[j * r + c] * mat[(o + c) * size + col];
        column[j] = s;
      }
      for (let j = 0; j < r; j++) mat[(o + j) * size + col] = column[j];
    }
  });
}

function solveStructured(
  delta: Doubles,
  rhs: Doubles,
  omegas: Doubles[],
  groupMembers: number[][][],
  offset: number[],
  pairColumns: number[][],
  size: number,
): StructuredResult {
  const k = delta.length;
  // L_Ω per group (Cauchy blocks, R_g ≤ the number of distinct variances): O(Σ R_g³).
  const factors = omegas.map((o) => o.slice());
  for (let g = 0; g < factors.length; g++) if (!factorInPlace(factors[g], groupMembers[g].length)) return 'not-positive-definite';
  // Uᵀ·Δ⁻¹·U: O(Σ_p n_p²).
  const c = zeros(size * size);
  for (let p = 0; p < k; p++) {
    const cols = pairColumns[p];
    const w = 1 / delta[p];
    for (let a = 0; a < cols.length; a++) {
      const row = cols[a] * size;
      for (let b = 0; b < cols.length; b++) c[row + cols[b]] += w;
    }
  }
  // C = I − L_Ωᵀ·(Uᵀ·Δ⁻¹·U)·L_Ω.
  congruenceByBlocks(c, size, factors, offset, true);
  for (let a = 0; a < size * size; a++) c[a] = -c[a];
  for (let a = 0; a < size; a++) c[a * size + a] += 1;
  // Cholesky of C (R³/6), then C⁻¹ = L_C⁻ᵀ·L_C⁻¹ (R³/3).
  if (!factorInPlace(c, size)) return 'not-positive-definite';
  const inverse = lowerInverse(c, size);
  const cInverse = zeros(size * size);
  for (let a = 0; a < size; a++) {
    for (let b = 0; b <= a; b++) {
      let s = 0;
      for (let j = a; j < size; j++) s += inverse[j * size + a] * inverse[j * size + b];
      cInverse[a * size + b] = s;
      cInverse[b * size + a] = s;
    }
  }
  // Y = L_Ω·C⁻¹·L_Ωᵀ.
  congruenceByBlocks(cInverse, size, factors, offset, false);
  const y = cInverse;
  // Shifts: s = Δ⁻¹b + Δ⁻¹·U·Y·Uᵀ·Δ⁻¹b. O(Σ_p n_p + R²).
  const z = zeros(size);
  const base = zeros(k);
  for (let p = 0; p < k; p++) {
    base[p] = rhs[p] / delta[p];
    for (const col of pairColumns[p]) z[col] += base[p];
  }
  const yz = zeros(size);
  for (let a = 0; a < size; a++) {
    let s = 0;
    for (let b = 0; b < size; b++) s += y[a * size + b] * z[b];
    yz[a] = s;
  }
  const shifts = zeros(k);
  const inverseDiagonal = zeros(k);
  for (let p = 0; p < k; p++) {
    const cols = pairColumns[p];
    let s = 0;
    let q = 0;
    for (let a = 0; a < cols.length; a++) {
      s += yz[cols[a]];
      const row = cols[a] * size;
      for (let b = 0; b < cols.length; b++) q += y[row + cols[b]];
    }
    shifts[p] = base[p] + s / delta[p];
    inverseDiagonal[p] = 1 / delta[p] + q / (delta[p] * delta[p]);
  }
  return { shifts, inverseDiagonal };
}


