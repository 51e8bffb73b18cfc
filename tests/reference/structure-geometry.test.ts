/**
 * Structure under the line, end to end: dip, longer layouts with shots inside the spread,
 * and topography. Synthetic lines from the eikonal forward model (engine/forward/
 * synthetic.ts, 0.25 m cells: first arrivals by Fermat's principle through the model's
 * geometry, not the engine's formulas), each generated once, fed through `interpret`.
 * 48 geophones at 2 m (x = 0–94 m).
 *
 * Sources: plus-minus delay times and the envelope of depth arcs (Hagedoorn, Geophysical
 * Prospecting 7, 1959); depth from delay time z = δ·V1·V2/√(V2² − V1²) (Kearey, Brooks &
 * Hill 2002, ch. 5). Tolerances: the issue "Structure under the line" (depth 5 %, dip 0.5°).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { syntheticSurvey } from '../../engine/forward/synthetic.js';
import type { LayeredModel } from '../../engine/forward/model.js';
import { elevationAt } from '../../engine/forward/polyline.js';
import { CELL_M, LAYOUT, SEVEN_SHOTS, V1, V2, level, report, run, trueDepthM } from './structure-lines.js';
import type { Interpretation } from '../../engine/output/interpretation.js';

/** Relative depth errors at every station that has a depth, and how many have none. */
function depthCheck(model: LayeredModel, result: Interpretation): { worst: number; covered: number; errors: { x: number; relative: number }[] } {
  const errors = result.stations
    .filter((s) => s.depth !== null)
    .map((s) => ({ x: s.x, relative: Math.abs((s.depth as number) - trueDepthM(model, s.x)) / trueDepthM(model, s.x) }));
  return { worst: Math.max(...errors.map((e) => e.relative)), covered: errors.length, errors };
}


const ELEVEN_SHOTS = [
  { x: -44, id: 'W-off2' },
  { x: -24, id: 'W-off' },
  { x: -1, id: 'W-end' },
  { x: 15, id: 'S15' },
  { x: 31, id: 'S31' },
  { x: 47, id: 'S47' },
  { x: 63, id: 'S63' },
  { x: 79, id: 'S79' },
  { x: 95, id: 'E-end' },
  { x: 118, id: 'E-off' },
  { x: 138, id: 'E-off2' },
];

describe('planar refractor dipping 4° toward +x (7 shots)', () => {
  const DIP = 4;
  const tan = Math.tan((DIP * Math.PI) / 180);
  const model: LayeredModel = {
    surface: level(0),
    layers: [
      { velocity: V1 },
      {
        velocity: V2,
        top: [
          { x: -100, elevation: -4 + 100 * tan },
          { x: 200, elevation: -4 - 200 * tan },
        ],
      },
    ],
  };
  let result: Interpretation;
  beforeAll(() => {
    result = run(syntheticSurvey(model, { ...LAYOUT, shots: SEVEN_SHOTS }, { cellM: CELL_M }));
  });

  it('gives the dip within 0.5°, one V2 within 5 %, no step and no velocity change', () => {
    report('dip', { dip: result.features.dip, v2: result.refractorVelocity });
    expect(result.features.dip).not.toBeNull();
    expect(Math.abs(result.features.dip!.degrees - DIP)).toBeLessThan(0.5);
    expect(result.features.steps).toEqual([]);
    expect(result.features.velocityChanges).toEqual([]);
    expect(Math.abs(result.refractorVelocity[0].velocity - V2) / V2).toBeLessThan(0.05);
    const local = result.features.localDips;
    expect(local).toHaveLength(1);
    expect(Math.abs(local[0].degrees - DIP)).toBeLessThan(0.5);
  });

  it('gives depths within 5 %', () => {
    const d = depthCheck(model, result);
    report('dip depths', { worstPct: +(100 * d.worst).toFixed(2), covered: d.covered });
    expect(d.covered).toBeGreaterThanOrEqual(40);
    expect(d.worst).toBeLessThan(0.05);
  });
});

describe('7 shots (three inside the spread) over a bent refractor, 5–9 m deep', () => {
  const model: LayeredModel = {
    surface: level(0),
    layers: [
      { velocity: V1 },
      {
        velocity: V2,
        top: [
          { x: -100, elevation: -5 },
          { x: 0, elevation: -5 },
          { x: 40, elevation: -9 },
          { x: 94, elevation: -6 },
          { x: 200, elevation: -6 },
        ],
      },
    ],
  };
  let result: Interpretation;
  beforeAll(() => {
    result = run(syntheticSurvey(model, { ...LAYOUT, shots: SEVEN_SHOTS }, { cellM: CELL_M }));
  });

  it('gives depths within 5 % at every covered station, and covers the line', () => {
    const d = depthCheck(model, result);
    report('7-shot depths', { worstPct: +(100 * d.worst).toFixed(2), covered: d.covered, pairs: Math.max(...result.stations.map((s) => s.pairCount ?? 0)) });
    expect(d.covered).toBeGreaterThanOrEqual(44);
    expect(d.worst).toBeLessThan(0.05);
    expect(Math.max(...result.stations.map((s) => s.pairCount ?? 0))).toBeGreaterThanOrEqual(6);
  });
});

describe('11 shots (five inside, two off-end each side) over an undulating refractor, 6–9 m deep', () => {
  const model: LayeredModel = {
    surface: level(0),
    layers: [
      { velocity: V1 },
      {
        velocity: V2,
        top: [
          { x: -100, elevation: -7 },
          { x: 10, elevation: -7 },
          { x: 35, elevation: -9 },
          { x: 60, elevation: -6 },
          { x: 84, elevation: -8 },
          { x: 200, elevation: -8 },
        ],
      },
    ],
  };
  let result: Interpretation;
  beforeAll(() => {
    result = run(syntheticSurvey(model, { ...LAYOUT, shots: ELEVEN_SHOTS }, { cellM: CELL_M }));
  });

  it('phantoms each end shot from both off-end shots on its side', () => {
    for (const id of ['W-end', 'E-end']) {
      const phantom = result.shots.find((s) => s.id === id)!.phantom;
      expect(phantom?.fromShots, id).toHaveLength(2);
    }
  });

  it('gives depths within 5 % at every covered station, and covers the line', () => {
    const d = depthCheck(model, result);
    report('11-shot features', { steps: result.features.steps, velocityChanges: result.features.velocityChanges, segments: result.refractorVelocity });
    report('11-shot depths', { worstPct: +(100 * d.worst).toFixed(2), covered: d.covered, pairs: Math.max(...result.stations.map((s) => s.pairCount ?? 0)) });
    expect(d.covered).toBeGreaterThanOrEqual(44);
    expect(d.worst).toBeLessThan(0.05);
    expect(result.features.steps).toEqual([]);
  });
});

describe('topography: ground rising 5 % with a 2.5 m hump, flat refractor (7 shots)', () => {
  const model: LayeredModel = {
    surface: [
      { x: -60, elevation: -3 },
      { x: 35, elevation: 1.75 },
      { x: 45, elevation: 4.25 },
      { x: 55, elevation: 4.75 },
      { x: 65, elevation: 3.25 },
      { x: 160, elevation: 8 },
    ],
    layers: [{ velocity: V1 }, { velocity: V2, top: level(-7) }],
  };
  const shots = SEVEN_SHOTS.map((s) => (s.id === 'E-off' ? { ...s, x: 134 } : s.id === 'W-off' ? { ...s, x: -30 } : s));
  let result: Interpretation;
  beforeAll(() => {
    result = run(syntheticSurvey(model, { ...LAYOUT, shots }, { cellM: CELL_M }));
  });

  it('gives vertical depths below the ground within 5 % and the refractor elevation within 5 % of the depth', () => {
    const d = depthCheck(model, result);
    report('topography depths', { worstPct: +(100 * d.worst).toFixed(2), covered: d.covered });
    expect(d.covered).toBeGreaterThanOrEqual(40);
    expect(d.worst).toBeLessThan(0.05);
    for (const s of result.stations.filter((q) => q.depth !== null)) {
      expect(s.elevation).toBeCloseTo(elevationAt(model.surface, s.x), 2);
      expect(Math.abs((s.refractorElevation as number) - -7)).toBeLessThan(0.05 * trueDepthM(model, s.x));
    }
  });

  it('reads no step from the hump in the ground, and finds the refractor level', () => {
    expect(result.features.steps).toEqual([]);
    expect(result.features.velocityChanges).toEqual([]);
    expect(Math.abs(result.features.dip!.degrees)).toBeLessThan(0.5);
  });
});
