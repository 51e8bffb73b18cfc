import { describe, expect, it } from 'vitest';
import { adjustReciprocalTimes, type AdjustablePair } from '../../engine/reciprocal/reciprocal-adjustment.js';

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
