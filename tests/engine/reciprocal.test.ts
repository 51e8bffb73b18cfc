import { describe, expect, it } from 'vitest';
import { assignBranches } from '../../engine/branches/assign-branches.js';
import { reciprocalChecks } from '../../engine/reciprocal/reciprocal-checks.js';
import { resolveOptions } from '../../engine/survey/options.js';

/** The resolved default options with another reciprocal tolerance, ms. */
const tolerance = (ms: number) => ({ ...resolveOptions(undefined), reciprocalToleranceMs: ms });
import { firstArrivalMs, type PlanarRefractorModel } from '../../engine/forward/planar-refractor.js';
import type { Geophone, Survey } from '../../engine/survey/survey.js';

// Invented test line; closed-form first arrivals over a dipping planar refractor
// (Kearey, Brooks & Hill 2002, ch. 5), which obey reciprocity exactly.
const GEOPHONES: Geophone[] = Array.from({ length: 24 }, (_, i) => ({ x: 2 * i }));
const MODEL: PlanarRefractorModel = { v1: 600, v2: 2400, refractorElevationAtZero: -5, dipDegrees: 3 };

function survey(shots: [string, number][]): Survey {
  return {
    geophones: GEOPHONES,
    shots: shots.map(([id, x]) => ({
      id,
      x,
      times: GEOPHONES.map((g) => firstArrivalMs(MODEL, { x, elevation: 0 }, { x: g.x, elevation: 0 })),
    })),
  };
}

describe('reciprocalChecks', () => {
  it('finds no misfit between end shots on geophones (difference ≈ 0)', () => {
    const s = survey([
      ['W-end', 0],
      ['E-end', 46],
    ]);
    const { checks, warnings } = reciprocalChecks(s, assignBranches(s), tolerance(3));
    expect(checks).toHaveLength(1);
    const c = checks[0];
    expect(c.shots).toEqual(['W-end', 'E-end']);
    expect(c.forwardSource).toBe('geophone');
    expect(c.reverseSource).toBe('geophone');
    expect(c.forwardMs).toBe(s.shots[0].times[23]);
    expect(c.reverseMs).toBe(s.shots[1].times[0]);
    expect(c.differenceMs).toBeLessThan(1e-9);
    expect(c.ok).toBe(true);
    expect(c.toleranceMs).toBe(3);
    expect(warnings).toEqual([]);
  });

  it('extrapolates along the refracted branch for off-end shots, still agreeing to 1e-6 ms', () => {
    const s = survey([
      ['W-off', -20],
      ['W-end', -1],
      ['E-end', 47],
      ['E-off', 66],
    ]);
    const { checks, warnings } = reciprocalChecks(s, assignBranches(s), resolveOptions(undefined));
    const pair = checks.find((c) => c.shots.join() === 'W-off,E-off')!;
    expect(pair.forwardSource).toBe('extrapolated');
    expect(pair.reverseSource).toBe('extrapolated');
    const truth = firstArrivalMs(MODEL, { x: -20, elevation: 0 }, { x: 66, elevation: 0 });
    expect(pair.forwardMs).toBeCloseTo(truth, 6);
    for (const c of checks) expect(c.differenceMs).toBeLessThan(1e-6);
    // W-end and E-end lie 1 m off the end geophones (more than a quarter spacing): extrapolated.
    const ends = checks.find((c) => c.shots.join() === 'W-end,E-end')!;
    expect(ends.forwardSource).toBe('extrapolated');
    expect(warnings).toEqual([]);
    // W-off and W-end do not face each other's side of picks in the right order: W-end has no left side.
    expect(checks.some((c) => c.shots.join() === 'W-off,W-end')).toBe(false);
  });

  it('flags a 5 ms bad pick at the far end with a reciprocal-misfit warning naming the pair', () => {
    const s = survey([
      ['W-end', 0],
      ['E-end', 46],
    ]);
    s.shots[0].times[23] = s.shots[0].times[23]! + 5;
    const { checks, warnings } = reciprocalChecks(s, assignBranches(s), resolveOptions(undefined));
    expect(checks[0].differenceMs).toBeCloseTo(5, 9);
    expect(checks[0].ok).toBe(false);
    expect(warnings).toHaveLength(1);
    expect(warnings[0].code).toBe('reciprocal-misfit');
    expect(warnings[0].message).toContain('W-end');
    expect(warnings[0].message).toContain('E-end');
    expect(warnings[0].message).toContain('5.0 ms');
  });

  it('accepts the same 5 ms misfit under a 6 ms tolerance', () => {
    const s = survey([
      ['W-end', 0],
      ['E-end', 46],
    ]);
    s.shots[0].times[23] = s.shots[0].times[23]! + 5;
    const { checks, warnings } = reciprocalChecks(s, assignBranches(s), tolerance(6));
    expect(checks[0].ok).toBe(true);
    expect(warnings).toEqual([]);
  });

  it('without a tolerance option, passes opposing shots that agree within 3 ms and flags those that do not', () => {
    const shifted = (ms: number): Survey => {
      const s = survey([
        ['W-end', 0],
        ['E-end', 46],
      ]);
      s.shots[0].times[23] = s.shots[0].times[23]! + ms;
      return s;
    };
    const within = shifted(2.5);
    const beyond = shifted(3.5);
    expect(reciprocalChecks(within, assignBranches(within), resolveOptions(within.options)).checks[0].ok).toBe(true);
    const flagged = reciprocalChecks(beyond, assignBranches(beyond), resolveOptions(beyond.options));
    expect(flagged.checks[0].ok).toBe(false);
    expect(flagged.warnings.map((w) => w.code)).toEqual(['reciprocal-misfit']);
  });

  it('falls back to the refracted branch when the pick at the other shot is missing', () => {
    const s = survey([
      ['W-end', 0],
      ['E-end', 46],
    ]);
    s.shots[0].times[23] = null;
    const { checks } = reciprocalChecks(s, assignBranches(s), tolerance(3));
    expect(checks[0].forwardSource).toBe('extrapolated');
    expect(checks[0].differenceMs).toBeLessThan(1e-6);
  });

  it('skips a pair, in one warning, when neither shot has a time of the same wave at the other', () => {
    // Two shots 20 m apart with direct picks only, each within 6 m of itself (a weak
    // source): no refracted branch, and a direct time 15 m beyond the picks is not read.
    const s = survey([
      ['a', 1],
      ['b', 21],
    ]);
    s.shots[0].times = s.shots[0].times.map((t, i) => (i <= 3 ? t : null));
    s.shots[1].times = s.shots[1].times.map((t, i) => (i >= 8 && i <= 12 ? t : null));
    const { checks, warnings } = reciprocalChecks(s, assignBranches(s), tolerance(3));
    expect(checks).toEqual([]);
    expect(warnings).toHaveLength(1);
    expect(warnings[0].code).toBe('reciprocal-unavailable');
    expect(warnings[0].message).toContain('a with b');
  });

  it('compares shots closer than the crossover distance as direct-wave times, marked so', () => {
    // 6 m apart, midway between geophones; the crossover distance of MODEL is about 15 m there
    // (x_c = 2h·√((V2+V1)/(V2−V1)), Telford, Geldart & Sheriff 1990, §4.3, from memory).
    const s = survey([
      ['a', 17],
      ['b', 23],
    ]);
    const { checks, warnings } = reciprocalChecks(s, assignBranches(s), tolerance(3));
    expect(checks).toHaveLength(1);
    expect(checks[0].wave).toBe('direct');
    // Direct wave t = |AB|/V1 (Telford et al. 1990, §4.3): 6 m at 600 m/s = 10 ms both ways.
    expect(checks[0].forwardMs).toBeCloseTo(10, 6);
    expect(checks[0].reverseMs).toBeCloseTo(10, 6);
    expect(warnings).toEqual([]);
  });

  it('never compares a direct pick with an extrapolated head-wave time (issue 11: a false 11.9 ms misfit)', () => {
    // b sits 1 m from the geophone at 30, a at 20.5; 10.5 m apart, inside the crossover
    // distance: b's pick at 20 is a direct arrival, a's head-wave branch starts beyond 33 m.
    const s = survey([
      ['a', 20.5],
      ['b', 31],
    ]);
    const { checks, warnings } = reciprocalChecks(s, assignBranches(s), tolerance(3));
    expect(checks).toHaveLength(1);
    expect(checks[0].wave).toBe('direct');
    expect(checks[0].differenceMs).toBeLessThan(1e-6);
    expect(warnings).toEqual([]);
  });
});

describe('reciprocalChecks: local readings', () => {
  it('reads a curved branch from the picks nearest the other shot, not from a line through the whole branch', () => {
    // A branch bending by 0.004 ms/m² (an undulating refractor does this): the time 1 m
    // beyond the last geophone follows the local slope.
    const curved = (x: number): number => 10 + x / 2.2 + 0.004 * (x - 10) ** 2;
    const geophones = GEOPHONES;
    const s: Survey = {
      geophones,
      shots: [
        { id: 'W-end', x: -1, times: geophones.map((g) => curved(g.x)) },
        { id: 'E-end', x: 47, times: geophones.map((g) => 5 + (47 - g.x) / 2.4) },
      ],
    };
    const shots = assignBranches(s, { ...resolveOptions(undefined), layers: 2 });
    // Make every pick of both shots refracted so the rule under test is the only one at work.
    for (const shot of shots) shot.branchOfPick = shot.branchOfPick.map((b) => (b === null ? null : 1));
    const check = reciprocalChecks(s, shots, tolerance(3)).checks[0];
    expect(check.forwardSource).toBe('extrapolated');
    expect(check.forwardGapM).toBeCloseTo(1, 9);
    // The exact value lies between the local tangent and the curve; a least-squares line
    // through all 24 picks misses it by over 1 ms.
    const xs = geophones.map((g) => g.x);
    const ts = xs.map(curved);
    const mx = xs.reduce((a, v) => a + v, 0) / xs.length;
    const mt = ts.reduce((a, v) => a + v, 0) / ts.length;
    const slope = xs.reduce((a, x, i) => a + (x - mx) * (ts[i] - mt), 0) / xs.reduce((a, x) => a + (x - mx) ** 2, 0);
    const wholeLine = mt + slope * (47 - mx);
    expect(Math.abs(wholeLine - curved(47))).toBeGreaterThan(1);
    expect(Math.abs(check.forwardMs - curved(47))).toBeLessThan(0.1);
  });

  it('widens the tolerance for long extrapolations, and still flags a misfit beyond it', () => {
    const s = survey([
      ['W-off', -30],
      ['W-end', -1],
      ['E-end', 47],
      ['E-off', 76],
    ]);
    // A 5 ms trigger error on E-off: its pairs rest on a 30 m extrapolation (allowance
    // 2·0.5·30/(2·2) = 7.5 ms per long reading), so reciprocity cannot prove it…
    const late = (ms: number): Survey => ({
      ...s,
      shots: s.shots.map((shot) => (shot.id === 'E-off' ? { ...shot, times: shot.times.map((t) => (t === null ? null : t + ms)) } : shot)),
    });
    const small = reciprocalChecks(late(5), assignBranches(late(5), { ...resolveOptions(undefined), layers: 2 }), tolerance(3));
    const far = small.checks.find((c) => c.shots.join() === 'W-off,E-off')!;
    expect(far.extrapolationAllowanceMs).toBeCloseTo(15, 6);
    expect(far.ok).toBe(true);
    // …but a 20 ms error is beyond tolerance + allowance, and the warning names the long reading.
    const big = reciprocalChecks(late(20), assignBranches(late(20), { ...resolveOptions(undefined), layers: 2 }), tolerance(3));
    const misfit = big.warnings.find((w) => w.code === 'reciprocal-misfit' && w.message.includes('W-end and E-off'));
    expect(misfit?.message).toContain("W-end at E-off's position is extrapolated 30.0 m");
    expect(big.checks.find((c) => c.shots.join() === 'W-end,E-end')!.ok).toBe(true);
  });

});
