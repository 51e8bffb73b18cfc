/**
 * Where methods differ beyond their uncertainty (engine/compare/method-comparison.ts): two
 * depths differ when |z_a − z_b| > √(σ_a² + σ_b²), the standard error of a difference of
 * independent quantities (Bevington & Robinson 2003, ch. 3); stretches of consecutive
 * stations, split where the deeper method changes. And the overlay figure draws each run.
 */
import { describe, expect, it } from 'vitest';
import { differsBeyondSigma, methodDifferences, type MethodRun } from '../../../engine/compare/method-comparison.js';
import { renderMethodComparison } from '../../../engine/render/method-comparison.js';
import { interpret } from '../../../engine/pipeline/interpret.js';
import type { Interpretation } from '../../../engine/output/interpretation.js';
import type { MethodName } from '../../../engine/survey/survey.js';
import { fiveShotLayout, planarSurvey } from '../../helpers/planar-survey.js';

/** A run whose stations carry only what the comparison reads. */
function run(method: MethodName, depths: (number | null)[], sigma: number, ran = true): MethodRun {
  const stations = depths.map((depth, i) => ({ x: 2 * i, elevation: 100, depth, depthUncertainty: depth === null ? null : sigma }));
  return { method, ran, interpretation: { method, stations, qc: { warnings: [] } } as unknown as Interpretation };
}

describe('differsBeyondSigma', () => {
  it('flags |Δ| above √(σa² + σb²) and not at or below it', () => {
    // σ = √(0.3² + 0.4²) = 0.5 m (a 3-4-5 triangle).
    expect(differsBeyondSigma({ depth: 10, depthUncertainty: 0.3 }, { depth: 10.51, depthUncertainty: 0.4 })).toBe(true);
    expect(differsBeyondSigma({ depth: 10, depthUncertainty: 0.3 }, { depth: 10.49, depthUncertainty: 0.4 })).toBe(false);
    expect(differsBeyondSigma({ depth: 10, depthUncertainty: null }, { depth: 20, depthUncertainty: 0.4 })).toBe(false);
    expect(differsBeyondSigma({ depth: null, depthUncertainty: 0.3 }, { depth: 20, depthUncertainty: 0.4 })).toBe(false);
  });
});

describe('methodDifferences', () => {
  it('groups consecutive flagged stations, splits where the deeper method changes, gives the largest and its σ', () => {
    const runs = [
      run('plus-minus', [10, 10, 10, 10, 10, 10, 10], 0.3),
      run('grm', [10, 11, 12, 10, 9, 9, 10], 0.4),
      run('time-term', [10, 10, 10, 10, 10, 10, 10], 0.4, false),
    ];
    const d = methodDifferences(runs);
    // time-term did not run: only plus-minus / GRM is compared.
    expect(d.map((s) => [s.methods.join('/'), s.from, s.to, s.stations, s.largest, s.atX, s.deeperBy])).toEqual([
      ['plus-minus/grm', 2, 4, 2, 2, 4, 'grm'],
      ['plus-minus/grm', 8, 10, 2, 1, 8, 'plus-minus'],
    ]);
    expect(d[0].combinedSigma).toBe(0.5);
  });
});

describe('renderMethodComparison', () => {
  it('draws one refractor per method that ran, in distinct dash patterns, and says which did not run', () => {
    const survey = planarSurvey({ v1: 600, v2: 2400, refractorElevationAtZero: 92, dipDegrees: 3 }, fiveShotLayout());
    const runs: MethodRun[] = (['plus-minus', 'grm', 'time-term'] as const).map((method) => {
      const interpretation = interpret({ ...survey, options: { method, residuals: false } });
      return { method, ran: method !== 'grm', interpretation };
    });
    const svg = renderMethodComparison(survey, { runs, differences: methodDifferences(runs) });
    expect(svg).toContain('data-method="plus-minus"');
    expect(svg).toContain('data-role="method-refractor" data-method="time-term"');
    expect(svg).not.toContain('data-role="method-refractor" data-method="grm"');
    expect(svg).toContain('generalised reciprocal method: not run on this line');
    expect(svg).toContain('stroke-dasharray="0.05 1.1"');
  });
});
