/**
 * Reference checks of the slope-intercept dipping-layer formulas against closed-form
 * first arrivals over a planar dipping refractor (Kearey, Brooks & Hill, An Introduction
 * to Geophysical Exploration, 3rd ed., 2002, ch. 5; Telford, Geldart & Sheriff, Applied
 * Geophysics, 2nd ed., 1990, ch. 4). The closed form (engine/forward/planar-refractor.ts)
 * is built from ray geometry, not from the apparent-velocity formulas, so the round trip
 * tests the inversion.
 */
import { describe, expect, it } from 'vitest';
import { slopeInterceptDip, opposingPairVelocities } from '../../engine/velocities/slope-intercept.js';
import { topLayerVelocity } from '../../engine/velocities/direct-velocity.js';
import { opposingPairs } from '../../engine/velocities/opposing-pairs.js';
import { assignBranches } from '../../engine/branches/assign-branches.js';
import {
  firstArrivalMs,
  headWaveTimeMs,
  verticalDepthToRefractor,
  type PlanarRefractorModel,
} from '../../engine/forward/planar-refractor.js';
import type { Survey } from '../../engine/survey/survey.js';

const DIPS = [-8, -4, -1, 0, 1, 4, 8];
const rad = (d: number): number => (d * Math.PI) / 180;

function model(dipDegrees: number): PlanarRefractorModel {
  // Refractor 15 m below x = 70 (mid-spread) whatever the dip: 5.2–24.8 m under the ends at 8°.
  return { v1: 600, v2: 2400, refractorElevationAtZero: -15 + 70 * Math.tan(rad(dipDegrees)), dipDegrees };
}

/** Apparent velocity, m/s, from the closed-form head-wave times of one shot at two geophones. */
function apparentVelocity(m: PlanarRefractorModel, shotX: number, x1: number, x2: number): number {
  const s = { x: shotX, elevation: 0 };
  const t1 = headWaveTimeMs(m, s, { x: x1, elevation: 0 })!;
  const t2 = headWaveTimeMs(m, s, { x: x2, elevation: 0 })!;
  return (1000 * Math.abs(x2 - x1)) / (t2 - t1);
}

describe('slope-intercept inversion of closed-form apparent velocities (Kearey et al. 2002, ch. 5)', () => {
  it.each(DIPS)('dip %s°: V2 within 0.1 % and dip within 0.05°', (dip) => {
    const m = model(dip);
    const towardPlusX = apparentVelocity(m, 0, 80, 140);
    const towardMinusX = apparentVelocity(m, 140, 60, 0);
    const r = slopeInterceptDip(m.v1, towardPlusX, towardMinusX)!;
    expect(Math.abs(r.trueVelocity / m.v2 - 1)).toBeLessThan(0.001);
    expect(Math.abs(r.dipDegrees - dip)).toBeLessThan(0.05);
    expect(r.criticalAngleDegrees).toBeCloseTo((Math.asin(m.v1 / m.v2) * 180) / Math.PI, 6);
  });

  it.each(DIPS)('dip %s°: the full chain (branches → V1 → opposing end shots) gives V2 within 0.1 %, dip within 0.05°, depth under the shots within 1 %', (dip) => {
    const m = model(dip);
    const geophones = Array.from({ length: 48 }, (_, i) => ({ x: 3 * i, elevation: 0 }));
    const survey: Survey = {
      geophones,
      shots: [
        ['A', -1.5],
        ['B', 142.5],
      ].map(([id, x]) => ({
        id: id as string,
        x: x as number,
        times: geophones.map((g) => firstArrivalMs(m, { x: x as number, elevation: 0 }, g)),
      })),
    };
    const shots = assignBranches(survey);
    const v1 = topLayerVelocity(shots, survey).velocity!;
    expect(v1 / m.v1).toBeCloseTo(1, 8);
    const pairs = opposingPairs(shots);
    expect(pairs.map(([a, b]) => [a.id, b.id])).toEqual([['A', 'B']]);
    const r = opposingPairVelocities(v1, pairs[0][0], pairs[0][1])!;
    expect(Math.abs(r.trueVelocity / m.v2 - 1)).toBeLessThan(0.001);
    expect(Math.abs(r.dipDegrees - dip)).toBeLessThan(0.05);
    expect(r.downDipVelocity).toBeLessThanOrEqual(r.upDipVelocity);
    for (const d of r.depthUnderShots) {
      const x = d.shot === 'A' ? -1.5 : 142.5;
      const truth = verticalDepthToRefractor(m, { x, elevation: 0 });
      expect(Math.abs(d.verticalDepth / truth - 1)).toBeLessThan(0.01);
    }
  });
});

describe('gentle-dip forms of the true velocity', () => {
  it('2·Vd·Vu·cosθ/(Vd+Vu) equals V1/sin(ic) to rounding (Kearey et al. 2002, ch. 5: sin(ic+θ)+sin(ic−θ) = 2·sin(ic)·cosθ)', () => {
    for (const dip of [0.5, 2, 5, 10]) {
      const ic = Math.asin(600 / 2400);
      const vd = 600 / Math.sin(ic + rad(dip));
      const vu = 600 / Math.sin(ic - rad(dip));
      const r = slopeInterceptDip(600, vd, vu)!;
      expect(Math.abs(r.trueVelocityGentleDip / r.trueVelocity - 1)).toBeLessThan(1e-12);
    }
  });

  /*
   * Plain mean (Vd + Vu)/2 — the trade's rule of thumb, common practice. With a = ic+θ and
   * b = ic−θ: mean/V2 = sin ic·(1/sin a + 1/sin b)/2 = sin²ic·cosθ / (sin²ic − sin²θ), so the
   * relative excess is e(θ) = (sin²θ − sin²ic·(1 − cosθ)) / (sin²ic − sin²θ).
   * Since sin²θ = (1−cosθ)(1+cosθ) ≥ sin²ic·(1−cosθ), e ≥ 0, and e ≤ B(θ) = sin²θ/(sin²ic − sin²θ);
   * for small θ, e ≈ θ²·(1 − sin²ic/2)/sin²ic. Derived here from the DESIGN.md formulas.
   */
  it.each([
    [600, 2400],
    [1500, 4500],
  ])('plain mean of Vd and Vu (common practice) over-estimates V2 by at most sin²θ/(sin²ic − sin²θ), growing with dip to 10° (V1 %s, V2 %s)', (v1, v2) => {
    const ic = Math.asin(v1 / v2);
    let previous = -1;
    for (let dip = 0; dip <= 10; dip += 0.5) {
      const th = rad(dip);
      const vd = v1 / Math.sin(ic + th);
      const vu = v1 / Math.sin(ic - th);
      const r = slopeInterceptDip(v1, vd, vu)!;
      const excess = (vd + vu) / 2 / r.trueVelocity - 1;
      const bound = Math.sin(th) ** 2 / (Math.sin(ic) ** 2 - Math.sin(th) ** 2);
      expect(excess).toBeGreaterThanOrEqual(-1e-12);
      expect(excess).toBeLessThanOrEqual(bound + 1e-12);
      if (dip > 0) expect(excess).toBeGreaterThan(previous);
      previous = excess;
    }
  });
});
