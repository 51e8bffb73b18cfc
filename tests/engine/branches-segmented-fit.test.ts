import { describe, expect, it } from 'vitest';
import {
  bestBreakpoints,
  bicScore,
  fitLine,
  robustSegmentedFit,
  type FitPoint,
} from '../../engine/branches/segmented-fit.js';
import { gaussian, mulberry32 } from '../helpers/random.js';

/** Points on consecutive lines t = a_j + 1000·x/V_j, split at the given offsets; invented test data. */
function segmentedPoints(
  offsets: number[],
  lines: { velocity: number; interceptMs: number }[],
  breaksM: number[],
): FitPoint[] {
  return offsets.map((x) => {
    let j = 0;
    while (j < breaksM.length && x >= breaksM[j]) j++;
    return { offsetM: x, timeMs: lines[j].interceptMs + (1000 * x) / lines[j].velocity };
  });
}

const OFFSETS = Array.from({ length: 30 }, (_, i) => 1 + 2 * i);
// Continuous first-arrival curve: the refracted line (V=2400, a=18 ms) meets the direct one (V=600) near 14.4 m.
const TWO = [
  { velocity: 600, interceptMs: 0 },
  { velocity: 2400, interceptMs: 18 },
];

describe('fitLine', () => {
  it('recovers slope and intercept of an exact line', () => {
    const pts = OFFSETS.map((x) => ({ offsetM: x, timeMs: 4 + 0.5 * x }));
    const l = fitLine(pts, pts.map((_, i) => i))!;
    expect(l.slownessMsPerM).toBeCloseTo(0.5, 12);
    expect(l.interceptMs).toBeCloseTo(4, 10);
    expect(l.rmsMs).toBeLessThan(1e-10);
  });
  it('returns null for fewer than two points or a single offset', () => {
    expect(fitLine([{ offsetM: 1, timeMs: 1 }], [0])).toBeNull();
    expect(fitLine([{ offsetM: 1, timeMs: 1 }, { offsetM: 1, timeMs: 2 }], [0, 1])).toBeNull();
  });
});

describe('bestBreakpoints', () => {
  it('finds the exact breakpoint of a noise-free two-segment curve', () => {
    const pts = segmentedPoints(OFFSETS, TWO, [14.4]);
    const expected = OFFSETS.findIndex((x) => x >= 14.4);
    expect(bestBreakpoints(pts, 2)).toEqual([0, expected]);
  });

  it('rejects splits whose apparent velocity decreases with offset', () => {
    const slowing = segmentedPoints(OFFSETS, [
      { velocity: 2400, interceptMs: 0 },
      { velocity: 600, interceptMs: -30 },
    ], [40]);
    expect(bestBreakpoints(slowing, 2)).toBeNull();
  });

  it('needs two picks per segment for two segments and 2+3+3 for three', () => {
    const pts = segmentedPoints(OFFSETS.slice(0, 3), TWO, [14.4]);
    expect(bestBreakpoints(pts, 2)).toBeNull();
    expect(bestBreakpoints(segmentedPoints(OFFSETS.slice(0, 7), TWO, [4]), 3)).toBeNull();
  });

  it('finds both breakpoints of a noise-free three-segment curve', () => {
    const lines = [
      { velocity: 500, interceptMs: 0 },
      { velocity: 1500, interceptMs: 11.3 },
      { velocity: 4000, interceptMs: 21.8 },
    ];
    // Break offsets where the lines cross: 8.5 m and 25.2 m.
    const pts = segmentedPoints(OFFSETS, lines, [8.5, 25.2]);
    const k1 = OFFSETS.findIndex((x) => x >= 8.5);
    const k2 = OFFSETS.findIndex((x) => x >= 25.2);
    expect(bestBreakpoints(pts, 3)).toEqual([0, k1, k2]);
  });
});

describe('robustSegmentedFit', () => {
  it('recovers V1 within 5 %, V2 within 3 % and the breakpoint within one pick under 0.2 ms noise (20 seeds)', () => {
    const clean = segmentedPoints(OFFSETS, TWO, [14.4]);
    const expected = OFFSETS.findIndex((x) => x >= 14.4);
    for (let seed = 1; seed <= 20; seed++) {
      const rng = mulberry32(seed);
      const noisy = clean.map((p) => ({ ...p, timeMs: p.timeMs + 0.2 * gaussian(rng) }));
      const fit = robustSegmentedFit(noisy, 2)!;
      expect(Math.abs(fit.segments[1].start - expected)).toBeLessThanOrEqual(1);
      expect(1000 / fit.segments[0].slownessMsPerM / 600).toBeCloseTo(1, 1);
      expect(Math.abs(1000 / fit.segments[1].slownessMsPerM / 2400 - 1)).toBeLessThan(0.03);
    }
  });

  it('flags a 5 ms bad pick and keeps it out of the line', () => {
    const pts = segmentedPoints(OFFSETS, TWO, [14.4]);
    pts[20] = { ...pts[20], timeMs: pts[20].timeMs + 5 };
    const fit = robustSegmentedFit(pts, 2)!;
    expect(fit.outlier[20]).toBe(true);
    expect(fit.outlier.filter(Boolean)).toHaveLength(1);
    expect(1000 / fit.segments[1].slownessMsPerM).toBeCloseTo(2400, 6);
    expect(fit.segments[1].interceptMs).toBeCloseTo(18, 6);
    expect(fit.segments[1].count).toBe(fit.segments[1].end - fit.segments[1].start - 1);
  });

  it('prefers (by BIC) two segments on two-segment data and three on three-segment data, with 0.2 ms noise', () => {
    const rng = mulberry32(7);
    const noisy = (pts: FitPoint[]): FitPoint[] => pts.map((p) => ({ ...p, timeMs: p.timeMs + 0.2 * gaussian(rng) }));
    const two = noisy(segmentedPoints(OFFSETS, TWO, [14.4]));
    expect(robustSegmentedFit(two, 2)!.bic).toBeLessThan(robustSegmentedFit(two, 1)!.bic);
    const three3 = robustSegmentedFit(two, 3);
    if (three3) expect(robustSegmentedFit(two, 2)!.bic).toBeLessThan(three3.bic);
    const three = noisy(
      segmentedPoints(OFFSETS, [
        { velocity: 500, interceptMs: 0 },
        { velocity: 1500, interceptMs: 11.3 },
        { velocity: 4000, interceptMs: 21.8 },
      ], [8.5, 25.2]),
    );
    expect(robustSegmentedFit(three, 3)!.bic).toBeLessThan(robustSegmentedFit(three, 2)!.bic);
  });
});

describe('bicScore', () => {
  it('stays finite for a perfect fit and penalises extra segments', () => {
    expect(Number.isFinite(bicScore(0, 20, 2))).toBe(true);
    expect(bicScore(0, 20, 3)).toBeGreaterThan(bicScore(0, 20, 2));
    expect(bicScore(10, 20, 2)).toBeGreaterThan(bicScore(1, 20, 2));
  });
});
