import { describe, expect, it } from 'vitest';
import { assignBranches } from '../../engine/branches/assign-branches.js';
import { topLayerVelocity } from '../../engine/velocities/direct-velocity.js';
import { theilSenSlope } from '../../engine/velocities/theil-sen.js';
import { opposingPairs } from '../../engine/velocities/opposing-pairs.js';
import { opposingPairVelocities, slopeInterceptDip } from '../../engine/velocities/slope-intercept.js';
import { firstArrivalMs, type PlanarRefractorModel } from '../../engine/forward/planar-refractor.js';
import type { ShotAnalysis, SideBranches } from '../../engine/output/interpretation.js';
import type { Geophone, Survey } from '../../engine/survey/survey.js';

// Invented test line: 24 geophones at 2 m, five shots; closed-form times (Kearey, Brooks & Hill 2002, ch. 5).
const GEOPHONES: Geophone[] = Array.from({ length: 24 }, (_, i) => ({ x: 2 * i }));
const SHOTS: [string, number][] = [
  ['W-off', -12],
  ['W-end', -1],
  ['mid', 23],
  ['E-end', 47],
  ['E-off', 58],
];
const FLAT: PlanarRefractorModel = { v1: 600, v2: 2400, refractorElevationAtZero: -6, dipDegrees: 0 };

function planarSurvey(model: PlanarRefractorModel): Survey {
  return {
    geophones: GEOPHONES,
    shots: SHOTS.map(([id, x]) => ({
      id,
      x,
      times: GEOPHONES.map((g) => firstArrivalMs(model, { x, elevation: 0 }, { x: g.x, elevation: 0 })),
    })),
  };
}

function side(s: 'left' | 'right', refracted: { velocity: number; interceptMs: number; fromX: number; toX: number }[]): SideBranches {
  return {
    side: s,
    direct: null,
    refracted: refracted.map((r) => ({ ...r, count: 5, rmsMs: 0 })),
    crossoverDistance: null,
    overridden: false,
  };
}

function shot(id: string, x: number, left: SideBranches | null, right: SideBranches | null): ShotAnalysis {
  return { id, x, elevation: 0, position: 'inside', left, right, branchOfPick: [] };
}

describe('theilSenSlope (Theil 1950; Sen 1968)', () => {
  it('ignores one wild point among ten', () => {
    const xs = Array.from({ length: 10 }, (_, i) => i);
    const ys = xs.map((x) => 2 * x + 1);
    ys[6] += 50;
    expect(theilSenSlope(xs, ys)).toBeCloseTo(2, 12);
  });
  it('returns null without two distinct x', () => {
    expect(theilSenSlope([1, 1], [2, 3])).toBeNull();
    expect(theilSenSlope([], [])).toBeNull();
  });
});

describe('topLayerVelocity', () => {
  it('gives V1 from every direct branch of a closed-form line', () => {
    const survey = planarSurvey(FLAT);
    const r = topLayerVelocity(assignBranches(survey), survey);
    expect(r.velocity).toBeCloseTo(600, 6);
    // W-end right, mid left and right, E-end left, and both off-end shots see direct picks.
    expect(r.perSide.map((p) => `${p.shot}:${p.side}`)).toEqual([
      'W-off:right',
      'W-end:right',
      'mid:left',
      'mid:right',
      'E-end:left',
      'E-off:left',
    ]);
  });

  it('is not moved more than 1 % by a 4 ms bad pick on a direct branch', () => {
    const survey = planarSurvey(FLAT);
    // Force the branch so the bad pick stays on the direct wave, then spoil it.
    survey.options = { branchOverrides: [{ shot: 'mid', side: 'right', directPicks: 8 }] };
    survey.shots[2].times[14] = survey.shots[2].times[14]! + 4;
    const r = topLayerVelocity(assignBranches(survey), survey);
    const midRight = r.perSide.find((p) => p.shot === 'mid' && p.side === 'right')!;
    expect(Math.abs(midRight.velocity / 600 - 1)).toBeLessThan(0.05);
    expect(Math.abs(r.velocity! / 600 - 1)).toBeLessThan(0.01);
  });

  it('is null when no direct pick exists', () => {
    const survey = planarSurvey(FLAT);
    survey.shots = [{ id: 'far', x: -60, times: GEOPHONES.map((g) => firstArrivalMs(FLAT, { x: -60, elevation: 0 }, { x: g.x, elevation: 0 })) }];
    const r = topLayerVelocity(assignBranches(survey), survey);
    expect(r.velocity).toBeNull();
    expect(r.perSide).toEqual([]);
  });
});

describe('slopeInterceptDip', () => {
  it('gives V2 = Vd = Vu and zero dip for equal apparent velocities', () => {
    const r = slopeInterceptDip(600, 2400, 2400)!;
    expect(r.trueVelocity).toBeCloseTo(2400, 8);
    expect(r.dipDegrees).toBe(0);
    expect(r.criticalAngleDegrees).toBeCloseTo((Math.asin(0.25) * 180) / Math.PI, 10);
  });

  it('turns the sign of the dip when the two velocities swap', () => {
    const a = slopeInterceptDip(600, 2000, 3000)!;
    const b = slopeInterceptDip(600, 3000, 2000)!;
    expect(a.dipDegrees).toBeGreaterThan(0);
    expect(b.dipDegrees).toBeCloseTo(-a.dipDegrees, 12);
    expect(b.trueVelocity).toBeCloseTo(a.trueVelocity, 8);
  });

  it.each([
    [600, 600, 2400],
    [600, 2400, 500],
    [0, 2400, 2400],
    [-600, 2400, 2400],
    [Number.NaN, 2400, 2400],
    [600, Number.POSITIVE_INFINITY, 2400],
  ])('returns null, never NaN, for V1 %s, Vd %s, Vu %s', (v1, vd, vu) => {
    expect(slopeInterceptDip(v1, vd, vu)).toBeNull();
  });
});

describe('opposingPairVelocities', () => {
  it('puts the dip positive where the refractor deepens toward +x and names the down-dip branch', () => {
    // Shooting toward +x slower (2000) than toward −x (3000): down-dip toward +x.
    const a = shot('A', 0, null, side('right', [{ velocity: 2000, interceptMs: 20, fromX: 10, toX: 46 }]));
    const b = shot('B', 46, side('left', [{ velocity: 3000, interceptMs: 30, fromX: 0, toX: 36 }]), null);
    const r = opposingPairVelocities(600, a, b)!;
    expect(r.dipDegrees).toBeGreaterThan(0);
    expect(r.downDipVelocity).toBe(2000);
    expect(r.upDipVelocity).toBe(3000);
    expect(r.shots).toEqual(['A', 'B']);
    const ic = (r.criticalAngleDegrees * Math.PI) / 180;
    const h = (600 * 0.02) / (2 * Math.cos(ic));
    expect(r.depthUnderShots[0]).toEqual({ shot: 'A', normalDepth: expect.closeTo(h, 10), verticalDepth: expect.closeTo(h / Math.cos((r.dipDegrees * Math.PI) / 180), 10) });
  });

  it('returns null when a branch is missing, the order is wrong or V1 is too fast', () => {
    const a = shot('A', 0, null, side('right', [{ velocity: 2000, interceptMs: 20, fromX: 10, toX: 46 }]));
    const b = shot('B', 46, side('left', [{ velocity: 3000, interceptMs: 30, fromX: 0, toX: 36 }]), null);
    expect(opposingPairVelocities(600, b, a)).toBeNull();
    expect(opposingPairVelocities(2500, a, b)).toBeNull();
    expect(opposingPairVelocities(600, a, shot('C', 46, side('left', []), null))).toBeNull();
  });

  it('leaves out a shot whose intercept is negative instead of giving a negative depth', () => {
    const a = shot('A', 0, null, side('right', [{ velocity: 2000, interceptMs: -1, fromX: 10, toX: 46 }]));
    const b = shot('B', 46, side('left', [{ velocity: 3000, interceptMs: 30, fromX: 0, toX: 36 }]), null);
    expect(opposingPairVelocities(600, a, b)!.depthUnderShots.map((d) => d.shot)).toEqual(['B']);
  });
});

describe('opposingPairs', () => {
  it('pairs shots whose facing refracted branches overlap in x, left shot first', () => {
    const a = shot('A', 0, null, side('right', [{ velocity: 2000, interceptMs: 20, fromX: 10, toX: 46 }]));
    const b = shot('B', 46, side('left', [{ velocity: 3000, interceptMs: 30, fromX: 0, toX: 36 }]), null);
    const c = shot('C', 60, side('left', [{ velocity: 3000, interceptMs: 30, fromX: 50, toX: 58 }]), null);
    const d = shot('D', 20, side('left', [{ velocity: 3000, interceptMs: 30, fromX: 0, toX: 8 }]), null);
    const pairs = opposingPairs([c, b, a, d]);
    expect(pairs.map(([l, r]) => `${l.id}-${r.id}`)).toEqual(['A-B']);
  });

  it('finds every opposing pair of the five-shot closed-form line', () => {
    const pairs = opposingPairs(assignBranches(planarSurvey(FLAT)));
    const names = pairs.map(([l, r]) => `${l.id}-${r.id}`);
    expect(names).toContain('W-end-E-end');
    expect(names).toContain('W-off-E-off');
    for (const [l, r] of pairs) expect(l.x).toBeLessThan(r.x);
  });
});
