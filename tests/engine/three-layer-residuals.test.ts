/**
 * The residual check's model of a three-layer interpretation (engine/forward/
 * interpretation-model.ts) must represent what the interpretation says: an interpretation
 * carrying the true layers of a forward-modelled three-layer line must model its picks
 * within the solver's error, so that `residuals-high` is never a false alarm there (issue 10).
 * Model (invented): 400 / 1600 / 3400 m/s, weathered rock flat at 4 m, rock 12 m down at
 * x = 0 dipping 4° toward +x; 48 geophones at 1.5 m; shots off-end 15 m, at the ends, mid.
 */
import { describe, expect, it } from 'vitest';
import { interpret } from '../../engine/pipeline/interpret.js';
import { syntheticSurvey } from '../../engine/forward/synthetic.js';
import { computeResiduals } from '../../engine/qc/residuals.js';
import { modelFromInterpretation } from '../../engine/forward/interpretation-model.js';
import { elevationAt } from '../../engine/forward/polyline.js';
import type { LayeredModel } from '../../engine/forward/model.js';
import type { Interpretation } from '../../engine/output/interpretation.js';

const V: [number, number, number] = [400, 1600, 3400];
const Z1 = 4;
const SLOPE = Math.tan((4 * Math.PI) / 180);
const z2At = (x: number): number => 12 + x * SLOPE;
const MODEL: LayeredModel = {
  surface: [{ x: -500, elevation: 0 }, { x: 500, elevation: 0 }],
  layers: [
    { velocity: V[0] },
    { velocity: V[1], top: [{ x: -500, elevation: -Z1 }, { x: 500, elevation: -Z1 }] },
    { velocity: V[2], top: [{ x: -500, elevation: -z2At(-500) }, { x: 500, elevation: -z2At(500) }] },
  ],
};
const SURVEY = syntheticSurvey(MODEL, {
  geophoneCount: 48,
  firstX: 0,
  spacing: 1.5,
  shots: [{ x: -15, id: 'W-off' }, { x: -0.75, id: 'W-end' }, { x: 35.25, id: 'mid' }, { x: 71.25, id: 'E-end' }, { x: 85.5, id: 'E-off' }],
});

/** The engine's own interpretation with its numbers replaced by the model's (branches kept). */
function trueInterpretation(): Interpretation {
  const r = interpret({ ...SURVEY, options: { layers: 3, residuals: false } });
  const delay1 = (1000 * Z1 * Math.sqrt(1 - (V[0] / V[1]) ** 2)) / V[0];
  return {
    ...r,
    layers: V.map((velocity) => ({ velocity })),
    refractorVelocity: [{ from: 0, to: 70.5, velocity: V[1] }],
    features: { ...r.features, dip: null },
    stations: r.stations.map((s) => ({ ...s, v1: V[0], depth: Z1, refractorElevation: -Z1, delayTime: delay1, depths: [Z1, z2At(s.x)] })),
  };
}

describe('residual model of a three-layer interpretation (4° dipping rock, off-end shots 15 m out)', () => {
  it('places the second refractor under the off-end shots from their branch-2 picks, on the true interface within 0.3 m', () => {
    const built = modelFromInterpretation(SURVEY, trueInterpretation());
    expect(built.ok).toBe(true);
    if (!built.ok) return;
    const rock = built.model.layers[2].top!;
    for (const x of [-15, 85.5]) expect(Math.abs(elevationAt(rock, x) + z2At(x)), `x = ${x}`).toBeLessThan(0.3);
  });

  it('models the picks of the true interpretation within 0.2 ms RMS on every shot (no false residuals-high)', () => {
    const res = computeResiduals(SURVEY, trueInterpretation());
    expect(res.ok).toBe(true);
    if (!res.ok) return;
    for (const s of res.shots) expect(s.rmsMs, s.shot).toBeLessThan(0.2);
  });
});
