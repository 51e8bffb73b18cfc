/**
 * The number of layers chosen by the picks (engine/qc/layer-choice.ts, issue 10 item 2):
 * BIC = χ² + k·ln n (Schwarz 1978) over the forward-model residuals of the candidates.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { Value } from '@sinclair/typebox/value';
import { interpret } from '../../engine/pipeline/interpret.js';
import { syntheticSurvey } from '../../engine/forward/synthetic.js';
import { layerCandidate } from '../../engine/qc/layer-choice.js';
import { InterpretationSchema } from '../../engine/schemas/interpretation.js';
import type { Interpretation, Survey } from '../../engine/index.js';

/** Invented model: 500 / 2000 / 4000 m/s, refractors flat at 5 and 14 m; 32 geophones at 3 m; off-end shots 40 m out. */
function coarseLine(noiseMs: number): Survey {
  return syntheticSurvey(
    {
      surface: [{ x: -500, elevation: 0 }, { x: 500, elevation: 0 }],
      layers: [
        { velocity: 500 },
        { velocity: 2000, top: [{ x: -500, elevation: -5 }, { x: 500, elevation: -5 }] },
        { velocity: 4000, top: [{ x: -500, elevation: -14 }, { x: 500, elevation: -14 }] },
      ],
    },
    { geophoneCount: 32, firstX: 0, spacing: 3, shots: [{ x: -40 }, { x: -1.5 }, { x: 46.5 }, { x: 94.5 }, { x: 133 }] },
    { noiseMs, seed: 1 },
  );
}
/** Exact picks: the branch assignment reads three layers by itself (withLineCrossover). */
const COARSE = coarseLine(0);
/** 0.3 ms pick noise, seed 1: the first reading misfits the picks (RMS 0.63 ms), so layer counts are compared. */
const COARSE_NOISY = coarseLine(0.3);

describe('layerCandidate', () => {
  it('counts one depth per station per refractor and one velocity per layer, χ² = n·RMS²/σ², BIC = χ² + k·ln n', () => {
    const interp = {
      layers: [{ velocity: 500 }, { velocity: 2000 }],
      stations: new Array(10).fill({}),
      qc: { residuals: { rmsMs: 1, count: 50, perShot: [], cellM: 0.5, refractorContinuation: 'flat' }, warnings: [], reciprocal: [] },
    } as unknown as Interpretation;
    const c = layerCandidate('auto', interp, 0.5)!;
    expect(c.parameters).toBe(12);
    expect(c.chiSquare).toBeCloseTo(200, 6);
    expect(c.bic).toBeCloseTo(200 + 12 * Math.log(50), 1);
  });

  it('refuses a three-layer candidate whose V3 is not 1.25 × V2 (the branch assignment\'s contrast rule)', () => {
    const interp = {
      layers: [{ velocity: 600 }, { velocity: 2386 }, { velocity: 2424 }],
      stations: [],
      qc: { residuals: { rmsMs: 1, count: 50, perShot: [], cellM: 0.5, refractorContinuation: 'flat' }, warnings: [], reciprocal: [] },
    } as unknown as Interpretation;
    expect(layerCandidate('three-layer', interp, 0.5)).toBeNull();
  });

  it('drops a forced run that did not come out with the layer count it forced (it repeats another candidate)', () => {
    const twoLayers = {
      layers: [{ velocity: 600 }, { velocity: 2400 }],
      stations: [],
      qc: { residuals: { rmsMs: 1, count: 50, perShot: [], cellM: 0.5, refractorContinuation: 'flat' }, warnings: [], reciprocal: [] },
    } as unknown as Interpretation;
    expect(layerCandidate('three-layer', twoLayers, 0.5)).toBeNull();
    expect(layerCandidate('two-layer', twoLayers, 0.5)).not.toBeNull();
    expect(layerCandidate('auto', twoLayers, 0.5)).not.toBeNull();
  });
});

describe('interpret: layer count chosen by the picks', () => {
  it('reads the exact line as three layers without the hint and without comparing (velocities within 1 %)', () => {
    const r = interpret(COARSE);
    expect(r.qc.layerChoice).toBeUndefined();
    [500, 2000, 4000].forEach((v, i) => expect(Math.abs(r.layers[i].velocity / v - 1)).toBeLessThan(0.01));
  });

  it('on a three-layer line misread without the hint, takes the three-layer candidate, reports every candidate and says why', () => {
    const r = interpret(COARSE_NOISY);
    expect(r.layers).toHaveLength(3);
    const choice = r.qc.layerChoice!;
    expect(choice.chosen).toBe('three-layer');
    expect(choice.candidates.map((c) => c.label)).toEqual(['auto', 'two-layer', 'three-layer']);
    const taken = choice.candidates.find((c) => c.label === 'three-layer')!;
    for (const c of choice.candidates) expect(taken.bic).toBeLessThanOrEqual(c.bic);
    const note = r.qc.warnings.find((w) => w.code === 'layer-count-chosen');
    expect(note?.message).toContain('Schwarz 1978');
    expect(note?.message).toContain('Taken: 3 layers');
    expect(Value.Check(InterpretationSchema, JSON.parse(JSON.stringify(r)))).toBe(true);
  });

  it('never compares when the layer count is forced or residuals are off', () => {
    expect(interpret({ ...COARSE, options: { layers: 3 } }).qc.layerChoice).toBeUndefined();
    expect(interpret({ ...COARSE, options: { residuals: false } }).qc.layerChoice).toBeUndefined();
  });

  it('keeps a two-layer line with high residuals two-layer (the golden line of tests/engine/interpret.test.ts, 600/2400 m/s)', () => {
    const file = fileURLToPath(new URL('../golden/lines/engine-interpret-02.json', import.meta.url));
    const survey = (JSON.parse(readFileSync(file, 'utf8')) as { survey: Survey }).survey;
    const r = interpret(survey);
    expect(r.qc.residuals!.rmsMs).toBeGreaterThan(1);
    expect(r.layers).toHaveLength(2);
  });
});
