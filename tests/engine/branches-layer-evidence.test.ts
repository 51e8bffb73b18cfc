import { describe, expect, it } from 'vitest';
import { resolveOptions } from '../../engine/survey/options.js';
import {
  assignBranches,
  breaksFixedInX,
  SECOND_REFRACTOR_MIN_CONTRAST,
} from '../../engine/branches/assign-branches.js';
import { bicScore, robustSegmentedFit } from '../../engine/branches/segmented-fit.js';
import { syntheticSurvey } from '../../engine/forward/synthetic.js';
import type { LayeredModel } from '../../engine/forward/model.js';
import type { Survey } from '../../engine/survey/survey.js';

/**
 * Evidence a second refractor needs before assignBranches keeps it unforced: a bend
 * larger than the pick uncertainty (BIC with σ ≥ pick uncertainty), a clear velocity
 * contrast (common practice), and breaks at a consistent offset across shots (flat layers
 * give every shot the same crossover offset: Kearey, Brooks & Hill 2002, ch. 5).
 */
describe('bicScore with the pick uncertainty as the noise floor (Schwarz 1978; known-noise form below the floor)', () => {
  it('is continuous where the misfit meets the floor and charges the χ² below it', () => {
    const n = 24;
    const floor = 0.5;
    const atFloor = n * floor * floor;
    expect(bicScore(atFloor * (1 - 1e-9), n, 2, floor)).toBeCloseTo(bicScore(atFloor * (1 + 1e-9), n, 2, floor), 6);
    // Below the floor, 1 ms² less SSE buys exactly 1/σ² = 4 units.
    expect(bicScore(2, n, 1, floor) - bicScore(1, n, 1, floor)).toBeCloseTo(4, 9);
  });

  it('does not let a bend of 0.16 ms RMS (below a 0.5 ms pick uncertainty) pay for an extra segment', () => {
    // A gently bending curve: apparent velocity from 2300 to 2550 m/s over 69 m (like the demo line's W-off side).
    const points = Array.from({ length: 24 }, (_, i) => {
      const x = 3 * i;
      return { offsetM: x + 24, timeMs: 10 + (1000 * x) / 2300 - 0.0012 * x * x / 2.3 };
    });
    const one = robustSegmentedFit(points, 1, 0.5)!;
    const two = robustSegmentedFit(points, 2, 0.5)!;
    expect(Math.sqrt(one.clippedSseMs2 / 24)).toBeLessThan(0.5);
    expect(one.bic).toBeLessThan(two.bic);
    // With the old fixed floor of 0.05 ms the same bend would have won a second segment.
    expect(robustSegmentedFit(points, 2, 0.05)!.bic).toBeLessThan(robustSegmentedFit(points, 1, 0.05)!.bic);
  });
});

describe('breaksFixedInX', () => {
  it('calls breaks that stay at one x while the shot moves a lateral feature', () => {
    expect(breaksFixedInX([{ shotX: -14, breakX: 41, breakOffsetM: 55 }, { shotX: -1, breakX: 41, breakOffsetM: 42 }], 2)).toBe(true);
  });
  it('keeps breaks that move with the shot (same crossover offset) as a layer', () => {
    expect(breaksFixedInX([{ shotX: -14, breakX: 11, breakOffsetM: 25 }, { shotX: -1, breakX: 24, breakOffsetM: 25 }], 2)).toBe(false);
  });
  it('cannot judge from shots closer than two spacings, or from one shot', () => {
    expect(breaksFixedInX([{ shotX: 0, breakX: 41, breakOffsetM: 41 }, { shotX: 3, breakX: 41, breakOffsetM: 38 }], 2)).toBe(false);
    expect(breaksFixedInX([{ shotX: 0, breakX: 41, breakOffsetM: 41 }], 2)).toBe(false);
  });
});

describe('a lateral change of refractor velocity is not a second refractor (eikonal synthetic line)', () => {
  // Invented model: 5 m of 600 m/s over a flat refractor whose velocity steps from 2000 to 3000 m/s at x = 40 m.
  const model: LayeredModel = {
    surface: [{ x: -40, elevation: 50 }, { x: 140, elevation: 50 }],
    layers: [{ velocity: 600 }, { velocity: { contactsX: [40], velocities: [2000, 3000] }, top: [{ x: -40, elevation: 45 }, { x: 140, elevation: 45 }] }],
  };
  const survey: Survey = syntheticSurvey(model, {
    geophoneCount: 48,
    firstX: 0,
    spacing: 2,
    shots: [{ x: -14, id: 'W-off' }, { x: -1, id: 'W-end' }, { x: 47, id: 'mid' }, { x: 95, id: 'E-end' }, { x: 108, id: 'E-off' }],
  });

  it('forced to three layers, the shots shooting east break at the same x with a contrast above the threshold', () => {
    const forced = assignBranches(survey, { ...resolveOptions(survey.options), layers: 3 });
    const breaks = forced
      .filter((s) => s.right && s.right.refracted.length === 2)
      .map((s) => {
        const first2 = s.branchOfPick.findIndex((b, i) => b === 2 && survey.geophones[i].x > s.x);
        const x = survey.geophones[first2].x;
        return { shotX: s.x, breakX: x, breakOffsetM: x - s.x, ratio: s.right!.refracted[1].velocity! / s.right!.refracted[0].velocity! };
      });
    expect(breaks.length).toBeGreaterThanOrEqual(2);
    for (const b of breaks) {
      expect(Math.abs(b.breakX - 40)).toBeLessThanOrEqual(4);
      expect(b.ratio).toBeGreaterThan(SECOND_REFRACTOR_MIN_CONTRAST);
    }
    expect(breaksFixedInX(breaks, 2)).toBe(true);
  });

  it('unforced, no pick goes to a second refractor', () => {
    for (const s of assignBranches(survey)) expect(s.branchOfPick.includes(2), s.id).toBe(false);
  });
});
