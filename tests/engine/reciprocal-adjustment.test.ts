import { describe, expect, it } from 'vitest';
import { adjustReciprocalTimes, choleskyFactor, choleskyInverseDiagonal, choleskySolve, normalEquations, type AdjustablePair } from '../../engine/reciprocal/reciprocal-adjustment.js';
import { gaussian, mulberry32 } from '../helpers/random.js';

/**
 * The delay time at a geophone is the same whichever opposing pair measures it (Hagedoorn,
 * Geophysical Prospecting 7, 1959), so a pair whose reciprocal time is off by e shows T+
 * off by −e at every geophone: the adjustment must find e from the overlaps.
 */
const truePlusMs = [10, 10.4, 10.9, 11.5, 12.2, 12.8, 13.1, 13.3];

function pair(errorMs: number, covered: boolean[], readingVarianceMs2: number): AdjustablePair {
  const pickVariance = 0.125;
  return {
    plusTimeMs: truePlusMs.map((t, i) => (covered[i] ? t - errorMs : null)),
    plusVarianceMs2: truePlusMs.map((_, i) => (covered[i] ? pickVariance + readingVarianceMs2 : null)),
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
      if (t !== null) expect(Math.abs(t - truePlusMs[i])).toBeLessThan(0.05);
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
    a.plusTimeMs.forEach((t, i) => expect((t as number) - truePlusMs[i]).toBeCloseTo(-0.5 + u, 9));
    b.plusTimeMs.forEach((t, i) => expect((t as number) - truePlusMs[i]).toBeCloseTo(0.5 - u, 9));
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

function denseAdjustment(pairs: AdjustablePair[]): { shifts: number[]; inverseDiagonal: number[] } {
  const k = pairs.length;
  const a = Array.from({ length: k }, () => new Array<number>(k).fill(0));
  const b = new Array<number>(k).fill(0);
  const pickVariance = (p: AdjustablePair, i: number): number | null => {
    const v = p.plusVarianceMs2[i];
    return p.plusTimeMs[i] === null || v === null ? null : Math.max(v - p.reciprocalVarianceMs2, 1e-6);
  };
  pairs.forEach((p, m) => (a[m][m] += 1 / Math.max(p.reciprocalVarianceMs2, 1e-6)));
  for (let m = 0; m < k; m++) {
    for (let n = m + 1; n < k; n++) {
      pairs[m].plusTimeMs.forEach((tp, i) => {
        const tq = pairs[n].plusTimeMs[i];
        const vp = pickVariance(pairs[m], i);
        const vq = pickVariance(pairs[n], i);
        if (tp === null || tq === null || vp === null || vq === null) return;
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
      plusTimeMs: Array.from({ length: g }, (_, i) => (i >= from && i <= to ? 10 + 0.3 * i - error + 0.2 * gaussian(rng) : null)),
      plusVarianceMs2: Array.from({ length: g }, (_, i) => (i >= from && i <= to ? readingVariance + 0.01 + rng() * 0.3 : null)),
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
      const scale = Math.max(...dense.shifts.map(Math.abs));
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
    expect(choleskyFactor(Float64Array.from([1, 2, 2, 1]), 2)).toBeNull();
  });
});
