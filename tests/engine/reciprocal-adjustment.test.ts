import { describe, expect, it } from 'vitest';
import { adjustReciprocalTimes, choleskyFactor, choleskyInverseDiagonal, choleskySolve, denseReciprocalAdjustment, normalEquations, reciprocalAdjustment, type AdjustablePair } from '../../engine/reciprocal/reciprocal-adjustment.js';
import { planStructuredAdjustment } from '../../engine/reciprocal/structured-adjustment.js';
import { gaussian, mulberry32 } from '../helpers/random.js';
import { fromNullable } from '../../engine/shared/nan-none.js';
import type { Doubles } from '../../engine/shared/zeros.js';

/**
 * The delay time at a geophone is the same whichever opposing pair measures it (Hagedoorn,
 * Geophysical Prospecting 7, 1959), so a pair whose reciprocal time is off by e shows T+
 * off by −e at every geophone: the adjustment must find e from the overlaps.
 */
const truePlusMs = [10, 10.4, 10.9, 11.5, 12.2, 12.8, 13.1, 13.3];

function pair(errorMs: number, covered: boolean[], readingVarianceMs2: number): AdjustablePair {
  const pickVariance = 0.125;
  return {
    plusTimeMs: fromNullable(truePlusMs.map((t, i) => (covered[i] ? t - errorMs : null))),
    plusVarianceMs2: fromNullable(truePlusMs.map((_, i) => (covered[i] ? pickVariance + readingVarianceMs2 : null))),
    reciprocalTimeMs: 50 + errorMs,
    reciprocalVarianceMs2: readingVarianceMs2,
  };
}

describe('adjustReciprocalTimes', () => {
  it('removes the reciprocal-time error of a poorly read pair through its overlap with a well-read one', () => {
    const wellRead = pair(0, truePlusMs.map(() => true), 0.07);
    const farExtrapolated = pair(4, truePlusMs.map((_, i) => i >= 3), 16);
    adjustReciprocalTimes([wellRead, farExtrapolated]);
    // From 4 ms to a few hundredths: the far pair's own reading (variance 16 ms²) still pulls a little.
    farExtrapolated.plusTimeMs.forEach((t, i) => {
      if (!Number.isNaN(t)) expect(Math.abs(t - truePlusMs[i])).toBeLessThan(0.05);
    });
    expect(Math.abs(farExtrapolated.reciprocalTimeMs - 50)).toBeLessThan(0.05);
    expect(farExtrapolated.reciprocalVarianceMs2).toBeLessThan(16);
  });

  it('is the weighted least-squares solution (two equal pairs disagreeing by 1 ms)', () => {
    // Errors ±0.5 ms, priors of weight 1/0.1 each, 8 shared geophones of weight 1/(0.125 + 0.125).
    // With s_a = −u, s_b = u the cost is 2·10·u² + 8·4·(2u − 1)², least at u = 128/296.
    const a = pair(0.5, truePlusMs.map(() => true), 0.1);
    const b = pair(-0.5, truePlusMs.map(() => true), 0.1);
    adjustReciprocalTimes([a, b]);
    const u = 128 / 296;
    a.plusTimeMs.forEach((t, i) => expect(t - truePlusMs[i]).toBeCloseTo(-0.5 + u, 9));
    b.plusTimeMs.forEach((t, i) => expect(t - truePlusMs[i]).toBeCloseTo(0.5 - u, 9));
  });

  it('leaves pairs with no shared geophone as they are', () => {
    const a = pair(0, truePlusMs.map((_, i) => i < 4), 0.1);
    const b = pair(3, truePlusMs.map((_, i) => i >= 4), 0.1);
    adjustReciprocalTimes([a, b]);
    expect(b.reciprocalTimeMs).toBe(53);
    expect(b.plusTimeMs[5]).toBeCloseTo(truePlusMs[5] - 3, 10);
  });
});

/**
 * The straightforward dense computation the fast one replaced: the normal equations
 * built pair by pair, solved by Gaussian elimination with partial pivoting, and the
 * diagonal of the inverse found by solving the system once per unit vector.
 */
function solveDense(matrix: number[][], rhs: number[]): number[] | null {
  const n = rhs.length;
  const m = matrix.map((row, i) => [...row, rhs[i]]);
  for (let c = 0; c < n; c++) {
    let pivot = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(m[r][c]) > Math.abs(m[pivot][c])) pivot = r;
    if (!(Math.abs(m[pivot][c]) > 1e-12)) return null;
    [m[c], m[pivot]] = [m[pivot], m[c]];
    for (let r = c + 1; r < n; r++) {
      const f = m[r][c] / m[c][c];
      for (let j = c; j <= n; j++) m[r][j] -= f * m[c][j];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let r = n - 1; r >= 0; r--) {
    let sum = m[r][n];
    for (let j = r + 1; j < n; j++) sum -= m[r][j] * x[j];
    x[r] = sum / m[r][r];
  }
  return x;
}

function denseAdjustment(pairs: AdjustablePair[]): { shifts: Doubles; inverseDiagonal: Doubles } {
  const k = pairs.length;
  const a = Array.from({ length: k }, () => new Array<number>(k).fill(0));
  const b = new Array<number>(k).fill(0);
  const pickVariance = (p: AdjustablePair, i: number): number | null => {
    const v = p.plusVarianceMs2[i];
    return Number.isNaN(p.plusTimeMs[i]) || Number.isNaN(v) ? null : Math.max(v - p.reciprocalVarianceMs2, 1e-6);
  };
  pairs.forEach((p, m) => (a[m][m] += 1 / Math.max(p.reciprocalVarianceMs2, 1e-6)));
  for (let m = 0; m < k; m++) {
    for (let n = m + 1; n < k; n++) {
      pairs[m].plusTimeMs.forEach((tp, i) => {
        const tq = pairs[n].plusTimeMs[i];
        const vp = pickVariance(pairs[m], i);
        const vq = pickVariance(pairs[n], i);
        if (Number.isNaN(tp) || Number.isNaN(tq) || vp === null || vq === null) return;
        const w = 1 / (vp + vq);
        a[m][m] += w;
        a[n][n] += w;
        a[m][n] -= w;
        a[n][m] -= w;
        b[m] += w * (tp - tq);
        b[n] -= w * (tp - tq);
      });
    }
  }
  const shifts = solveDense(a, b) as number[];
  const inverseDiagonal = pairs.map((_, m) => (solveDense(a, pairs.map((__, j) => (j === m ? 1 : 0))) as number[])[m]);
  return { shifts, inverseDiagonal };
}

/** k random pairs over g geophones, each covering a random run of them, with random errors and variances. */
function randomPairs(rng: () => number, k: number, g: number): AdjustablePair[] {
  return Array.from({ length: k }, () => {
    const from = Math.floor(rng() * g * 0.6);
    const to = from + 2 + Math.floor(rng() * (g - from - 2));
    const readingVariance = 0.01 + 20 * rng() * rng();
    const error = 3 * gaussian(rng);
    return {
      plusTimeMs: fromNullable(Array.from({ length: g }, (_, i) => (i >= from && i <= to ? 10 + 0.3 * i - error + 0.2 * gaussian(rng) : null))),
      plusVarianceMs2: fromNullable(Array.from({ length: g }, (_, i) => (i >= from && i <= to ? readingVariance + 0.01 + rng() * 0.3 : null))),
      reciprocalTimeMs: 40 + 5 * rng() + error,
      reciprocalVarianceMs2: readingVariance,
    };
  });
}

describe('adjustReciprocalTimes by one Cholesky factorisation', () => {
  it('gives the shifts and variances of the dense k-solve computation to 1e-9 relative (60 random systems, k = 2 … 40)', () => {
    const rng = mulberry32(77);
    for (let trial = 0; trial < 60; trial++) {
      const k = 2 + Math.floor(rng() * 39);
      const pairs = randomPairs(rng, k, 8 + Math.floor(rng() * 40));
      const dense = denseAdjustment(pairs);
      const system = normalEquations(pairs);
      expect(system).not.toBeNull();
      const factor = choleskyFactor(system!.matrix, k);
      expect(factor).not.toBeNull();
      const shifts = choleskySolve(factor!, k, system!.rhs);
      const diagonal = choleskyInverseDiagonal(factor!, k);
      const scale = Math.max(...Array.from(dense.shifts, Math.abs));
      for (let m = 0; m < k; m++) {
        expect(Math.abs(shifts[m] - dense.shifts[m])).toBeLessThanOrEqual(1e-9 * scale);
        expect(Math.abs(diagonal[m] - dense.inverseDiagonal[m])).toBeLessThanOrEqual(1e-9 * dense.inverseDiagonal[m]);
      }
      // And the pairs come out adjusted by exactly those shifts and variances.
      const before = pairs.map((p) => p.reciprocalTimeMs);
      adjustReciprocalTimes(pairs);
      pairs.forEach((p, m) => {
        expect(Math.abs(p.reciprocalTimeMs - before[m] - dense.shifts[m])).toBeLessThanOrEqual(1e-9 * Math.max(scale, 1));
        expect(Math.abs(p.reciprocalVarianceMs2 - dense.inverseDiagonal[m])).toBeLessThanOrEqual(1e-9 * dense.inverseDiagonal[m]);
      });
    }
  });

  it('refuses a matrix that is not positive definite', () => {
    expect(choleskyFactor([1, 2, 2, 1], 2)).toBeNull();
  });
});

/**
 * Pairs as a line gives them: S shots along G geophones, one pair per forward shot left of
 * a reverse shot, covering the geophones between them (off-end shots: the whole spread),
 * pick variances from a few classes (own picks, phantom legs), random tAB errors.
 */
function linePairs(rng: () => number, shots: number, g: number, classes: number[], phantomShare: number): AdjustablePair[] {
  const shotAt = Array.from({ length: shots }, (_, s) => Math.round(((s + 0.5) * g) / shots) - 1);
  const pairs: AdjustablePair[] = [];
  for (let f = 0; f < shots; f++) {
    for (let r = f + 1; r < shots; r++) {
      const from = f === 0 ? 0 : shotAt[f] + 1;
      const to = r === shots - 1 ? g - 1 : shotAt[r];
      if (to - from < 1) continue;
      const readingVariance = 0.01 + 10 * rng() * rng();
      const error = 2 * gaussian(rng);
      const phantomFrom = rng() < phantomShare ? from + Math.floor(rng() * (to - from)) : g;
      const pickVariance = classes[Math.floor(rng() * classes.length)];
      pairs.push({
        plusTimeMs: fromNullable(Array.from({ length: g }, (_, i) => (i >= from && i <= to ? 12 + 0.1 * i - error + 0.1 * gaussian(rng) : null))),
        plusVarianceMs2: fromNullable(Array.from({ length: g }, (_, i) => (i >= from && i <= to ? readingVariance + (i >= phantomFrom ? 0.07 : pickVariance) : null))),
        reciprocalTimeMs: 40 + error,
        reciprocalVarianceMs2: readingVariance,
      });
    }
  }
  return pairs;
}

describe('the structured adjustment (N = Δ − U·Ω·Uᵀ, Woodbury)', () => {
  const expectSame = (
    fast: { shifts: Doubles; inverseDiagonal: Doubles },
    dense: { shifts: Doubles; inverseDiagonal: Doubles },
    varianceTolerance = 1e-9,
  ): void => {
    const scale = Math.max(...Array.from(dense.shifts, Math.abs));
    Array.from(dense.shifts).forEach((s, m) => {
      expect(Math.abs(fast.shifts[m] - s)).toBeLessThanOrEqual(1e-9 * scale);
      expect(Math.abs(fast.inverseDiagonal[m] - dense.inverseDiagonal[m])).toBeLessThanOrEqual(varianceTolerance * dense.inverseDiagonal[m]);
    });
  };

  it('gives the dense route\'s shifts and variances to 1e-9 relative on 60 random systems with a variance per pick, or declines', () => {
    // A variance per pick makes a class per pair: the class weights (a Cauchy matrix of
    // close values) are numerically singular and the structured route declines; the dense
    // route is the cheaper one there anyway (R ≥ k).
    const rng = mulberry32(91);
    let solved = 0;
    for (let trial = 0; trial < 60; trial++) {
      const k = 2 + Math.floor(rng() * 39);
      const pairs = randomPairs(rng, k, 8 + Math.floor(rng() * 40));
      const fast = planStructuredAdjustment(pairs).solve();
      const dense = denseReciprocalAdjustment(pairs);
      expectSame(reciprocalAdjustment(pairs)!, dense!);
      if (fast === 'not-positive-definite') continue;
      expect(typeof fast).toBe('object');
      expectSame(fast as Exclude<typeof fast, string>, dense!);
      solved++;
    }
    expect(solved).toBeGreaterThan(0);
  });

  const lineTrials = (seed: number, classes: number[], phantomShare: number, varianceTolerance: number, cheaperFrom: number): void => {
    const rng = mulberry32(seed);
    for (let trial = 0; trial < 30; trial++) {
      const shots = 5 + Math.floor(rng() * 36);
      const pairs = linePairs(rng, shots, shots + Math.floor(rng() * 80), classes, phantomShare);
      const plan = planStructuredAdjustment(pairs);
      const fast = plan.solve();
      const dense = denseReciprocalAdjustment(pairs)!;
      expect(typeof fast).toBe('object');
      expectSame(fast as Exclude<typeof fast, string>, dense, varianceTolerance);
      if (shots >= cheaperFrom) expect(plan.columns ** 3 / 2 + 2 * plan.pairColumnWork).toBeLessThan(pairs.length ** 3 / 3);
      expectSame(reciprocalAdjustment(pairs)!, dense, varianceTolerance);
    }
  };

  it('gives the dense route\'s shifts and variances to 1e-9 relative on 30 random lines of 5 … 40 shots, one pick variance, and is the route taken there', () => {
    lineTrials(5, [0.02], 0, 1e-9, 20);
  });

  it('gives the dense route\'s shifts to 1e-9 and variances to 2e-8 relative on 30 random lines with four pick-variance classes', () => {
    // Measured up to 6.3e-9 on the variances of such lines: four classes make the class-weight (Cauchy)
    // blocks ill-conditioned, and priors down to 1/10 ms⁻² against overlap weights ~1e5
    // make C = I − Vᵀ·Δ⁻¹·V nearly singular; the dense route loses less there. The bench
    // lines agree to 1e-11 (docs/developers/bench.md).
    // A class drawn per pair (unlike a line's, where the class follows the shot) makes many
    // distinct column groups: the route is then not always the cheaper one.
    lineTrials(6, [0.02, 0.02, 0.02, 0.05, 0.11], 0.3, 2e-8, Infinity);
  });

  it('reports no overlap as the dense route does', () => {
    const a = pair(0, truePlusMs.map((_, i) => i < 4), 0.1);
    const b = pair(3, truePlusMs.map((_, i) => i >= 4), 0.1);
    expect(planStructuredAdjustment([a, b]).solve()).toBe('no-overlap');
    expect(denseReciprocalAdjustment([a, b])).toBeNull();
  });
});
