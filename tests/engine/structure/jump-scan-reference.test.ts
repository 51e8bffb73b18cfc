/**
 * The jump scan (engine/structure/jump-scan.ts: running-sum screen, one-pass fits, shared
 * exponentials) finds what the straightforward scan finds: a dense normal-equations solve
 * of the line, step and kink models for every centre, width and hinge
 * (bench/former/jump-scan.ts, engine/structure/least-squares.ts). Same detections, same
 * centres and widths, jumps and statistics to 1e-6 relative, on seeded random profiles
 * with and without steps, kinks and noise, with fixed and varying ramp widths.
 */
import { describe, expect, it } from 'vitest';
import { maxJumpStatistic, scanForJumps } from '../../../engine/structure/jump-scan.js';
import { scanForJumps as straightforwardScan } from '../../../bench/former/jump-scan.js';
import { gaussian, mulberry32 } from '../../helpers/random.js';

function randomProfile(rng: () => number): { x: number[]; y: number[]; sigma: number; w0: number } {
  const n = 20 + Math.floor(60 * rng());
  const spacing = 1 + 4 * rng();
  const x0 = 100 * rng();
  const x = Array.from({ length: n }, (_, i) => x0 + i * spacing + 0.3 * spacing * rng());
  const slope = 0.5 * rng();
  const sigma = 0.05 + 0.5 * rng();
  const w0 = spacing * (1 + 4 * rng());
  const stepAt = x[Math.floor(n * (0.2 + 0.6 * rng()))];
  const jump = rng() < 0.5 ? 0 : (rng() < 0.5 ? -1 : 1) * sigma * (2 + 10 * rng());
  const kinkAt = x[Math.floor(n * rng())];
  const kink = rng() < 0.5 ? 0 : 0.2 * (rng() - 0.5);
  const y = x.map((xi) => 10 + slope * xi + jump / (1 + Math.exp((-4 * (xi - stepAt)) / w0)) + kink * Math.max(0, xi - kinkAt) + sigma * gaussian(rng));
  return { x, y, sigma, w0 };
}

describe('jump scan against the straightforward dense scan', () => {
  it('same detections on 150 seeded random profiles', () => {
    const rng = mulberry32(4217);
    let detections = 0;
    for (let trial = 0; trial < 150; trial++) {
      const { x, y, sigma, w0 } = randomProfile(rng);
      // Half the profiles with a ramp width that changes along them, as a varying depth makes it.
      const rampWidthAt = trial % 2 === 0 ? () => w0 : (c: number) => w0 * (1 + 0.5 * Math.sin(c / 17));
      const opts = { sigma, rampWidthAt, sidePoints: 6, minSidePoints: 3, falseAlarmProbability: 0.01 };
      const fast = scanForJumps(x, y, opts);
      const slow = straightforwardScan(x, y, opts);
      expect(fast.length).toBe(slow.length);
      fast.forEach((f, i) => {
        const s = slow[i];
        expect(f.centreM).toBeCloseTo(s.centreM, 9);
        expect(f.rampWidthM).toBeCloseTo(s.rampWidthM, 9);
        expect(Math.abs(f.jump - s.jump)).toBeLessThanOrEqual(1e-6 * Math.max(1, Math.abs(s.jump)));
        expect(Math.abs(f.statistic - s.statistic)).toBeLessThanOrEqual(1e-6 * Math.max(1, Math.abs(s.statistic)));
        expect(f.threshold).toBeCloseTo(s.threshold, 9);
      });
      detections += fast.length;
    }
    // The profiles must exercise detection, not only its absence.
    expect(detections).toBeGreaterThan(20);
  });
});

/**
 * maxJumpStatistic (branch and bound over the trials, for the Monte Carlo rock-step test,
 * engine/depth/rock-steps.ts) against the same dense scan: where the dense scan detects, its
 * strongest detection's statistic is the maximum (non-maximum suppression keeps the
 * strongest); where it detects nothing, the maximum lies at or below its Bonferroni
 * threshold. A threshold just below the maximum then gives a detection with that
 * statistic, and one just above gives none.
 */
describe('largest scan statistic against the straightforward dense scan', () => {
  it('same maximum on 150 seeded random profiles; the threshold override cuts at it', () => {
    const rng = mulberry32(9133);
    let compared = 0;
    for (let trial = 0; trial < 150; trial++) {
      const { x, y, sigma, w0 } = randomProfile(rng);
      const rampWidthAt = trial % 2 === 0 ? () => w0 : (c: number) => w0 * (1 + 0.5 * Math.sin(c / 17));
      const opts = { sigma, rampWidthAt, sidePoints: 6, minSidePoints: 3, falseAlarmProbability: 0.01 };
      const max = maxJumpStatistic(x, y, opts);
      const slow = straightforwardScan(x, y, opts);
      if (slow.length > 0) {
        const strongest = Math.max(...slow.map((d) => d.statistic));
        expect(Math.abs(max - strongest)).toBeLessThanOrEqual(1e-6 * Math.max(1, strongest));
        compared++;
      } else {
        // No detection at the Bonferroni threshold, yet one just below the maximum (below):
        // so the maximum lies under that threshold.
        expect(scanForJumps(x, y, opts)).toEqual([]);
      }
      if (max > 1) {
        const below = scanForJumps(x, y, { ...opts, threshold: max * (1 - 1e-6) });
        expect(below.some((d) => Math.abs(d.statistic - max) <= 1e-6 * max)).toBe(true);
        expect(scanForJumps(x, y, { ...opts, threshold: max * (1 + 1e-6) })).toEqual([]);
      }
    }
    expect(compared).toBeGreaterThan(20);
  });
});
