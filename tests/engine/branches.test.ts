import { describe, expect, it } from 'vitest';
import { assignBranches } from '../../engine/branches/assign-branches.js';
import {
  directWaveTimeMs,
  firstArrivalMs,
  headWaveTimeMs,
  type PlanarRefractorModel,
} from '../../engine/forward/planar-refractor.js';
import type { Geophone, Survey } from '../../engine/survey/survey.js';
import { gaussian, mulberry32 } from '../helpers/random.js';

// Invented test line: 24 geophones at 2 m, flat ground, five shots as in a usual field layout.
const GEOPHONES: Geophone[] = Array.from({ length: 24 }, (_, i) => ({ x: 2 * i, elevation: 0 }));
const SHOTS: [string, number][] = [
  ['W-off', -12],
  ['W-end', -1],
  ['mid', 23],
  ['E-end', 47],
  ['E-off', 58],
];
const FLAT: PlanarRefractorModel = { v1: 600, v2: 2400, refractorElevationAtZero: -6, dipDegrees: 0 };
const DIPPING: PlanarRefractorModel = { v1: 600, v2: 2400, refractorElevationAtZero: -5, dipDegrees: 4 };

function planarSurvey(model: PlanarRefractorModel, shots = SHOTS, geophones = GEOPHONES): Survey {
  return {
    geophones,
    shots: shots.map(([id, x]) => ({
      id,
      x,
      times: geophones.map((g) => firstArrivalMs(model, { x, elevation: 0 }, { x: g.x, elevation: g.elevation ?? 0 })),
    })),
  };
}

/** True branch of every pick from the closed form: 1 where the head wave arrives first. */
function trueBranches(model: PlanarRefractorModel, shotX: number): (0 | 1)[] {
  return GEOPHONES.map((g) => {
    const a = { x: shotX, elevation: 0 };
    const b = { x: g.x, elevation: 0 };
    const head = headWaveTimeMs(model, a, b);
    return head !== null && head < directWaveTimeMs(model, a, b) ? 1 : 0;
  });
}

const rad = (deg: number): number => (deg * Math.PI) / 180;

describe('assignBranches on closed-form times (Kearey, Brooks & Hill 2002, ch. 5)', () => {
  it('puts every pick of a flat two-layer line on its true branch', () => {
    const shots = assignBranches(planarSurvey(FLAT));
    for (const s of shots) expect(s.branchOfPick).toEqual(trueBranches(FLAT, s.x));
  });

  it('recovers V1, V2 and the intercept time 2h·cos(ic)/V1 over a flat refractor', () => {
    const shots = assignBranches(planarSurvey(FLAT));
    const ic = Math.asin(FLAT.v1 / FLAT.v2);
    const tiMs = (1000 * 2 * 6 * Math.cos(ic)) / FLAT.v1;
    for (const s of shots) {
      for (const side of [s.left, s.right]) {
        if (!side) continue;
        if (side.direct) expect(side.direct.velocity).toBeCloseTo(600, 6);
        expect(side.refracted).toHaveLength(1);
        expect(side.refracted[0].velocity).toBeCloseTo(2400, 5);
        expect(side.refracted[0].interceptMs).toBeCloseTo(tiMs, 6);
        expect(side.refracted[0].rmsMs).toBeLessThan(1e-6);
      }
    }
  });

  it('reports the crossover distance x_c = 2h·sqrt((V2+V1)/(V2−V1))', () => {
    const shots = assignBranches(planarSurvey(FLAT));
    const xc = 2 * 6 * Math.sqrt((2400 + 600) / (2400 - 600));
    const wEnd = shots.find((s) => s.id === 'W-end')!;
    expect(wEnd.right!.crossoverDistance).toBeCloseTo(xc, 6);
    expect(wEnd.left).toBeNull();
  });

  it('gives the down-dip and up-dip apparent velocities V1/sin(ic±θ) over a dipping refractor', () => {
    const shots = assignBranches(planarSurvey(DIPPING));
    const ic = Math.asin(DIPPING.v1 / DIPPING.v2);
    const theta = rad(DIPPING.dipDegrees);
    const vDown = DIPPING.v1 / Math.sin(ic + theta);
    const vUp = DIPPING.v1 / Math.sin(ic - theta);
    for (const s of shots) {
      expect(s.branchOfPick).toEqual(trueBranches(DIPPING, s.x));
      // Refractor deepens toward +x: shooting right is shooting down-dip.
      if (s.right) expect(s.right.refracted[0].velocity! / vDown).toBeCloseTo(1, 8);
      if (s.left) expect(s.left.refracted[0].velocity! / vUp).toBeCloseTo(1, 8);
    }
  });

  it('with 0.2 ms noise and one 5 ms bad pick, keeps the bad pick on its branch and long-branch velocities within 3 %', () => {
    const survey = planarSurvey(DIPPING);
    const rng = mulberry32(2024);
    for (const shot of survey.shots) shot.times = shot.times.map((t) => (t === null ? null : t + 0.2 * gaussian(rng)));
    const wEnd = survey.shots.find((s) => s.id === 'W-end')!;
    wEnd.times[17] = wEnd.times[17]! + 5;
    const shots = assignBranches(survey);
    const ic = Math.asin(DIPPING.v1 / DIPPING.v2);
    const theta = rad(DIPPING.dipDegrees);
    for (const s of shots) {
      const truth = trueBranches(DIPPING, s.x);
      const wrong = s.branchOfPick.filter((b, i) => b !== truth[i]).length;
      // Only a pick right at the crossover may go either way under noise.
      expect(wrong).toBeLessThanOrEqual(2);
      for (const side of [s.left, s.right]) {
        if (!side) continue;
        expect(side.refracted.length).toBe(1); // no invented third layer
        const vApparent = DIPPING.v1 / Math.sin(side.side === 'right' ? ic + theta : ic - theta);
        // A branch of 3–4 picks spanning a few metres cannot pin its slope under 0.2 ms noise:
        // hold only the long branches (8 picks or more) to 3 %.
        if (side.refracted[0].count >= 8) expect(Math.abs(side.refracted[0].velocity! / vApparent - 1)).toBeLessThan(0.03);
      }
    }
    const w = shots.find((s) => s.id === 'W-end')!;
    expect(w.branchOfPick[17]).toBe(1);
    // The bad pick is left out of the line fit.
    const refractedPicks = w.branchOfPick.filter((b) => b === 1).length;
    expect(w.right!.refracted[0].count).toBe(refractedPicks - 1);
  });

  it('classes an off-end side with no direct arrivals as wholly refracted, using V1 from the other shots', () => {
    const survey = planarSurvey(FLAT, [...SHOTS, ['far-W', -40]]);
    const far = assignBranches(survey).find((s) => s.id === 'far-W')!;
    expect(far.position).toBe('off-end-left');
    expect(far.left).toBeNull();
    expect(far.right!.direct).toBeNull();
    expect(far.right!.refracted).toHaveLength(1);
    expect(far.right!.refracted[0].velocity).toBeCloseTo(2400, 5);
    expect(far.right!.crossoverDistance).toBeNull();
    expect(far.branchOfPick.every((b) => b === 1)).toBe(true);
  });

  it('without any two-branch side on the line, still classes a far off-end line as refracted by its intercept', () => {
    const far = assignBranches(planarSurvey(FLAT, [['far-W', -40]]))[0];
    expect(far.branchOfPick.every((b) => b === 1)).toBe(true);
    const near = assignBranches(planarSurvey(FLAT, [['W-end', -1]], GEOPHONES.slice(0, 5)))[0];
    expect(near.branchOfPick.every((b) => b === 0)).toBe(true);
    expect(near.right!.direct!.velocity).toBeCloseTo(600, 6);
  });

  it('honours a branch override exactly and marks it', () => {
    const survey = planarSurvey(FLAT);
    survey.options = { branchOverrides: [{ shot: 'W-end', side: 'right', directPicks: 3 }] };
    const shots = assignBranches(survey);
    const w = shots.find((s) => s.id === 'W-end')!;
    expect(w.branchOfPick).toEqual(GEOPHONES.map((_, i) => (i < 3 ? 0 : 1)));
    expect(w.right!.overridden).toBe(true);
    expect(w.right!.direct!.count).toBe(3);
    expect(w.right!.refracted[0].count).toBe(21);
    expect(shots.find((s) => s.id === 'mid')!.left!.overridden).toBe(false);
  });

  it('honours an override of 0 direct picks and a first-refractor count', () => {
    const survey = planarSurvey(FLAT);
    survey.options = { branchOverrides: [{ shot: 'mid', side: 'left', directPicks: 0, firstRefractorPicks: 4 }] };
    const mid = assignBranches(survey).find((s) => s.id === 'mid')!;
    // Left-side picks counted outward from x = 23: geophones 11, 10, 9, … .
    const expected = GEOPHONES.map((g, i) => (g.x > 23 ? mid.branchOfPick[i] : i >= 8 ? 1 : 2));
    expect(mid.branchOfPick).toEqual(expected);
    expect(mid.left!.direct).toBeNull();
    expect(mid.left!.refracted.map((l) => l.count)).toEqual([4, 8]);
  });

  it('keeps a pick at the shot position as direct and out of both sides', () => {
    const survey = planarSurvey(FLAT, [['at-10', 10]]);
    const s = assignBranches(survey)[0];
    expect(s.branchOfPick[5]).toBe(0);
    expect(s.left!.direct!.toX).toBeLessThan(10);
    expect(s.right!.direct!.fromX).toBeGreaterThan(10);
    expect(s.position).toBe('inside');
  });

  it('classes shot positions by half a geophone spacing and interpolates a missing shot elevation', () => {
    const geophones = GEOPHONES.map((g) => ({ x: g.x, elevation: 100 + g.x / 2 }));
    const survey: Survey = {
      geophones,
      shots: [
        ['a', -1.01],
        ['b', -0.99],
        ['c', 5],
        ['d', 46.9],
        ['e', 47.5],
      ].map(([id, x]) => ({ id: id as string, x: x as number, times: geophones.map(() => null) })),
    };
    survey.shots[3].elevation = 7;
    const shots = assignBranches(survey);
    expect(shots.map((s) => s.position)).toEqual(['off-end-left', 'end-left', 'inside', 'end-right', 'off-end-right']);
    expect(shots[2].elevation).toBeCloseTo(102.5, 10);
    expect(shots[0].elevation).toBe(100);
    expect(shots[3].elevation).toBe(7);
    expect(shots[2].left).toBeNull();
    expect(shots[2].branchOfPick.every((b) => b === null)).toBe(true);
  });

  it('never finds a second refractor when two layers are forced', () => {
    const survey = planarSurvey(FLAT);
    survey.options = { layers: 2 };
    for (const s of assignBranches(survey)) expect(s.branchOfPick.every((b) => b !== 2)).toBe(true);
  });
});
