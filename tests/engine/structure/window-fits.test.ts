/**
 * The running-sum window fits (engine/structure/window-fits.ts) give the numbers of the
 * straightforward normal-equations fit (engine/structure/least-squares.ts) on random,
 * seeded data: coefficients, variances and RSS to 1e-9 relative.
 */
import { describe, expect, it } from 'vitest';
import { leastSquares } from '../../../engine/structure/least-squares.js';
import { addColumn, bestKinkRss, addColumnOnePass, fitWindowLineOnePass, fitWindowLine, windowEnd, windowStart, type ColumnFit, type WindowLine } from '../../../engine/structure/window-fits.js';
import { gaussian, mulberry32 } from '../../helpers/random.js';

/** Agreement asked of the running-sum fits against the dense solve, relative. */
const RELATIVE = 1e-9;

function expectClose(actual: number, expected: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(RELATIVE * Math.max(Math.abs(expected), 1e-300));
}

/** A random sorted profile: n points with random gaps, a line, a kink or a ramp, and noise. */
function randomProfile(rng: () => number, n: number): { x: number[]; y: number[] } {
  const x: number[] = [];
  let at = 1000 * rng() - 500;
  for (let i = 0; i < n; i++) {
    at += 0.5 + 4 * rng();
    x.push(at);
  }
  const a = 50 * rng();
  const b = rng() - 0.5;
  const hinge = x[Math.floor(n * rng())];
  const d = rng() - 0.5;
  const noise = 0.01 + rng();
  const y = x.map((xi) => a + b * xi + d * Math.max(xi - hinge, 0) + noise * gaussian(rng));
  return { x, y };
}

const newLine = (): WindowLine => ({ n: 0, uMean: 0, yMean: 0, sxx: 0, slope: 0, rss: 0, sumU2: 0 });

describe('window fits against the dense least-squares fit', () => {
  it('fitWindowLine: slope and RSS of the line equal the normal equations (200 random windows)', () => {
    const rng = mulberry32(901);
    for (let trial = 0; trial < 200; trial++) {
      const { x, y } = randomProfile(rng, 5 + Math.floor(60 * rng()));
      const lo = Math.floor(rng() * (x.length - 4));
      const hi = lo + 3 + Math.floor(rng() * (x.length - lo - 3));
      const origin = x[lo] + rng() * (x[hi - 1] - x[lo]);
      const line = newLine();
      expect(fitWindowLine(x, y, lo, hi, origin, line)).toBe(true);
      const rows = x.slice(lo, hi).map((xi) => [1, xi - origin]);
      const dense = leastSquares(rows, y.slice(lo, hi));
      expect(dense).not.toBeNull();
      expectClose(line.slope, dense!.coefficients[1]);
      expectClose(line.rss, dense!.rss);
    }
  });

  it('addColumn: coefficient, its unscaled variance and the RSS of line + ramp equal the normal equations (200 random windows)', () => {
    const rng = mulberry32(902);
    const column = new Float64Array(100);
    const fit: ColumnFit = { rss: 0, coefficient: 0, unscaledVariance: 0 };
    for (let trial = 0; trial < 200; trial++) {
      const { x, y } = randomProfile(rng, 8 + Math.floor(60 * rng()));
      const lo = Math.floor(rng() * (x.length - 6));
      const hi = Math.min(x.length, lo + 6 + Math.floor(rng() * 40));
      const c = x[lo] + (0.2 + 0.6 * rng()) * (x[hi - 1] - x[lo]);
      const width = 1 + 20 * rng();
      const ramp = (u: number): number => 1 / (1 + Math.exp((-4 * u) / width));
      for (let i = lo; i < hi; i++) column[i - lo] = ramp(x[i] - c);
      const line = newLine();
      expect(fitWindowLine(x, y, lo, hi, c, line)).toBe(true);
      expect(addColumn(x, y, lo, c, line, column, fit)).toBe(true);
      const dense = leastSquares(x.slice(lo, hi).map((xi) => [1, xi - c, ramp(xi - c)]), y.slice(lo, hi));
      expect(dense).not.toBeNull();
      expectClose(fit.coefficient, dense!.coefficients[2]);
      expectClose(fit.unscaledVariance, dense!.unscaledCovariance[2][2]);
      expectClose(fit.rss, dense!.rss);
    }
  });

  it('fitWindowLineOnePass and addColumnOnePass: line and line + ramp column in one pass each equal the normal equations (300 random windows, unit steps included)', () => {
    const rng = mulberry32(903);
    const fit: ColumnFit = { rss: 0, coefficient: 0, unscaledVariance: 0 };
    for (let trial = 0; trial < 300; trial++) {
      const { x, y } = randomProfile(rng, 8 + Math.floor(60 * rng()));
      const lo = Math.floor(rng() * (x.length - 6));
      const hi = Math.min(x.length, lo + 6 + Math.floor(rng() * 40));
      const c = x[lo] + (0.2 + 0.6 * rng()) * (x[hi - 1] - x[lo]);
      const width = trial % 10 === 0 ? 0 : 1 + 20 * rng();
      const ramp = (u: number): number => (width > 0 ? 1 / (1 + Math.exp((-4 * u) / width)) : u >= 0 ? 1 : 0);
      const line = newLine();
      const column = Float64Array.from({ length: hi - lo + 3 }, (_, j) => (j < 3 ? NaN : ramp(x[lo + j - 3] - c)));
      expect(fitWindowLineOnePass(x, y, lo, hi, c, line)).toBe(true);
      expect(addColumnOnePass(x, y, lo, c, line, column, lo - 3, fit)).toBe(true);
      const lineDense = leastSquares(x.slice(lo, hi).map((xi) => [1, xi - c]), y.slice(lo, hi));
      const dense = leastSquares(x.slice(lo, hi).map((xi) => [1, xi - c, ramp(xi - c)]), y.slice(lo, hi));
      expect(lineDense).not.toBeNull();
      expect(dense).not.toBeNull();
      expectClose(line.slope, lineDense!.coefficients[1]);
      expectClose(line.yMean + line.slope * (0 - line.uMean), lineDense!.coefficients[0]);
      expectClose(line.rss, lineDense!.rss);
      expectClose(fit.coefficient, dense!.coefficients[2]);
      expectClose(fit.unscaledVariance, dense!.unscaledCovariance[2][2]);
      expectClose(fit.rss, dense!.rss);
    }
  });

  it('addColumn refuses a column that is a line over the window, as the dense fit does', () => {
    const x = [0, 1, 2, 3, 4, 5];
    const y = [0.3, 1.1, 1.9, 3.2, 4.1, 4.8];
    const line = newLine();
    fitWindowLine(x, y, 0, 6, 2.5, line);
    const column = Float64Array.from(x, (xi) => 2 * xi + 1);
    expect(addColumn(x, y, 0, 2.5, line, column, { rss: 0, coefficient: 0, unscaledVariance: 0 })).toBe(false);
    expect(leastSquares(x.map((xi, i) => [1, xi - 2.5, column[i]]), y)).toBeNull();
  });

  it('bestKinkRss: the least RSS over every hinge equals the dense fit at each hinge, minimised (200 random windows)', () => {
    const rng = mulberry32(903);
    for (let trial = 0; trial < 200; trial++) {
      const { x, y } = randomProfile(rng, 6 + Math.floor(50 * rng()));
      const lo = Math.floor(rng() * (x.length - 5));
      const hi = lo + 5 + Math.floor(rng() * (x.length - lo - 5));
      const c = x[lo] + rng() * (x[hi - 1] - x[lo]);
      const line = newLine();
      fitWindowLine(x, y, lo, hi, c, line);
      const u = x.slice(lo, hi).map((xi) => xi - c);
      const ys = y.slice(lo, hi);
      let dense = Infinity;
      for (let k = 0; k < u.length; k++) {
        for (const h of k + 1 < u.length ? [u[k], 0.5 * (u[k] + u[k + 1])] : [u[k]]) {
          const f = leastSquares(u.map((ui) => [1, ui, Math.max(ui - h, 0)]), ys);
          if (f && f.rss < dense) dense = f.rss;
        }
      }
      expect(Number.isFinite(dense)).toBe(true);
      expectClose(bestKinkRss(x, y, lo, hi, c, line), dense);
    }
  });

  it('windowStart / windowEnd bound exactly the points with |x − c| ≤ reach', () => {
    const rng = mulberry32(904);
    for (let trial = 0; trial < 200; trial++) {
      const { x } = randomProfile(rng, 1 + Math.floor(40 * rng()));
      const c = x[0] - 5 + rng() * (x[x.length - 1] - x[0] + 10);
      const reach = 30 * rng();
      const inside = x.map((xi, i) => (Math.abs(xi - c) <= reach ? i : -1)).filter((i) => i >= 0);
      const lo = windowStart(x, c, reach);
      const hi = windowEnd(x, c, reach);
      expect(Array.from({ length: Math.max(0, hi - lo) }, (_, j) => lo + j)).toEqual(inside);
    }
  });
});
