import { describe, expect, it } from 'vitest';
import { linearRegression } from 'simple-statistics';
import { minusTimeVelocity } from '../../engine/velocities/minus-time-velocity.js';
import { gaussian, mulberry32 } from '../helpers/random.js';

describe('minusTimeVelocity', () => {
  it('gives V2 = 2/slope of T− against x (Hagedoorn 1959)', () => {
    const v2 = 3200;
    const xM = [0, 5, 10, 15, 20];
    const r = minusTimeVelocity([{ xM, minusTimeMs: xM.map((x) => (2000 * x) / v2 - 7) }]);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.velocity).toBeCloseTo(v2, 6);
    expect(r.standardError).toBeCloseTo(0, 6);
    expect(r.count).toBe(5);
    expect(r.degreesOfFreedom).toBe(3);
  });

  it('fits several pairs with one slope and separate intercepts', () => {
    const v2 = 2000;
    const a = [0, 4, 8, 12];
    const b = [2, 6, 10];
    const r = minusTimeVelocity([
      { xM: a, minusTimeMs: a.map((x) => x - 30) },
      { xM: b, minusTimeMs: b.map((x) => x + 12) },
    ]);
    expect(r.ok && r.velocity).toBeCloseTo(v2, 8);
    expect(r.ok && r.degreesOfFreedom).toBe(7 - 2 - 1);
  });

  it('computes the slope standard error with n − 2 degrees of freedom for one pair', () => {
    const rng = mulberry32(7);
    const xM = Array.from({ length: 12 }, (_, i) => i * 3);
    const tMs = xM.map((x) => 0.8 * x + 2 + 0.4 * gaussian(rng));
    const r = minusTimeVelocity([{ xM, minusTimeMs: tMs }]);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    // Independent textbook formula: SE(b) = sqrt(Σe²/(n−2) / Σ(x − x̄)²).
    const { m, b } = linearRegression(xM.map((x, i) => [x, tMs[i]]));
    const meanX = xM.reduce((s, x) => s + x, 0) / xM.length;
    const sse = xM.reduce((s, x, i) => s + (tMs[i] - (m * x + b)) ** 2, 0);
    const sxx = xM.reduce((s, x) => s + (x - meanX) ** 2, 0);
    const se = Math.sqrt(sse / (xM.length - 2) / sxx);
    expect(r.slopeMsPerM).toBeCloseTo(m, 10);
    expect(r.slopeStandardErrorMsPerM).toBeCloseTo(se, 10);
    expect(r.velocity).toBeCloseTo(2000 / m, 6);
    expect(r.standardError).toBeCloseTo((2000 * se) / (m * m), 6);
    expect(r.standardError).toBeGreaterThan(0);
  });

  it('refuses a fit with no residual degree of freedom', () => {
    const r = minusTimeVelocity([{ xM: [0, 10], minusTimeMs: [1, 2] }]);
    expect(r.ok).toBe(false);
    expect(!r.ok && r.reason).toBe('too-few-points');
  });

  it('refuses a non-positive slope instead of giving a negative or infinite velocity', () => {
    const flat = minusTimeVelocity([{ xM: [0, 10, 20], minusTimeMs: [5, 5, 5] }]);
    expect(flat.ok).toBe(false);
    expect(!flat.ok && flat.reason).toBe('non-positive-slope');
    const falling = minusTimeVelocity([{ xM: [0, 10, 20], minusTimeMs: [5, 3, 1] }]);
    expect(!falling.ok && falling.slopeMsPerM).toBeCloseTo(-0.2, 10);
  });
});
