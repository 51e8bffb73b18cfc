import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { demoLine, demoLineModel, flatLine, flatLineModel, type DemoLineModel } from '../../engine/samples/demo-lines.js';
import { importPickTable, surveyToPickTable } from '../../engine/survey/csv-import.js';
import { validateSurvey } from '../../engine/survey/validate.js';
import { directWaveTimeMs, firstArrivalMs, headWaveTimeMs, perpendicularDistanceToRefractor, verticalDepthToRefractor } from '../../engine/forward/planar-refractor.js';
import type { Survey } from '../../engine/survey/survey.js';

const samplesDir = fileURLToPath(new URL('../../samples/', import.meta.url));
const readSample = (name: string): string => readFileSync(samplesDir + name, 'utf8');

/** Half of the 0.1 ms rounding of each pick, plus floating-point slack. */
const ROUNDING_MS = 0.05 + 1e-9;

const LINES: [string, () => Survey, () => DemoLineModel][] = [
  ['demo-line', demoLine, demoLineModel],
  ['flat-line', flatLine, flatLineModel],
];

function shotPoint(survey: Survey, id: string): { x: number; elevation: number } {
  const s = survey.shots.find((shot) => shot.id === id)!;
  return { x: s.x, elevation: s.elevation! };
}

function timesOf(survey: Survey, id: string): number[] {
  return survey.shots.find((s) => s.id === id)!.times as number[];
}

/** Geophone indices where the head wave from this shot arrives before the direct wave. */
function headWaveFirst(survey: Survey, model: DemoLineModel, id: string): number[] {
  const a = shotPoint(survey, id);
  const out: number[] = [];
  survey.geophones.forEach((g, i) => {
    const head = headWaveTimeMs(model.refractor, a, { x: g.x, elevation: g.elevation! });
    if (head !== null && head < directWaveTimeMs(model.refractor, a, { x: g.x, elevation: g.elevation! })) out.push(i);
  });
  return out;
}

describe.each(LINES)('the %s sample files', (stem, makeSurvey) => {
  it('JSON equals what the sample function produces', () => {
    expect(JSON.parse(readSample(`${stem}.json`))).toEqual(makeSurvey());
  });
  it('CSV is the pick table of the same survey and imports back to it', () => {
    const csv = readSample(`${stem}.csv`);
    expect(csv).toBe(surveyToPickTable(makeSurvey()));
    const imported = importPickTable(csv);
    expect(imported.problems).toEqual([]);
    expect(imported.survey).toEqual(makeSurvey());
  });
  it('the survey validates', () => {
    expect(validateSurvey(makeSurvey()).problems).toEqual([]);
  });
});

describe.each(LINES)('the %s picks', (_stem, makeSurvey, makeModel) => {
  it('are the closed-form first arrivals rounded to 0.1 ms, no noise (Kearey, Brooks & Hill 2002, ch. 5)', () => {
    const survey = makeSurvey();
    const model = makeModel();
    for (const shot of survey.shots) {
      const a = { x: shot.x, elevation: shot.elevation! };
      survey.geophones.forEach((g, i) => {
        const exact = firstArrivalMs(model.refractor, a, { x: g.x, elevation: g.elevation! });
        expect(Math.abs((shot.times[i] as number) - exact)).toBeLessThanOrEqual(ROUNDING_MS);
      });
    }
  });

  it('give refracted arrivals on the far side of every end and off-end shot, and on both sides of the mid shot', () => {
    const survey = makeSurvey();
    const model = makeModel();
    const n = survey.geophones.length;
    for (const id of ['W-off', 'W-end', 'E-end', 'E-off']) {
      // At least a third of the spread: enough for a branch fit and an overlap with the reverse shot.
      expect(headWaveFirst(survey, model, id).length, id).toBeGreaterThanOrEqual(n / 3);
    }
    const mid = shotPoint(survey, 'mid');
    const midHead = headWaveFirst(survey, model, 'mid');
    expect(midHead.filter((i) => survey.geophones[i].x < mid.x).length).toBeGreaterThanOrEqual(3);
    expect(midHead.filter((i) => survey.geophones[i].x > mid.x).length).toBeGreaterThanOrEqual(3);
    // Off-end shots are refracted on every geophone, so they can be phantomed onto the end shots.
    expect(headWaveFirst(survey, model, 'W-off')).toHaveLength(n);
    expect(headWaveFirst(survey, model, 'E-off')).toHaveLength(n);
    // Both end shots are refracted at a stretch of common geophones: plus-minus needs no phantoming there.
    const west = new Set(headWaveFirst(survey, model, 'W-end'));
    expect(headWaveFirst(survey, model, 'E-end').filter((i) => west.has(i)).length).toBeGreaterThanOrEqual(4);
  });

  it('give plus times equal to twice the model delay time where both end shots are refracted (Hagedoorn 1959)', () => {
    // T+ = tAG + tBG − tAB = 2·dG·cos(ic)/V1 for a planar refractor (Hagedoorn, Geophysical
    // Prospecting 7, 1959; head-wave time from Kearey, Brooks & Hill 2002, ch. 5).
    const survey = makeSurvey();
    const model = makeModel();
    const a = shotPoint(survey, 'W-end');
    const b = shotPoint(survey, 'E-end');
    const reciprocalMs = headWaveTimeMs(model.refractor, a, b)!;
    const cosIc = Math.cos(Math.asin(model.refractor.v1 / model.refractor.v2));
    const west = new Set(headWaveFirst(survey, model, 'W-end'));
    const both = headWaveFirst(survey, model, 'E-end').filter((i) => west.has(i));
    expect(both.length).toBeGreaterThan(0);
    for (const i of both) {
      const g = { x: survey.geophones[i].x, elevation: survey.geophones[i].elevation! };
      const plusMs = timesOf(survey, 'W-end')[i] + timesOf(survey, 'E-end')[i] - reciprocalMs;
      const delayMs = (1000 * perpendicularDistanceToRefractor(model.refractor, g) * cosIc) / model.refractor.v1;
      expect(Math.abs(plusMs - 2 * delayMs)).toBeLessThanOrEqual(2 * ROUNDING_MS);
    }
  });

  it('keep the off-end branch parallel to the end-shot branch where both are refracted (phantoming)', () => {
    const survey = makeSurvey();
    const model = makeModel();
    for (const [off, end] of [
      ['W-off', 'W-end'],
      ['E-off', 'E-end'],
    ]) {
      const endHead = headWaveFirst(survey, model, end);
      const shifts = endHead.map((i) => timesOf(survey, off)[i] - timesOf(survey, end)[i]);
      expect(shifts.length).toBeGreaterThanOrEqual(4);
      expect(Math.max(...shifts) - Math.min(...shifts)).toBeLessThanOrEqual(2 * ROUNDING_MS);
    }
  });
});

describe('the demo line (Demo A)', () => {
  const survey = demoLine();
  const model = demoLineModel();

  it('has the five-shot layout over 24 geophones at 3 m', () => {
    expect(survey.geophones.map((g) => g.x)).toEqual(Array.from({ length: 24 }, (_, i) => 3 * i));
    expect(survey.shots.map((s) => [s.id, s.x])).toEqual([
      ['W-off', -24],
      ['W-end', -1.5],
      ['mid', 34.5],
      ['E-end', 70.5],
      ['E-off', 94],
    ]);
  });

  it('has a smooth gentle ground slope of a few metres', () => {
    const elevations = survey.geophones.map((g) => g.elevation!);
    const range = Math.max(...elevations) - Math.min(...elevations);
    expect(range).toBeGreaterThan(1);
    expect(range).toBeLessThan(5);
    for (let i = 1; i < elevations.length; i++) expect(Math.abs(elevations[i] - elevations[i - 1])).toBeLessThan(0.2);
    for (const s of survey.shots) expect(s.elevation).toBe(model.groundElevationM(s.x));
  });

  it('models a weathered layer over rock with a gently dipping refractor 4–10 m deep under every geophone', () => {
    expect(model.refractor.v1).toBeGreaterThanOrEqual(600);
    expect(model.refractor.v1).toBeLessThanOrEqual(800);
    expect(model.refractor.v2).toBeGreaterThanOrEqual(2400);
    expect(model.refractor.v2).toBeLessThanOrEqual(3200);
    expect(model.refractor.dipDegrees).toBeGreaterThanOrEqual(2);
    expect(model.refractor.dipDegrees).toBeLessThanOrEqual(5);
    for (const g of survey.geophones) {
      const depth = verticalDepthToRefractor(model.refractor, { x: g.x, elevation: g.elevation! });
      expect(depth).toBeGreaterThanOrEqual(4);
      expect(depth).toBeLessThanOrEqual(10);
    }
  });
});

describe('the flat line (Demo B)', () => {
  const survey = flatLine();
  const model = flatLineModel();

  it('is level with a flat refractor 6 m down', () => {
    expect(new Set(survey.geophones.map((g) => g.elevation)).size).toBe(1);
    for (const g of survey.geophones) expect(verticalDepthToRefractor(model.refractor, { x: g.x, elevation: g.elevation! })).toBeCloseTo(6, 9);
  });

  it('honours reciprocity between the end shots, which sit on the end geophones (Kearey, Brooks & Hill 2002, ch. 5)', () => {
    // Reciprocity: the time from a shot at A to a geophone at B equals the time from a shot at
    // B to a geophone at A. W-end is on the first geophone and E-end on the last.
    const first = 0;
    const last = survey.geophones.length - 1;
    expect(survey.shots.find((s) => s.id === 'W-end')!.x).toBe(survey.geophones[first].x);
    expect(survey.shots.find((s) => s.id === 'E-end')!.x).toBe(survey.geophones[last].x);
    expect(timesOf(survey, 'W-end')[first]).toBe(0);
    expect(timesOf(survey, 'E-end')[last]).toBe(0);
    expect(timesOf(survey, 'W-end')[last]).toBe(timesOf(survey, 'E-end')[first]);
    // And the reciprocal time is the flat-layer head wave t = x/V2 + 2h·cos(ic)/V1.
    const { v1, v2 } = model.refractor;
    const expectedMs = 1000 * (46 / v2 + (2 * 6 * Math.cos(Math.asin(v1 / v2))) / v1);
    expect(Math.abs(timesOf(survey, 'W-end')[last] - expectedMs)).toBeLessThanOrEqual(ROUNDING_MS);
  });

  it('shows the flat-layer crossover distance x_c = 2h·sqrt((V2 + V1)/(V2 − V1)) (Kearey, Brooks & Hill 2002, ch. 5)', () => {
    const { v1, v2 } = model.refractor;
    const crossoverM = 2 * 6 * Math.sqrt((v2 + v1) / (v2 - v1));
    const refracted = headWaveFirst(survey, model, 'W-end');
    for (let i = 1; i < survey.geophones.length; i++) {
      expect(refracted.includes(i), `x = ${survey.geophones[i].x} m`).toBe(survey.geophones[i].x > crossoverM);
    }
  });
});
