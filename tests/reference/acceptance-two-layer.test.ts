/**
 * Acceptance of the whole two-layer pipeline against the eikonal forward model: lines are
 * generated through known earth models (engine/forward/synthetic.ts: fast marching,
 * Sethian 1996 / 1999, 0.25 m cells; checked against the closed forms of Kearey, Brooks &
 * Hill 2002 ch. 5 and Telford, Geldart & Sheriff 1990 ch. 4 in eikonal-closed-form.test.ts
 * to within 0.15 % of the travel time) and interpreted end to end by `interpret`, which
 * sees only the survey document, never the model.
 *
 * Layout (every case): 48 geophones at 2 m (x = 0 … 94 m); shots off-end at −30 m, at the
 * ends (−1 m, 95 m), mid-spread (47 m) and off-end at 124 m. V1 = 600 m/s, V2 = 2400 m/s.
 * Each model is run noise-free and with 0.4 ms Gaussian pick noise (seed 7).
 *
 * Acceptance (the brief's bounds, not tuned to the results):
 *  - noise-free: depth within 5 % of the model's vertical depth at every station that has
 *    a depth; with noise: 95 % of them within 5 % and none beyond 7.5 % (see
 *    NOISY_SHARE_WITHIN for why); at least 80 % of the stations with a depth;
 *  - V2 (layers[1]) within 5 %;
 *  - residual RMS near the pick noise: with 0.4 ms noise within 0.1 ms of 0.4 ms (the RMS
 *    of ~235 picks scatters by σ/√(2n) ≈ 0.02 ms; fitting ~50 delay times removes about a
 *    fifth of the variance, −0.04 ms; a model error of 0.15 ms adds +0.03 ms in
 *    quadrature); noise-free at most 0.25 ms, half the default pick uncertainty (common
 *    practice: a section fits when its misfit sits well inside the pick uncertainty).
 *
 * The engine once failed the undulating and hump cases here: reciprocal times were read by
 * extrapolating straight branch fits far beyond the picks, and curvature of one refractor
 * was read as a second refractor. Both are fixed (local reciprocal readings, a joint
 * adjustment of every pair's reciprocal time, and a second refractor only when reversed).
 *
 * Closing the loop: an interpretation forward-modelled through its own section gives new
 * picks; interpreting those must leave residuals under 0.15 ms RMS: the solver's own error
 * on these grids is ≤ 0.06 ms over a 5° dip at 0.25–0.33 m cells (docs/developers/forward.md),
 * picks and outputs are rounded to 0.01 ms / 0.01 m / 1 m/s (≤ 0.02 ms more), and the
 * interpretation of exact picks over a plane is exact to the 0.2 % above (≤ 0.05 ms).
 * Measured: 0.12 ms (flat) and 0.13 ms (dip +5°), starting from the noisy lines, whose
 * sections are rough from station to station; the plus-minus envelope of arcs smooths that
 * roughness, which is most of what remains (from the noise-free lines: 0.01 and 0.09 ms).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { interpret } from '../../engine/pipeline/interpret.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import type { Survey } from '../../engine/survey/survey.js';
import { syntheticSurvey, type SyntheticLayout } from '../../engine/forward/synthetic.js';
import type { LayeredModel, ModelPoint } from '../../engine/forward/model.js';
import { elevationAt } from '../../engine/forward/polyline.js';
import { modelFromInterpretation } from '../../engine/forward/interpretation-model.js';

const V1 = 600;
const V2 = 2400;
const NOISE_MS = 0.4;
const SEED = 7;
const CELL_M = 0.25;
/** The brief's bounds. */
const DEPTH_TOLERANCE = 0.05;
const V2_TOLERANCE = 0.05;
const MIN_DEPTH_COVERAGE = 0.8;
/**
 * With 0.4 ms pick noise one station's delay time scatters by about σ/√2 per pair, i.e.
 * ≈ 0.2 ms over the 2–6 pairs here, or ≈ 0.15 m ≈ 2.3 % of a 6.5 m depth (z = Δt·V1/cos ic);
 * the largest of 48 such errors is then ≈ 2.5 σ ≈ 6 % by chance alone. So with noise the
 * 5 % bound holds for 95 % of the stations, and no station may be off by more than 7.5 %.
 */
const NOISY_SHARE_WITHIN = 0.95;
const NOISY_MAX_DEPTH_ERROR = 0.075;
const NOISY_RMS_BAND_MS = 0.1;
const NOISE_FREE_RMS_MAX_MS = 0.25;
const SELF_CONSISTENT_RMS_MAX_MS = 0.15;

const LAYOUT: SyntheticLayout = {
  geophoneCount: 48,
  firstX: 0,
  spacing: 2,
  shots: [
    { id: 'W-off', x: -30 },
    { id: 'W-end', x: -1 },
    { id: 'mid', x: 47 },
    { id: 'E-end', x: 95 },
    { id: 'E-off', x: 124 },
  ],
};

const TAN5 = Math.tan((5 * Math.PI) / 180);

/** A polyline sampled every metre over the modelled section. */
function sampled(f: (x: number) => number): ModelPoint[] {
  const points: ModelPoint[] = [];
  for (let x = -40; x <= 135; x += 1) points.push({ x, elevation: f(x) });
  return points;
}

function twoLayer(surface: ModelPoint[], top: ModelPoint[]): LayeredModel {
  return { surface, layers: [{ velocity: V1 }, { velocity: V2, top }] };
}

const FLAT_GROUND = [{ x: 0, elevation: 100 }];

const CASES: { key: string; name: string; model: LayeredModel }[] = [
  { key: 'flat', name: 'flat refractor 6.5 m under flat ground', model: twoLayer(FLAT_GROUND, [{ x: 0, elevation: 93.5 }]) },
  {
    key: 'dip-plus',
    name: 'refractor dipping 5° toward +x (6 → 14.2 m)',
    model: twoLayer(FLAT_GROUND, [
      { x: -40, elevation: 94 + 40 * TAN5 },
      { x: 135, elevation: 94 - 135 * TAN5 },
    ]),
  },
  {
    key: 'dip-minus',
    name: 'refractor dipping 5° toward −x (14.2 → 6 m)',
    model: twoLayer(FLAT_GROUND, [
      { x: -40, elevation: 94 - 134 * TAN5 },
      { x: 135, elevation: 94 + 41 * TAN5 },
    ]),
  },
  {
    key: 'ground-slope',
    name: 'ground rising 5 % toward +x over a flat refractor (7 → 11.7 m)',
    model: twoLayer(
      [
        { x: -40, elevation: 98 },
        { x: 135, elevation: 106.75 },
      ],
      [{ x: 0, elevation: 93 }],
    ),
  },
  {
    key: 'undulating',
    name: 'undulating refractor, 7.5 m ± 1.2 m over an 80 m wavelength',
    model: twoLayer(FLAT_GROUND, sampled((x) => 92.5 + 1.2 * Math.sin((2 * Math.PI * x) / 80))),
  },
  {
    key: 'hump',
    name: 'a 2.5 m hump in the ground (24 m wide) over a flat refractor',
    model: twoLayer(
      sampled((x) => 100 + 2.5 * Math.exp(-(((x - 47) / 12) ** 2))),
      [{ x: 0, elevation: 93.5 }],
    ),
  },
];

interface Line {
  survey: Survey;
  interpretation: Interpretation;
}

const lines = new Map<string, Line>();
const lineKey = (key: string, noiseMs: number): string => `${key}@${noiseMs}`;

beforeAll(() => {
  // 12 lines: 6 models × {noise-free, 0.4 ms}. Generated once, shared by every test below.
  for (const c of CASES) {
    for (const noiseMs of [0, NOISE_MS]) {
      const survey = syntheticSurvey(c.model, LAYOUT, { noiseMs, seed: SEED, cellM: CELL_M });
      lines.set(lineKey(c.key, noiseMs), { survey, interpretation: interpret(survey) });
    }
  }
});

function trueDepthM(model: LayeredModel, x: number): number {
  return elevationAt(model.surface, x) - elevationAt(model.layers[1].top!, x);
}

/** Largest relative depth error over the stations with a depth, and the share of stations with one. */
function depthErrors(model: LayeredModel, interpretation: Interpretation): { maxRelative: number; worstX: number | null; coverage: number } {
  let maxRelative = 0;
  let worstX: number | null = null;
  let withDepth = 0;
  for (const s of interpretation.stations) {
    if (s.depth === null) continue;
    withDepth++;
    const truth = trueDepthM(model, s.x);
    const e = Math.abs(s.depth - truth) / truth;
    if (e > maxRelative) {
      maxRelative = e;
      worstX = s.x;
    }
  }
  return { maxRelative, worstX, coverage: withDepth / interpretation.stations.length };
}

/** Share of the stations with a depth whose depth is within `tolerance` (relative) of the model's. */
function shareWithin(model: LayeredModel, interpretation: Interpretation, tolerance: number): number {
  const withDepth = interpretation.stations.filter((s) => s.depth !== null);
  const good = withDepth.filter((s) => Math.abs((s.depth as number) - trueDepthM(model, s.x)) / trueDepthM(model, s.x) <= tolerance);
  return withDepth.length === 0 ? 0 : good.length / withDepth.length;
}

describe('two-layer acceptance on eikonal-modelled lines (forward model: Sethian 1996/1999; closed forms: Kearey et al. 2002 ch. 5)', () => {
  for (const c of CASES) {
    for (const noiseMs of [0, NOISE_MS]) {
      const label = `${c.name}, ${noiseMs === 0 ? 'noise-free' : `${noiseMs} ms pick noise`}`;
      describe(label, () => {
        it('gives depths within 5 % of the model at ≥ 80 % of the stations', () => {
          const { interpretation } = lines.get(lineKey(c.key, noiseMs))!;
          const { maxRelative, worstX, coverage } = depthErrors(c.model, interpretation);
          expect(coverage, 'share of stations with a depth').toBeGreaterThanOrEqual(MIN_DEPTH_COVERAGE);
          if (noiseMs === 0) {
            expect(maxRelative, `largest relative depth error (at x = ${worstX} m)`).toBeLessThanOrEqual(DEPTH_TOLERANCE);
          } else {
            const within = shareWithin(c.model, interpretation, DEPTH_TOLERANCE);
            expect(within, 'share of stations within 5 %').toBeGreaterThanOrEqual(NOISY_SHARE_WITHIN);
            expect(maxRelative, `largest relative depth error (at x = ${worstX} m)`).toBeLessThanOrEqual(NOISY_MAX_DEPTH_ERROR);
          }
        });

        it('finds V2 within 5 %', () => {
          const { interpretation } = lines.get(lineKey(c.key, noiseMs))!;
          const v2 = interpretation.layers[1]?.velocity;
          expect(v2).toBeDefined();
          expect(Math.abs((v2 as number) / V2 - 1)).toBeLessThanOrEqual(V2_TOLERANCE);
        });

        it(noiseMs === 0 ? 'leaves residuals under 0.25 ms RMS' : 'leaves residuals within 0.1 ms of the pick noise (RMS)', () => {
          const { survey, interpretation } = lines.get(lineKey(c.key, noiseMs))!;
          const residuals = interpretation.qc.residuals;
          expect(residuals).toBeDefined();
          expect(residuals!.perShot.map((p) => p.shot)).toEqual(survey.shots.map((s) => s.id));
          if (noiseMs === 0) expect(residuals!.rmsMs).toBeLessThanOrEqual(NOISE_FREE_RMS_MAX_MS);
          else expect(Math.abs(residuals!.rmsMs - noiseMs)).toBeLessThanOrEqual(NOISY_RMS_BAND_MS);
          expect(interpretation.qc.warnings.map((w) => w.code)).not.toContain('residuals-high');
        });
      });
    }
  }
});

describe('closing the loop: an interpretation re-interpreted from its own forward-modelled picks', () => {
  // Two more lines: the section of a noisy interpretation, forward-modelled without noise.
  for (const key of ['flat', 'dip-plus']) {
    it(`${key}: residuals under 0.15 ms RMS, and the section reproduced`, () => {
      const first = lines.get(lineKey(key, NOISE_MS))!.interpretation;
      const built = modelFromInterpretation(lines.get(lineKey(key, NOISE_MS))!.survey, first);
      expect(built.ok).toBe(true);
      if (!built.ok) return;
      const picks = syntheticSurvey(built.model, LAYOUT, { cellM: CELL_M });
      const second = interpret(picks);
      expect(second.qc.residuals).toBeDefined();
      expect(second.qc.residuals!.rmsMs).toBeLessThanOrEqual(SELF_CONSISTENT_RMS_MAX_MS);
      // The section it reproduces is the first one (where both have depths), within 5 %.
      second.stations.forEach((s, i) => {
        const d0 = first.stations[i].depth;
        if (s.depth !== null && d0 !== null) expect(Math.abs(s.depth - d0) / d0).toBeLessThanOrEqual(DEPTH_TOLERANCE);
      });
    });
  }
});
