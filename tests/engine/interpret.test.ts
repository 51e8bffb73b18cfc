import { describe, expect, it } from 'vitest';
import { interpret } from '../../engine/pipeline/interpret.js';
import { CAUTIONS } from '../../engine/qc/cautions.js';
import { headWaveTimeMs, verticalDepthToRefractor, type PlanarRefractorModel } from '../../engine/forward/planar-refractor.js';
import type { Survey } from '../../engine/survey/survey.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import { fiveShotLayout, planarSurvey } from '../helpers/planar-survey.js';
import { mulberry32 } from '../helpers/random.js';

// Synthetic picks: closed-form planar two-layer times (engine/forward/planar-refractor.ts;
// Kearey, Brooks & Hill 2002 ch. 5).
const model: PlanarRefractorModel = { v1: 600, v2: 2400, refractorElevationAtZero: 93, dipDegrees: 3 };

/** Every number in the interpretation, found by walking the JSON-compatible tree. */
function numbersIn(value: unknown, out: number[] = []): number[] {
  if (typeof value === 'number') out.push(value);
  else if (Array.isArray(value)) value.forEach((v) => numbersIn(v, out));
  else if (value && typeof value === 'object') Object.values(value).forEach((v) => numbersIn(v, out));
  return out;
}

/** The interpretation survives JSON unchanged: no NaN, no Infinity, no undefined in arrays. */
function expectCleanJson(result: Interpretation): void {
  expect(numbersIn(result).every(Number.isFinite)).toBe(true);
  expect(JSON.parse(JSON.stringify(result))).toEqual(result);
}

describe('interpret: pipeline output', () => {
  const survey = planarSurvey(model, fiveShotLayout());
  const result = interpret(survey);

  it('returns one station per geophone, in order, with the method, name and cautions', () => {
    expect(result.method).toBe('plus-minus');
    expect(result.name).toBe(survey.name);
    expect(result.stations.map((s) => s.x)).toEqual(survey.geophones.map((g) => g.x));
    expect(result.cautions).toEqual([...CAUTIONS]);
    expect(result.features.steps).toEqual([]);
    expect(result.features.velocityChanges).toEqual([]);
  });

  it('gives the delay time as half the plus time, and depths consistent with elevations', () => {
    for (const s of result.stations) {
      expect(s.delayTime as number).toBeCloseTo((s.plusTime as number) / 2, 1);
      expect(s.depths).toEqual([s.depth]);
      expect(s.depth as number).toBeGreaterThanOrEqual(s.normalDepth as number);
    }
  });

  it('phantoms the end shots from the off-end shots with parallel branches', () => {
    for (const [end, off] of [
      ['W-end', 'W-off'],
      ['E-end', 'E-off'],
    ]) {
      const shot = result.shots.find((s) => s.id === end)!;
      expect(shot.phantom?.fromShot).toBe(off);
      expect(shot.phantom!.parallelRmsMs).toBeLessThan(0.01);
      // Over a plane the shift is the off-end shot's time minus the end shot's, the same at
      // any geophone both reach by head waves (here the far end of the spread).
      const far = end === 'W-end' ? survey.geophones[survey.geophones.length - 1] : survey.geophones[0];
      const at = (id: string) => {
        const s = survey.shots.find((q) => q.id === id)!;
        return headWaveTimeMs(model, { x: s.x, elevation: s.elevation as number }, { x: far.x, elevation: far.elevation as number })!;
      };
      expect(shot.phantom!.shiftMs).toBeCloseTo(at(off) - at(end), 1);
      // Phantom times sit only where the end shot itself has no refracted pick.
      shot.phantom!.times.forEach((t, i) => {
        if (t !== null) expect(shot.branchOfPick[i]).not.toBe(1);
      });
    }
    expect(result.stations.some((s) => s.coverage === 'phantom')).toBe(true);
    expect(result.stations.every((s) => (s.pairCount as number) >= 1)).toBe(true);
  });

  it('rounds its own numbers once: 0.01 m, 0.01 ms, 1 m/s', () => {
    const decimals = (v: number) => (String(v).split('.')[1] ?? '').length;
    for (const s of result.stations) {
      for (const v of [s.depth, s.refractorElevation, s.delayTime, s.plusTime, s.minusTime, s.normalDepth]) {
        expect(decimals(v as number)).toBeLessThanOrEqual(2);
      }
      expect(Number.isInteger(s.refractorVelocity)).toBe(true);
    }
    expect(result.layers.every((l) => Number.isInteger(l.velocity))).toBe(true);
  });

  it('is deterministic', () => {
    expect(interpret(survey)).toEqual(result);
  });

  it('does not change the survey it is given', () => {
    const copy = structuredClone(survey);
    interpret(survey);
    expect(survey).toEqual(copy);
  });

  it('gives one refractor-velocity segment over the covered stretch', () => {
    expect(result.refractorVelocity).toHaveLength(1);
    expect(result.refractorVelocity[0].from).toBe(survey.geophones[0].x);
    expect(result.refractorVelocity[0].to).toBe(survey.geophones[survey.geophones.length - 1].x);
  });
});

describe('interpret: V2 over a dipping refractor', () => {
  it('fits T− against distance along the refractor, removing the 1/cos θ bias of T− against x', () => {
    // Closed form (derivation in engine/interpret.ts): over a plane dipping θ under flat
    // ground, T− rises by 2·cos θ/V2 per metre along the line.
    const dipping: PlanarRefractorModel = { v1: 600, v2: 2400, refractorElevationAtZero: 88, dipDegrees: -8 };
    const result = interpret(planarSurvey(dipping, fiveShotLayout()));
    const fit = result.velocityAnalysis.minusTimeVelocity!;
    const cosTheta = Math.cos((8 * Math.PI) / 180);
    expect(fit.distance).toBe('along-refractor');
    expect(Math.abs(fit.velocity - dipping.v2) / dipping.v2).toBeLessThan(0.002);
    expect(Math.abs(fit.alongLineVelocity! - dipping.v2 / cosTheta) / dipping.v2).toBeLessThan(0.002);
  });
});

describe('interpret: coverage', () => {
  it('says which geophones have no depth and why when there is no off-end shot to phantom from', () => {
    const layout = fiveShotLayout();
    layout.shots = layout.shots.filter((s) => s.id === 'W-end' || s.id === 'E-end');
    const result = interpret(planarSurvey(model, layout));
    const gaps = result.qc.warnings.filter((w) => w.code === 'no-coverage');
    expect(gaps.length).toBeGreaterThanOrEqual(2);
    const west = gaps.find((w) => w.message.includes('W-end'))!;
    expect(west.message).toMatch(/only direct arrivals from W-end and no off-end shot on that side to phantom from/);
    expect(west.message).toMatch(/x = 0\.0–\d+\.\d m/);
    expect(west.x).toBe(0);
    // The uncovered stations are null (never NaN); the covered middle has depths.
    const first = result.stations[0];
    expect(first.depth).toBeNull();
    expect(first.delayTime).toBeNull();
    expect(first.coverage).toBe('none');
    const middle = result.stations[12];
    const truth = verticalDepthToRefractor(model, { x: middle.x, elevation: middle.elevation });
    expect(Math.abs((middle.depth as number) - truth) / truth).toBeLessThan(0.02);
    expectCleanJson(result);
  });
});

describe('interpret: checks and degenerate lines', () => {
  it('leaves pairs that fail the reciprocal check out where trusted pairs reach (a 5 ms trigger error on E-end)', () => {
    const survey = planarSurvey(model, fiveShotLayout());
    const eEnd = survey.shots.find((s) => s.id === 'E-end')!;
    eEnd.times = eEnd.times.map((t) => (t === null ? null : t + 5));
    const result = interpret(survey);
    expect(result.qc.warnings.some((w) => w.code === 'reciprocal-misfit')).toBe(true);
    expect(result.qc.reciprocal.find((r) => r.shots.join() === 'W-end,E-end')?.ok).toBe(false);
    for (const s of result.stations) {
      const truth = verticalDepthToRefractor(model, { x: s.x, elevation: s.elevation });
      expect(Math.abs((s.depth as number) - truth) / truth, `x = ${s.x}`).toBeLessThan(0.02);
    }
  });

  it('stays within common-practice accuracy with 0.25 ms pick noise (seeded)', () => {
    const survey = planarSurvey(model, fiveShotLayout(), { sigmaMs: 0.25, rng: mulberry32(2024) });
    const result = interpret(survey);
    const fit = result.velocityAnalysis.minusTimeVelocity!;
    expect(Math.abs(fit.velocity - model.v2) / model.v2).toBeLessThan(0.05);
    expect(fit.standardError).toBeGreaterThan(0);
    for (const s of result.stations) {
      const truth = verticalDepthToRefractor(model, { x: s.x, elevation: s.elevation });
      expect(Math.abs((s.depth as number) - truth), `x = ${s.x}`).toBeLessThan(0.75);
    }
    expectCleanJson(result);
  });

  it('refuses depths with a clear warning when the minus times give V2 ≤ V1', () => {
    // Both end shots record only the direct wave, but the user forces everything past the
    // third pick onto the refracted branch: T− then rises at 2/V1, so V2 = V1.
    const xs = Array.from({ length: 12 }, (_, i) => i * 3);
    const survey: Survey = {
      geophones: xs.map((x) => ({ x })),
      shots: [
        { id: 'A', x: -1.5, times: xs.map((x) => (1000 * (x + 1.5)) / 600) },
        { id: 'B', x: 34.5, times: xs.map((x) => (1000 * (34.5 - x)) / 600 + 0.001 * x) },
      ],
      options: {
        branchOverrides: [
          { shot: 'A', side: 'right', directPicks: 3 },
          { shot: 'B', side: 'left', directPicks: 3 },
        ],
      },
    };
    const result = interpret(survey);
    expect(result.qc.warnings.map((w) => w.code)).toContain('v2-not-above-v1');
    expect(result.stations.every((s) => s.depth === null && s.refractorElevation === null)).toBe(true);
    expectCleanJson(result);
  });

  it('handles a single shot: no opposing pair, null depths, no NaN', () => {
    const xs = Array.from({ length: 10 }, (_, i) => i * 2);
    const survey: Survey = { geophones: xs.map((x) => ({ x })), shots: [{ id: 'S', x: -1, times: xs.map((x) => (x + 1) / 0.6) }] };
    const result = interpret(survey);
    expect(result.qc.warnings.map((w) => w.code)).toContain('no-opposing-pair');
    expect(result.stations.every((s) => s.depth === null)).toBe(true);
    expect(result.features.dip).toBeNull();
    expectCleanJson(result);
  });

  it('handles shots with no picks at all', () => {
    const xs = [0, 5, 10];
    const survey: Survey = {
      geophones: xs.map((x) => ({ x, elevation: 10 })),
      shots: [
        { id: 'A', x: -2, times: [null, null, null] },
        { id: 'B', x: 12, times: [null, null, null] },
      ],
    };
    const result = interpret(survey);
    expect(result.stations.every((s) => s.depth === null && s.coverage === 'none')).toBe(true);
    expect(result.layers).toEqual([]);
    expect(result.qc.warnings.map((w) => w.code)).toContain('no-direct-velocity');
    expectCleanJson(result);
  });

  it('handles identical times everywhere (no moveout)', () => {
    const xs = Array.from({ length: 8 }, (_, i) => i * 2);
    const survey: Survey = {
      geophones: xs.map((x) => ({ x })),
      shots: [
        { id: 'A', x: -1, times: xs.map(() => 5) },
        { id: 'B', x: 15, times: xs.map(() => 5) },
      ],
    };
    expectCleanJson(interpret(survey));
  });

  it('says when arrivals were put on a second refractor that this section does not map', () => {
    const survey = planarSurvey(model, fiveShotLayout());
    survey.options = { branchOverrides: [{ shot: 'W-off', side: 'right', directPicks: 0, firstRefractorPicks: 12 }] };
    const result = interpret(survey);
    const warning = result.qc.warnings.find((w) => w.code === 'second-refractor-not-mapped');
    expect(warning?.message).toContain('W-off');
    expectCleanJson(result);
  });

  it('falls back to plus-minus, and says why, when no shot ties the time terms (Willmore & Bancroft 1960: shot and geophone terms trade off without a shot at or between geophones)', () => {
    const layout = fiveShotLayout();
    const survey = planarSurvey(model, { ...layout, shots: layout.shots.filter((s) => s.id !== 'Mid') });
    survey.options = { method: 'time-term' };
    const result = interpret(survey);
    expect(result.method).toBe('plus-minus');
    expect(result.timeTerm).toBeUndefined();
    const warning = result.qc.warnings.find((w) => w.code === 'time-term-failed');
    expect(warning?.message).toContain('plus-minus');
  });
});
