/**
 * Reference checks of the generalised reciprocal method (engine/grm/; Palmer, "The
 * generalized reciprocal method of seismic refraction interpretation", SEG, 1980; Palmer,
 * Geophysics 46, 1981, 1508–1518).
 *
 * Lines: closed-form head waves over planar refractors (engine/forward/planar-refractor.ts;
 * Kearey, Brooks & Hill 2002, ch. 5; Telford, Geldart & Sheriff 1990, ch. 4) and the
 * engine's eikonal solver (engine/forward/eikonal.ts) through undulating refractors, on the
 * structure tests' layout (48 geophones at 2 m, seven shots). Noise-free picks.
 */
import { describe, expect, it } from 'vitest';
import { interpret, interpretGrmAtXy } from '../../engine/pipeline/interpret.js';
import { verticalDepthToRefractor, type PlanarRefractorModel } from '../../engine/forward/planar-refractor.js';
import { syntheticSurvey } from '../../engine/forward/synthetic.js';
import type { LayeredModel, ModelPoint } from '../../engine/forward/model.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import { fiveShotLayout, planarSurvey } from '../helpers/planar-survey.js';
import { CELL_M, LAYOUT, SEVEN_SHOTS, SPACING_M, level, trueDepthM } from './structure-lines.js';

/** The tolerance for depths on forward-modelled lines (issue 13). */
const DEPTH_TOLERANCE = 0.05;
const NO_RESIDUALS = { residuals: false };

const planarCases: { name: string; model: PlanarRefractorModel; ground: (x: number) => number }[] = [
  { name: 'flat refractor', model: { v1: 600, v2: 2400, refractorElevationAtZero: 92, dipDegrees: 0 }, ground: () => 100 },
  { name: 'refractor dipping 5° toward +x', model: { v1: 600, v2: 2400, refractorElevationAtZero: 94, dipDegrees: 5 }, ground: () => 100 },
  { name: 'refractor dipping 8° toward −x under falling ground', model: { v1: 800, v2: 3000, refractorElevationAtZero: 85, dipDegrees: -8 }, ground: (x) => 100 - 0.03 * x },
];

/** A refractor `depthM` below level ground with one low rise of `riseM` (Gaussian, half-width `widthM`) at x0. */
function risingTop(depthM: number, riseM: number, x0: number, widthM: number): ModelPoint[] {
  const pts: ModelPoint[] = [{ x: -1000, elevation: -depthM }];
  for (let x = -40; x <= 140; x += 1) pts.push({ x, elevation: -depthM + riseM * Math.exp(-(((x - x0) / widthM) ** 2)) });
  pts.push({ x: 1000, elevation: -depthM });
  return pts;
}

/** A refractor undulating ±`amplitudeM` about `depthM` with wavelength `wavelengthM`. */
function undulatingTop(depthM: number, amplitudeM: number, wavelengthM: number): ModelPoint[] {
  const pts: ModelPoint[] = [{ x: -1000, elevation: -depthM }];
  for (let x = -40; x <= 140; x += 1) pts.push({ x, elevation: -depthM + amplitudeM * Math.sin((2 * Math.PI * x) / wavelengthM) });
  pts.push({ x: 1000, elevation: -depthM });
  return pts;
}

const eikonalCases: { name: string; model: LayeredModel }[] = [
  { name: 'undulating refractor (±1.5 m, 40 m wavelength)', model: { surface: level(0), layers: [{ velocity: 600 }, { velocity: 2400, top: undulatingTop(8, 1.5, 40) }] } },
  { name: 'flat refractor with a low rise', model: { surface: level(0), layers: [{ velocity: 1000 }, { velocity: 2500, top: risingTop(10, 1.5, 47, 6) }] } },
];

const eikonalLine = (model: LayeredModel) => syntheticSurvey(model, { ...LAYOUT, shots: SEVEN_SHOTS }, { cellM: CELL_M });

/** Every station field the two results share, for a to-the-rounding comparison. */
const stationNumbers = (r: Interpretation) => r.stations.map((s) => [s.x, s.delayTime, s.depth, s.refractorElevation, s.depths, s.refractorVelocity]);

describe('GRM at XY = 0 is the plus-minus result (Palmer 1980: t_G at XY = 0 is half the plus time of Hagedoorn 1959)', () => {
  for (const c of planarCases) {
    it(`closed form, ${c.name}`, () => {
      const survey = { ...planarSurvey(c.model, fiveShotLayout({ ground: c.ground })), options: NO_RESIDUALS };
      const pm = interpret(survey);
      const grm0 = interpretGrmAtXy(survey, 0);
      expect(grm0.method).toBe('grm');
      expect(stationNumbers(grm0)).toEqual(stationNumbers(pm));
      expect(grm0.refractorVelocity).toEqual(pm.refractorVelocity);
      expect(grm0.grm?.optimumXy).toBe(0);
    });
  }
  it('eikonal, undulating refractor', () => {
    const survey = { ...eikonalLine(eikonalCases[0].model), options: NO_RESIDUALS };
    expect(stationNumbers(interpretGrmAtXy(survey, 0))).toEqual(stationNumbers(interpret(survey)));
  });
});

describe('GRM depths within 5 % of the model (issue 13; Palmer 1980 depth conversion factor)', () => {
  for (const c of planarCases) {
    it(`closed form, ${c.name}`, () => {
      const survey = { ...planarSurvey(c.model, fiveShotLayout({ ground: c.ground })), options: { ...NO_RESIDUALS, method: 'grm' as const } };
      const r = interpret(survey);
      expect(r.method).toBe('grm');
      for (const s of r.stations) {
        const truth = verticalDepthToRefractor(c.model, { x: s.x, elevation: s.elevation });
        expect(s.depth, `depth at x = ${s.x}`).not.toBeNull();
        expect(Math.abs(s.depth! - truth) / truth, `depth at x = ${s.x}`).toBeLessThanOrEqual(DEPTH_TOLERANCE);
      }
    });
  }
  for (const c of eikonalCases) {
    it(`eikonal, ${c.name}`, () => {
      const survey = { ...eikonalLine(c.model), options: NO_RESIDUALS };
      const pm = interpret(survey);
      const r = interpret({ ...survey, options: { ...NO_RESIDUALS, method: 'grm' } });
      let checked = 0;
      for (let i = 0; i < r.stations.length; i++) {
        const s = r.stations[i];
        // GRM covers at least what plus-minus covers (its ends fall back to shorter XYs).
        if (pm.stations[i].depth !== null) expect(s.depth, `depth at x = ${s.x}`).not.toBeNull();
        if (s.depth === null) continue;
        const truth = trueDepthM(c.model, s.x);
        expect(Math.abs(s.depth - truth) / truth, `depth at x = ${s.x}`).toBeLessThanOrEqual(DEPTH_TOLERANCE);
        checked++;
      }
      expect(checked).toBeGreaterThanOrEqual(40);
    });
  }
});

describe('optimum XY near 2·z·tan(ic) for a flat refractor (Palmer 1980)', () => {
  it('over a planar refractor every XY gives the same time-depths, so none is preferred and XY = 0 is kept (Palmer 1980: the delay-time split is exact for a plane)', () => {
    const c = planarCases[0];
    const r = interpret({ ...planarSurvey(c.model, fiveShotLayout()), options: { ...NO_RESIDUALS, method: 'grm' } });
    const fns = r.grm!.xyFunctions;
    expect(fns.length).toBeGreaterThanOrEqual(5);
    const tg = fns.flatMap((f) => f.stations.map((s) => s.timeDepth)).filter((t): t is number => t !== null);
    expect(Math.max(...tg) - Math.min(...tg)).toBeLessThanOrEqual(0.02);
    expect(r.grm!.optimumXy).toBe(0);
  });
  // Seeded Gaussian pick noise (engine/forward/synthetic.ts); the picks' σ given as pickUncertaintyMs.
  for (const noiseMs of [0.1, 0.25]) {
    it(`with ${noiseMs} ms of pick noise (seeds 1–3), z = 10 m: within one geophone interval, depths within 5 %`, () => {
      const depthM = 10;
      const expected = (2 * depthM * 1000) / Math.sqrt(2500 * 2500 - 1000 * 1000);
      const model: LayeredModel = { surface: level(0), layers: [{ velocity: 1000 }, { velocity: 2500, top: risingTop(depthM, 1.5, 47, 6) }] };
      for (const seed of [1, 2, 3]) {
        const line = syntheticSurvey(model, { ...LAYOUT, shots: SEVEN_SHOTS }, { cellM: CELL_M, noiseMs, seed });
        const r = interpret({ ...line, options: { ...NO_RESIDUALS, method: 'grm', pickUncertaintyMs: noiseMs } });
        console.log(`[grm] noise ${noiseMs} ms, seed ${seed}: optimum XY ${r.grm!.optimumXy} m (2·z·tan(ic) = ${expected.toFixed(2)} m)`);
        expect(Math.abs(r.grm!.optimumXy - expected), `seed ${seed}`).toBeLessThanOrEqual(SPACING_M);
        for (const s of r.stations) {
          if (s.depth === null) continue;
          const truth = trueDepthM(model, s.x);
          expect(Math.abs(s.depth - truth) / truth, `seed ${seed}, x = ${s.x}`).toBeLessThanOrEqual(DEPTH_TOLERANCE);
        }
      }
    });
  }
  // Flat at depth z with one low rise (1.5 m) so XY matters: where the rays to X and Y leave
  // the refractor at different points, the rise shows in t_V; at XY = 2·z·tan(ic) it cancels.
  for (const depthM of [6, 10, 14]) {
    it(`z = ${depthM} m, V1 = 1000 m/s, V2 = 2500 m/s: within one geophone interval (${SPACING_M} m)`, () => {
      const v1 = 1000;
      const v2 = 2500;
      const expected = (2 * depthM * v1) / Math.sqrt(v2 * v2 - v1 * v1); // 2·z·tan(ic), sin(ic) = V1/V2
      const model: LayeredModel = { surface: level(0), layers: [{ velocity: v1 }, { velocity: v2, top: risingTop(depthM, 1.5, 47, 6) }] };
      const r = interpret({ ...eikonalLine(model), options: { ...NO_RESIDUALS, method: 'grm' } });
      const grm = r.grm!;
      console.log(`[grm] z = ${depthM} m: optimum XY ${grm.optimumXy} m, 2·z·tan(ic) = ${expected.toFixed(2)} m, from the plus-minus depths ${grm.expectedOptimumXy} m`);
      expect(Math.abs(grm.optimumXy - expected)).toBeLessThanOrEqual(SPACING_M);
      // The range brackets the expectation, with room on both sides to judge.
      const xys = grm.xyFunctions.map((f) => f.xy);
      expect(xys[0]).toBe(0);
      expect(xys[xys.length - 1]).toBeGreaterThan(expected + SPACING_M);
    });
  }
});
