/**
 * Unit checks of the GRM stage's pieces (engine/grm/; Palmer, "The generalized reciprocal
 * method of seismic refraction interpretation", SEG, 1980).
 */
import { describe, expect, it } from 'vitest';
import { xyStations } from '../../engine/grm/xy-pairs.js';
import { rmsAboutLines, rmsSecondDifference, xyFunctions } from '../../engine/grm/xy-functions.js';
import { expectedOptimumXyM, optimumIndex, xyStepRange } from '../../engine/grm/optimum-xy.js';
import type { OpposingPairInput } from '../../engine/plus-minus/refractor-plus-times.js';
import type { ShotAnalysis } from '../../engine/output/interpretation.js';

describe('stations of an XY (Palmer 1980: G midway between X and Y)', () => {
  it('puts G between geophones for an odd number of intervals and on them for an even one', () => {
    const xs = [0, 2, 4, 6, 8];
    expect(xyStations(xs, 1).stationXM).toEqual([1, 3, 5, 7]);
    expect(xyStations(xs, 2).stationXM).toEqual([2, 4, 6]);
    expect(xyStations(xs, 2).xyM).toEqual([4, 4, 4]);
    expect(xyStations(xs, 0).stationXM).toEqual(xs);
  });
});

describe('the two functions on delay-time arrivals (Palmer 1980, eqs. for t_V and t_G)', () => {
  // Delay-time form (Hagedoorn 1959): t(S, G) = a_S + a_G + |x_G − x_S|/V2, V2 = 2000 m/s,
  // a_G varying along the line, shots A at −1 (a_A = 5 ms) and B at 21 (a_B = 7 ms).
  const xs = Array.from({ length: 11 }, (_, i) => 2 * i);
  const delay = xs.map((x) => 4 + 0.5 * Math.sin(x / 3));
  const v2 = 2000;
  const tA = xs.map((x, i) => 5 + delay[i] + (1000 * (x + 1)) / v2);
  const tB = xs.map((x, i) => 7 + delay[i] + (1000 * (21 - x)) / v2);
  const tAB = 5 + 7 + (1000 * 22) / v2;
  const shot = (id: string, x: number) => ({ id, x }) as unknown as ShotAnalysis;
  const times = (t: number[]) => ({ timesMs: Float64Array.from(t), phantomed: t.map(() => false), varianceMs2: Float64Array.from(t.map(() => 0.25)) });
  const pair: OpposingPairInput = { left: shot('A', -1), right: shot('B', 21), leftTimes: times(tA), rightTimes: times(tB), reciprocalTimeMs: tAB, reciprocalVarianceMs2: 0.1, trusted: true };

  it('at XY = 0 the time-depth is the delay time T+/2 at every geophone', () => {
    const f = xyFunctions([pair], xs, 0, 2, v2);
    f.timeDepthMs.forEach((t, i) => expect(t).toBeCloseTo(delay[i], 9));
  });
  it('at XY = 2 intervals t_G = (a_X + a_Y)/2 and V\' = V2 from the slope of t_V', () => {
    const f = xyFunctions([pair], xs, 2, 2, v2);
    expect(f.refractorVelocityMPerS).not.toBeNull();
    // t_V has slope 1/V2 plus (a_Y − a_X)/2, which is not linear here: V' is only close.
    expect(Math.abs(f.refractorVelocityMPerS! - v2) / v2).toBeLessThan(0.05);
    const vp = f.velocityUsedMPerS;
    f.timeDepthMs.forEach((t, j) => {
      const x = j;
      const y = j + 2;
      // t_G = (t_AY + t_BX − t_AB − XY/V')/2 written out.
      const expected = (tA[y] + tB[x] - tAB - (1000 * 4) / vp) / 2;
      expect(t).toBeCloseTo(expected, 9);
    });
  });
});

describe('measures and choices', () => {
  it('rmsSecondDifference is zero on a straight line and h²·c on a parabola (finite differences)', () => {
    const x = [0, 1, 2, 3, 4];
    expect(rmsSecondDifference([x.map((v) => 3 * v + 1)], x).rms).toBeCloseTo(0, 12);
    // f = c·x² has second difference 2c·h² at spacing h = 1.
    expect(rmsSecondDifference([x.map((v) => 0.5 * v * v)], x).rms).toBeCloseTo(1, 12);
    expect(rmsSecondDifference([[1, Number.NaN, 3, 4, 5]], x).count).toBe(1);
  });
  it('rmsAboutLines is zero on straight rows, whatever their slopes, and the residual RMS (n − 2 dof) otherwise (least squares)', () => {
    const x = [0, 1, 2, 3, 4];
    expect(rmsAboutLines([x.map((v) => 3 * v + 1), x.map((v) => -v)], x).rms).toBeCloseTo(0, 12);
    // y = (0, 1, 0, 1, 0) about its LS line: slope 0, mean 0.4; residuals −0.4, 0.6, −0.4, 0.6, −0.4; Σr² = 1.2, dof 3.
    expect(rmsAboutLines([[0, 1, 0, 1, 0]], x).rms).toBeCloseTo(Math.sqrt(1.2 / 3), 12);
    expect(rmsAboutLines([[1, 2, Number.NaN, Number.NaN, Number.NaN]], x).rms).toBeNull();
  });
  it('optimumIndex takes the least roughness, ties and nulls to the smaller XY', () => {
    expect(optimumIndex([0.05, 0.03, 0.01, 0.02])).toBe(2);
    expect(optimumIndex([0.02, 0.02, 0.02])).toBe(0);
    expect(optimumIndex([null, 0.02, 0.01])).toBe(2);
    expect(optimumIndex([null, null])).toBe(0);
  });
  it('expectedOptimumXyM is 2·z·tan(ic) with z from the delay time (Palmer 1980; Hagedoorn 1959 for z)', () => {
    // z = 10 m, V1 = 1000, V2 = 2500: delay = z·cos(ic)/V1, 2·z·tan(ic) = 8.729 m.
    const ic = Math.asin(1000 / 2500);
    const delayMs = (1000 * 10 * Math.cos(ic)) / 1000;
    expect(expectedOptimumXyM(delayMs, 1000, 2500)).toBeCloseTo(20 * Math.tan(ic), 9);
    expect(expectedOptimumXyM(5, 2500, 1000)).toBeNull();
  });
  it('xyStepRange: twice the expectation, at least 4 intervals, at most a quarter of the spread (our choice)', () => {
    expect(xyStepRange(48, 2, 8.7)).toBe(9);
    expect(xyStepRange(48, 2, 1)).toBe(4);
    expect(xyStepRange(48, 2, 100)).toBe(11);
    expect(xyStepRange(9, 2, 100)).toBe(2);
    expect(xyStepRange(1, 2, null)).toBe(0);
  });
});
