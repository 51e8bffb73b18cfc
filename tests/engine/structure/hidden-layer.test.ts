/**
 * Hidden-layer bound (Soske 1959; ASTM D5777 and USACE EM 1110-1-1802 as general
 * references) against a hand-derived case, and against first arrivals counted from the
 * three branch times (Kearey, Brooks & Hill 2002 ch. 5: direct x/V1, head waves
 * x/V_n + intercept).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { hiddenLayerAllowance, hiddenLayerWarning, isLayerHidden, maxHiddenLayerThickness } from '../../../engine/structure/hidden-layer.js';

const V1 = 500;
const V2 = 1200;
const V3 = 3000;
const H1 = 3;
const OFFSETS = Array.from({ length: 23 }, (_, i) => 2 + 2 * i);

/** Number of offsets where the layer-2 head wave is the first arrival. */
function layer2FirstArrivals(h1: number, h2: number, offsets: number[]): number {
  const c = (a: number, b: number): number => Math.sqrt(1 - (a / b) ** 2);
  const ti2 = (2 * h1 * c(V1, V2)) / V1;
  const ti3 = (2 * h1 * c(V1, V3)) / V1 + (2 * h2 * c(V2, V3)) / V2;
  return offsets.filter((x) => {
    const t2 = x / V2 + ti2;
    return t2 < x / V1 && t2 < x / V3 + ti3;
  }).length;
}

describe('maxHiddenLayerThickness', () => {
  it('matches the hand-derived crossover bound', () => {
    // Hand derivation (V1 500, V2 1200, V3 3000 m/s, h1 3 m):
    //   cos θ12 = √(1 − (5/12)²) = 0.909059, cos θ13 = √(1 − (1/6)²) = 0.986013,
    //   cos θ23 = √(1 − 0.4²) = 0.916515
    //   t_i2 = 2·3·0.909059/500 = 0.0109087 s; x12 = 0.0109087/(1/500 − 1/1200) = 9.3503 m
    //   x23 = x12 ⇔ 2·h2·0.916515/1200 = 9.3503·(1/1200 − 1/3000) − 6·(0.986013 − 0.909059)/500
    //         = 0.0046752 − 0.0009235 = 0.0037517 s  ⇒  h2 = 2.456 m
    const r = maxHiddenLayerThickness({ v1MPerS: V1, topThicknessM: H1, hiddenVelocityMPerS: V2, refractorVelocityMPerS: V3 });
    expect(r.crossoverDirectM).toBeCloseTo(9.3503, 3);
    expect(r.maxThicknessM!).toBeCloseTo(2.456, 2);
  });

  it('on a 2–46 m spread needing 3 picks, the bound moves to the third offset past x12 (14 m) and agrees with counted first arrivals', () => {
    // By hand: X = 14 m ⇒ h2 = 1200·(14·0.0005 − 0.0009235)/(2·0.916515) = 3.978 m.
    const r = maxHiddenLayerThickness({ v1MPerS: V1, topThicknessM: H1, hiddenVelocityMPerS: V2, refractorVelocityMPerS: V3, offsetsM: OFFSETS });
    expect(r.limitOffsetM).toBe(14);
    expect(r.maxThicknessM!).toBeCloseTo(3.978, 2);
    expect(layer2FirstArrivals(H1, r.maxThicknessM! - 0.01, OFFSETS)).toBeLessThan(3);
    expect(layer2FirstArrivals(H1, r.maxThicknessM! + 0.01, OFFSETS)).toBeGreaterThanOrEqual(3);
    expect(isLayerHidden({ v1MPerS: V1, topThicknessM: H1, hiddenVelocityMPerS: V2, refractorVelocityMPerS: V3, offsetsM: OFFSETS, hiddenThicknessM: 3.9 })).toBe(true);
    expect(isLayerHidden({ v1MPerS: V1, topThicknessM: H1, hiddenVelocityMPerS: V2, refractorVelocityMPerS: V3, offsetsM: OFFSETS, hiddenThicknessM: 4.1 })).toBe(false);
  });

  it('is unbounded (null) when the spread is too short to show the layer at all', () => {
    const r = maxHiddenLayerThickness({ v1MPerS: V1, topThicknessM: H1, hiddenVelocityMPerS: V2, refractorVelocityMPerS: V3, offsetsM: [2, 4, 6, 8, 10] });
    expect(r.maxThicknessM).toBeNull();
  });

  it('names the field when the hidden velocity is outside (V1, V3)', () => {
    expect(() => maxHiddenLayerThickness({ v1MPerS: V1, topThicknessM: H1, hiddenVelocityMPerS: 400, refractorVelocityMPerS: V3 })).toThrow(/hiddenVelocityMPerS/);
    expect(() => maxHiddenLayerThickness({ v1MPerS: V1, topThicknessM: -1, hiddenVelocityMPerS: V2, refractorVelocityMPerS: V3 })).toThrow(/topThicknessM/);
  });
});

describe('hiddenLayerWarning', () => {
  it('states the hidden thickness and the extra depth, consistent with the bound', () => {
    const w = hiddenLayerWarning({ v1MPerS: V1, refractorVelocityMPerS: V3, depthM: 6, offsetsM: OFFSETS, hiddenVelocityMPerS: V2, x: 10 })!;
    expect(w.code).toBe('hidden-layer');
    expect(w.x).toBe(10);
    const m = /up to ([\d.]+) m .* up to ([\d.]+) m deeper/.exec(w.message)!;
    const h2 = Number(m[1]);
    const extra = Number(m[2]);
    expect(h2).toBeGreaterThan(0);
    expect(extra).toBeGreaterThan(0);
    // Same observed delay time: t = 6·cos θ13/V1 = h1·cos θ13/V1 + h2·cos θ23/V2.
    const c13 = Math.sqrt(1 - (V1 / V3) ** 2);
    const c23 = Math.sqrt(1 - (V2 / V3) ** 2);
    const h1 = ((6 * c13) / V1 - (h2 * c23) / V2) * (V1 / c13);
    expect(h1 + h2 - 6).toBeCloseTo(extra, 0);
    expect(layer2FirstArrivals(h1, h2 * 0.98, OFFSETS)).toBeLessThan(3);
    console.log(`[hidden-layer] depth 6 m, V1 500, V3 3000, checked at 1200 m/s: ${w.message}`);
  });
});

describe('hiddenLayerAllowance over every shot side of a line', () => {
  // An end shot's side (offsets 2 … 46 m) and a far off-end shot's (40 … 84 m) of the same
  // 23-geophone spread: a layer that the end shot's near offsets would show is not hidden,
  // whatever the far shot sees.
  const END = OFFSETS;
  const FAR = OFFSETS.map((o) => o + 38);
  const input = { v1MPerS: V1, refractorVelocityMPerS: V3, depthM: 6, hiddenVelocityMPerS: V2 };
  const c13 = Math.sqrt(1 - (V1 / V3) ** 2);
  const c23 = Math.sqrt(1 - (V2 / V3) ** 2);
  const topOver = (h2: number): number => ((6 * c13) / V1 - (h2 * c23) / V2) * (V1 / c13);

  it('is the smallest of the sides’ own allowances, not the widest reach’s', () => {
    const both = hiddenLayerAllowance({ ...input, spreadsM: [END, FAR] })!;
    const endOnly = hiddenLayerAllowance({ ...input, spreadsM: [END] })!;
    const farOnly = hiddenLayerAllowance({ ...input, spreadsM: [FAR] })!;
    expect(farOnly.thicknessM).toBeGreaterThan(endOnly.thicknessM);
    expect(both.thicknessM).toBeCloseTo(endOnly.thicknessM, 9);
  });

  it('agrees with first arrivals counted on each side from the three branch times (Kearey, Brooks & Hill 2002, ch. 5)', () => {
    const a = hiddenLayerAllowance({ ...input, spreadsM: [END, FAR] })!;
    // Just below the bound the layer arrives first at fewer than 3 offsets on every side…
    const below = a.thicknessM * 0.98;
    for (const side of [END, FAR]) expect(layer2FirstArrivals(topOver(below), below, side)).toBeLessThan(3);
    // …and just above it, on at least one side it makes a branch of 3 picks.
    const above = a.thicknessM * 1.05;
    expect(Math.max(...[END, FAR].map((side) => layer2FirstArrivals(topOver(above), above, side)))).toBeGreaterThanOrEqual(3);
    // The refractor would lie h1 + h2 − z deeper than the two-layer depth.
    expect(a.extraDepthM).toBeCloseTo(a.topThicknessM + a.thicknessM - 6, 9);
  });

  it('refuses a call without any spread, naming the field', () => {
    expect(() => hiddenLayerAllowance({ ...input })).toThrow(/spreadsM/);
  });

  it('on random lines, every thickness below the allowance hides on every side and every one above shows on some side (counted first arrivals, Kearey, Brooks & Hill 2002, ch. 5)', () => {
    // The allowance is found by bisection over a ladder of thicknesses, which is right only
    // if "hidden" holds up to one thickness and fails beyond it. This checks that against
    // first arrivals counted from the three branch times, rung by rung, on random lines.
    const spread = fc.record({ first: fc.double({ min: 0.5, max: 60, noNaN: true }), spacing: fc.double({ min: 0.5, max: 5, noNaN: true }), count: fc.integer({ min: 12, max: 48 }) });
    const line = fc.record({
      v1: fc.double({ min: 300, max: 1000, noNaN: true }),
      ratio: fc.double({ min: 2.5, max: 8, noNaN: true }),
      depth: fc.double({ min: 2, max: 20, noNaN: true }),
      sides: fc.array(spread, { minLength: 1, maxLength: 6 }),
    });
    fc.assert(
      fc.property(line, ({ v1, ratio, depth, sides }) => {
        const v3 = v1 * ratio;
        const v2 = Math.sqrt(v1 * v3);
        const spreadsM = sides.map((s) => Array.from({ length: s.count }, (_, i) => s.first + i * s.spacing));
        const c = (a: number, b: number): number => Math.sqrt(1 - (a / b) ** 2);
        const delayS = (depth * c(v1, v3)) / v1;
        const topOf = (h2: number): number => ((delayS - (h2 * c(v2, v3)) / v2) * v1) / c(v1, v3);
        const layer2Picks = (h2: number, offsets: number[]): number => {
          const h1 = Math.max(0, topOf(h2));
          const ti2 = (2 * h1 * c(v1, v2)) / v1;
          const ti3 = (2 * h1 * c(v1, v3)) / v1 + (2 * h2 * c(v2, v3)) / v2;
          return offsets.filter((x) => x / v2 + ti2 < x / v1 && x / v2 + ti2 < x / v3 + ti3).length;
        };
        const hiddenEverywhere = (h2: number): boolean => spreadsM.every((offsets) => layer2Picks(h2, offsets) < 3);
        const thickest = (delayS * v2) / c(v2, v3);
        const a = hiddenLayerAllowance({ v1MPerS: v1, refractorVelocityMPerS: v3, hiddenVelocityMPerS: v2, depthM: depth, spreadsM });
        const limit = a === null ? 0 : a.thicknessM;
        for (let k = 1; k <= 40; k++) {
          const below = limit * (1 - 1e-6) * (k / 40);
          if (below > 0) expect(hiddenEverywhere(below)).toBe(true);
          const above = limit * (1 + 1e-6) + ((thickest - limit) * k) / 40;
          if (above < thickest) expect(hiddenEverywhere(above)).toBe(false);
        }
      }),
      { seed: 20261205, numRuns: 300 },
    );
  });
});
