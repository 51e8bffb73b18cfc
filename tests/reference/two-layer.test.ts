/**
 * Reference checks of the plus-minus pipeline on closed-form two-layer travel times.
 *
 * Source of the times: head wave over a planar refractor t = (dA + dB)·cos(ic)/V1 + L/V2,
 * direct wave t = |AB|/V1 (Kearey, Brooks & Hill, An Introduction to Geophysical
 * Exploration, 3rd ed., 2002, ch. 5; Telford, Geldart & Sheriff, Applied Geophysics,
 * 2nd ed., 1990, ch. 4), as coded in engine/forward/planar-refractor.ts.
 * Source of the method under test: Hagedoorn, Geophysical Prospecting 7, 1959 (plus-minus,
 * delay time T+/2, V2 from T−, depth from the envelope of arcs).
 *
 * Layout: five shots (off-end, end, mid-spread, end, off-end), 24 geophones at 3 m.
 * Noise-free picks; every geophone must get a depth within 2 % of the model's vertical
 * depth, V2 within 2 %, and the dip within 0.5°.
 */
import { describe, expect, it } from 'vitest';
import { interpret } from '../../engine/pipeline/interpret.js';
import {
  headWaveTimeMs,
  verticalDepthToRefractor,
  type PlanarRefractorModel,
} from '../../engine/forward/planar-refractor.js';
import { fiveShotLayout, planarSurvey } from '../helpers/planar-survey.js';

/** Relative tolerance of depth and V2 on noise-free closed-form times (the brief's 2 %). */
const RELATIVE_TOLERANCE = 0.02;
/** Tolerance of the dip, degrees. */
const DIP_TOLERANCE_DEGREES = 0.5;

interface Case {
  name: string;
  model: PlanarRefractorModel;
  ground: (xM: number) => number;
}

const cases: Case[] = [
  { name: 'flat refractor, flat ground', model: { v1: 600, v2: 2400, refractorElevationAtZero: 92, dipDegrees: 0 }, ground: () => 100 },
  { name: 'refractor dipping 5° toward +x', model: { v1: 600, v2: 2400, refractorElevationAtZero: 94, dipDegrees: 5 }, ground: () => 100 },
  { name: 'refractor dipping 8° toward −x', model: { v1: 600, v2: 2400, refractorElevationAtZero: 88, dipDegrees: -8 }, ground: () => 100 },
  {
    name: 'refractor dipping 5° under ground rising 4 % toward +x',
    model: { v1: 600, v2: 2400, refractorElevationAtZero: 94, dipDegrees: 5 },
    ground: (x) => 100 + 0.04 * x,
  },
  {
    name: 'refractor dipping 8° toward −x under ground falling 3 % toward +x',
    model: { v1: 800, v2: 3000, refractorElevationAtZero: 85, dipDegrees: -8 },
    ground: (x) => 100 - 0.03 * x,
  },
];

describe('two-layer reference (closed form: Kearey, Brooks & Hill 2002 ch. 5; Telford et al. 1990 ch. 4)', () => {
  for (const c of cases) {
    describe(c.name, () => {
      const layout = fiveShotLayout({ ground: c.ground });
      const survey = planarSurvey(c.model, layout);
      const result = interpret(survey);

      it('gives every geophone a vertical depth within 2 % of the model', () => {
        expect(result.stations).toHaveLength(layout.geophoneXsM.length);
        for (const s of result.stations) {
          const truth = verticalDepthToRefractor(c.model, { x: s.x, elevation: s.elevation });
          expect(s.depth, `depth at x = ${s.x}`).not.toBeNull();
          expect(Math.abs((s.depth as number) - truth) / truth, `depth at x = ${s.x}`).toBeLessThanOrEqual(RELATIVE_TOLERANCE);
          expect(s.refractorElevation as number).toBeCloseTo(s.elevation - (s.depth as number), 6);
        }
      });

      it('gives V2 within 2 % from the minus times, under every geophone and in the layers', () => {
        const fit = result.velocityAnalysis.minusTimeVelocity;
        expect(fit).not.toBeNull();
        expect(Math.abs(fit!.velocity - c.model.v2) / c.model.v2).toBeLessThanOrEqual(RELATIVE_TOLERANCE);
        expect(result.layers).toHaveLength(2);
        expect(Math.abs(result.layers[1].velocity - c.model.v2) / c.model.v2).toBeLessThanOrEqual(RELATIVE_TOLERANCE);
        expect(Math.abs(result.layers[0].velocity - c.model.v1) / c.model.v1).toBeLessThanOrEqual(RELATIVE_TOLERANCE);
        for (const s of result.stations) {
          expect(Math.abs((s.refractorVelocity as number) - c.model.v2) / c.model.v2, `V2 at x = ${s.x}`).toBeLessThanOrEqual(
            RELATIVE_TOLERANCE,
          );
        }
      });

      it('gives the dip within 0.5°', () => {
        expect(result.features.dip).not.toBeNull();
        expect(Math.abs(result.features.dip!.degrees - c.model.dipDegrees)).toBeLessThanOrEqual(DIP_TOLERANCE_DEGREES);
      });

      it('reports no coverage gap and no failed reciprocal check between the end shots', () => {
        expect(result.qc.warnings.filter((w) => w.code === 'no-coverage')).toEqual([]);
        const ends = result.qc.reciprocal.find((r) => r.shots[0] === 'W-end' && r.shots[1] === 'E-end');
        expect(ends?.ok).toBe(true);
      });

      it('has reciprocal closed-form times: tAB = tBA', () => {
        const a = { x: layout.shots[1].xM, elevation: c.ground(layout.shots[1].xM) };
        const b = { x: layout.shots[3].xM, elevation: c.ground(layout.shots[3].xM) };
        const ab = headWaveTimeMs(c.model, a, b);
        const ba = headWaveTimeMs(c.model, b, a);
        expect(ab).not.toBeNull();
        expect(ab as number).toBeCloseTo(ba as number, 9);
      });
    });
  }
});
