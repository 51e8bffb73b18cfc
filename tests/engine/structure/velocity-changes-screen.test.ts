/**
 * The running-sum screening of hinge positions (screenCandidates in
 * engine/structure/velocity-changes.ts) gives the RSS of the straightforward dense fit of
 * every candidate (engine/structure/least-squares.ts) on random, seeded profiles, to 1e-8
 * relative: a candidate next to a base hinge makes the new column nearly dependent and
 * the running sums cancel (worst measured 1.5e-9). That is 100× inside the screen's cutoff
 * margin (1e-6·RSS_base): the screen only chooses which candidates get the dense fit, and
 * the fit returned is always the dense one.
 */
import { describe, expect, it } from 'vitest';
import { leastSquares } from '../../../engine/structure/least-squares.js';
import { screenCandidates } from '../../../engine/structure/velocity-changes.js';
import { gaussian, mulberry32 } from '../../helpers/random.js';

/**
 * RSS of the dense normal-equations fit, with one step of iterative refinement (the
 * correction solved from the residuals with the same (AᵀA)⁻¹; Golub & Van Loan, Matrix
 * Computations, 4th ed., 2013, §3.5.3): the plain solve loses about κ(AᵀA)·ε in the
 * coefficients, which shows in the RSS at the 1e-9 level on the longer random profiles.
 */
function denseRss(x: number[], y: number[], knots: number[], xMean: number): number | null {
  const rows = x.map((xi) => [1, xi - xMean, ...knots.map((k) => Math.max(0, xi - k))]);
  const fit = leastSquares(rows, y);
  if (!fit) return null;
  const p = rows[0].length;
  const residual = (beta: number[]): number[] => rows.map((r, i) => y[i] - r.reduce((s, v, j) => s + v * beta[j], 0));
  const r0 = residual(fit.coefficients);
  const atr = Array.from({ length: p }, (_, j) => rows.reduce((s, r, i) => s + r[j] * r0[i], 0));
  const beta = fit.coefficients.map((b, j) => b + fit.unscaledCovariance[j].reduce((s, c, k) => s + c * atr[k], 0));
  return residual(beta).reduce((s, v) => s + v * v, 0);
}

describe('screenCandidates against the dense hinge fit', () => {
  it('screened RSS of every candidate equals the dense RSS with that hinge added (150 random profiles, 0–3 base hinges)', () => {
    const rng = mulberry32(4711);
    let compared = 0;
    for (let trial = 0; trial < 150; trial++) {
      const n = 12 + Math.floor(rng() * 150);
      const x: number[] = [];
      let at = 2000 * rng();
      for (let i = 0; i < n; i++) x.push((at += 0.5 + 3 * rng()));
      const xMean = x.reduce((a, b) => a + b, 0) / n;
      const baseCount = Math.floor(rng() * 4);
      const base = Array.from({ length: baseCount }, () => x[2 + Math.floor(rng() * (n - 4))] + 0.25).sort((a, b) => a - b);
      const truth = x[Math.floor(rng() * n)];
      const y = x.map((xi) => 5 + 0.8 * (xi - xMean) + 0.3 * Math.max(0, xi - truth) + (0.05 + rng()) * gaussian(rng));
      const candidates = x.slice(1, -1).filter((c) => !base.some((k) => Math.abs(k - c) < 1e-9));
      const screened = screenCandidates(x, y, base, xMean, candidates);
      if (screened === null) {
        // Only a singular base design (two base hinges together) is refused.
        expect(denseRss(x, y, base, xMean)).toBeNull();
        continue;
      }
      candidates.forEach((c, m) => {
        const dense = denseRss(x, y, [...base, c].sort((a, b) => a - b), xMean);
        if (dense === null) return;
        expect(Math.abs(screened.rss[m] - dense)).toBeLessThanOrEqual(1e-8 * dense);
        compared++;
      });
    }
    expect(compared).toBeGreaterThan(5000);
  });
});
