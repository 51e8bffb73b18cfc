/**
 * stripLayers and thicknessesFromInterceptTimes.
 *
 * Reference times are built from ray geometry, not from the stripping formula: the head
 * wave along refractor n has ray parameter p = 1/V_{n+1}; in layer i it travels at angle
 * θ_i (sin θ_i = V_i·p, Snell's law) along a leg of length h_i/cos θ_i, covering h_i·tan θ_i
 * horizontally, down and up. At a large offset X the time is
 *   T = Σ 2·h_i/(V_i·cos θ_i) + (X − Σ 2·h_i·tan θ_i)/V_{n+1},
 * and the intercept time is T − X/V_{n+1}. Kearey, Brooks & Hill (2002, ch. 5) write the
 * same intercept as Σ 2·h_i·cos θ_i/V_i; the first test checks that identity numerically.
 */
import { describe, expect, it } from 'vitest';
import { stripLayers, thicknessesFromInterceptTimes } from '../../../engine/depth/layer-stripping.js';
import { velocityInversion } from '../../../engine/structure/hidden-layer.js';

/** Intercept time (ms) of the head wave along refractor n (1-based) from ray path lengths. */
function geometricInterceptMs(thicknessesM: number[], velocities: number[], n: number): number {
  const vRefractor = velocities[n];
  const p = 1 / vRefractor;
  const X = 500;
  let t = 0;
  let horizontal = 0;
  for (let i = 0; i < n; i++) {
    const theta = Math.asin(velocities[i] * p);
    t += (2 * thicknessesM[i]) / (velocities[i] * Math.cos(theta));
    horizontal += 2 * thicknessesM[i] * Math.tan(theta);
  }
  t += (X - horizontal) / vRefractor;
  return 1000 * (t - X / vRefractor);
}

/** Kearey et al. (2002, ch. 5) multi-layer intercept: Σ 2·h_i·cos θ_{i,n+1}/V_i, ms. */
function keareyInterceptMs(thicknessesM: number[], velocities: number[], n: number): number {
  let t = 0;
  for (let i = 0; i < n; i++) t += (2 * thicknessesM[i] * Math.sqrt(1 - (velocities[i] / velocities[n]) ** 2)) / velocities[i];
  return 1000 * t;
}

describe('layer stripping', () => {
  const cases: { label: string; h: number[]; v: number[] }[] = [
    { label: 'three layers (soil over weathered rock over rock)', h: [3.5, 8], v: [450, 1600, 3800] },
    { label: 'four layers', h: [2, 5, 9], v: [600, 1500, 2800, 4500] },
    { label: 'thin, slow top layer', h: [0.8, 12], v: [300, 2000, 2400] },
  ];
  for (const c of cases) {
    it(`round-trips ${c.label} from geometric intercept times within 1 % (Kearey et al. 2002 ch. 5)`, () => {
      const intercepts = c.h.map((_, k) => geometricInterceptMs(c.h, c.v, k + 1));
      intercepts.forEach((t, k) => expect(Math.abs(t - keareyInterceptMs(c.h, c.v, k + 1))).toBeLessThan(1e-9));
      const r = thicknessesFromInterceptTimes(intercepts, c.v)!;
      const d = stripLayers(intercepts.map((t) => t / 2), c.v)!;
      let depth = 0;
      c.h.forEach((h, k) => {
        depth += h;
        expect(Math.abs(r.thicknessesM[k] / h - 1)).toBeLessThan(0.01);
        expect(Math.abs(r.depthsM[k] / depth - 1)).toBeLessThan(0.01);
        expect(d.thicknessesM[k]).toBeCloseTo(r.thicknessesM[k], 10);
      });
    });
  }

  it('returns null (never NaN) on a velocity inversion, and velocityInversion words the warning', () => {
    const v = [600, 2000, 1500];
    expect(stripLayers([5, 12], v)).toBeNull();
    expect(thicknessesFromInterceptTimes([10, 24], v)).toBeNull();
    const w = velocityInversion(v);
    expect(w).toHaveLength(1);
    expect(w[0].code).toBe('velocity-inversion');
    expect(w[0].message).toMatch(/Layer 3 \(1,500 m\/s\) is not faster than layer 2/);
    expect(velocityInversion([500, 1500, 3000])).toEqual([]);
    expect(stripLayers([5, 12], [600, 2000, 2000])).toBeNull();
  });

  it('returns null when the deeper delay is too small for any positive thickness', () => {
    // Refractor 2 delay below what layer 1 alone already contributes.
    expect(stripLayers([5, 1], [500, 1500, 3000])).toBeNull();
  });

  it('names the field on bad input', () => {
    expect(() => stripLayers([5, 10], [500, 1500])).toThrow(/velocitiesMPerS/);
    expect(() => stripLayers([5, -1], [500, 1500, 3000])).toThrow(/delayTimesMs\[1\]/);
    expect(() => stripLayers([], [500])).toThrow(/delayTimesMs/);
    expect(() => stripLayers([5], [500, Number.NaN])).toThrow(/velocitiesMPerS\[1\]/);
    expect(() => thicknessesFromInterceptTimes([Number.POSITIVE_INFINITY], [500, 1500])).toThrow(/interceptTimesMs\[0\]/);
  });
});
