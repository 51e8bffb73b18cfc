import { describe, expect, it } from 'vitest';
import { resolveOptions } from '../../engine/survey/options.js';
import { assignBranches } from '../../engine/branches/assign-branches.js';
import type { Geophone, Survey } from '../../engine/survey/survey.js';
import { gaussian, mulberry32 } from '../helpers/random.js';

/**
 * Three flat layers (invented test model). Head wave from the top of layer n along the
 * surface, Kearey, Brooks & Hill 2002, ch. 5:  t = x/V_n + Σ_{i<n} 2·h_i·cos(θ_in)/V_i,
 * θ_in = asin(V_i/V_n); direct wave t = x/V1.
 */
const V = [500, 1500, 4000];
const H = [3, 8];

function branchTimesMs(offsetM: number): number[] {
  const times = [(1000 * offsetM) / V[0]];
  for (let n = 1; n < V.length; n++) {
    let t = offsetM / V[n];
    for (let i = 0; i < n; i++) t += (2 * H[i] * Math.cos(Math.asin(V[i] / V[n]))) / V[i];
    times.push(1000 * t);
  }
  return times;
}

function trueBranch(offsetM: number): 0 | 1 | 2 {
  const t = branchTimesMs(offsetM);
  return t.indexOf(Math.min(...t)) as 0 | 1 | 2;
}

function intercept(n: 1 | 2): number {
  return branchTimesMs(0)[n];
}

const GEOPHONES: Geophone[] = Array.from({ length: 48 }, (_, i) => ({ x: 2 * i }));
const SHOTS: [string, number][] = [
  ['W-end', -1],
  ['mid', 47],
  ['E-end', 95],
];

function survey(noiseMs = 0, seed = 1): Survey {
  const rng = mulberry32(seed);
  return {
    geophones: GEOPHONES,
    shots: SHOTS.map(([id, x]) => ({
      id,
      x,
      times: GEOPHONES.map((g) => Math.min(...branchTimesMs(Math.abs(g.x - x))) + noiseMs * gaussian(rng)),
    })),
  };
}

describe('three-layer branch split (closed-form flat layers, Kearey, Brooks & Hill 2002, ch. 5)', () => {
  it('finds the second refracted branch unforced and puts every pick on its true branch', () => {
    const shots = assignBranches(survey());
    for (const s of shots) {
      expect(s.branchOfPick).toEqual(GEOPHONES.map((g) => trueBranch(Math.abs(g.x - s.x))));
    }
    const w = shots[0].right!;
    expect(w.direct!.velocity).toBeCloseTo(V[0], 6);
    expect(w.refracted.map((l) => l.velocity! / V[1 + w.refracted.indexOf(l)])).toEqual([
      expect.closeTo(1, 8),
      expect.closeTo(1, 8),
    ]);
    expect(w.refracted[0].interceptMs).toBeCloseTo(intercept(1), 6);
    expect(w.refracted[1].interceptMs).toBeCloseTo(intercept(2), 6);
  });

  it('still finds it with 0.2 ms noise (10 seeds), long-branch velocities within 3 %', () => {
    for (let seed = 1; seed <= 10; seed++) {
      const shots = assignBranches(survey(0.2, seed));
      for (const s of [shots[0].right!, shots[2].left!]) {
        expect(s.refracted).toHaveLength(2);
        expect(Math.abs(s.refracted[1].velocity! / V[2] - 1)).toBeLessThan(0.03);
        expect(Math.abs(s.direct!.velocity! / V[0] - 1)).toBeLessThan(0.1);
      }
    }
  });

  it('keeps two layers when two are forced', () => {
    const s = survey();
    const shots = assignBranches(s, { ...resolveOptions(s.options), layers: 2 });
    for (const shot of shots) expect(shot.branchOfPick.includes(2)).toBe(false);
    expect(shots[0].right!.refracted).toHaveLength(1);
  });

  it('gives an off-end side with two refracted branches and no direct one the branches 1 and 2', () => {
    const s = survey();
    s.shots.push({
      id: 'far-W',
      x: -12,
      times: GEOPHONES.map((g) => Math.min(...branchTimesMs(g.x + 12))),
    });
    const far = assignBranches(s).find((x) => x.id === 'far-W')!;
    expect(far.right!.direct).toBeNull();
    expect(far.right!.refracted).toHaveLength(2);
    expect(far.branchOfPick).toEqual(GEOPHONES.map((g) => trueBranch(g.x + 12)));
    expect(far.branchOfPick.includes(0)).toBe(false);
    expect(far.right!.refracted[0].velocity).toBeCloseTo(V[1], 5);
    expect(far.right!.refracted[1].velocity).toBeCloseTo(V[2], 5);
  });

  it('honours firstRefractorPicks in an override (counted outward from the shot, direct picks included)', () => {
    const s = survey();
    s.options = { layers: 3, branchOverrides: [{ shot: 'W-end', side: 'right', directPicks: 4, firstRefractorPicks: 12 }] };
    const w = assignBranches(s)[0];
    // The automatic split would put pick 12 (offset 25 m) on the first refractor.
    expect(assignBranches(survey())[0].branchOfPick[12]).toBe(1);
    expect(w.branchOfPick).toEqual(GEOPHONES.map((_, i) => (i < 4 ? 0 : i < 12 ? 1 : 2)));
    expect(w.right!.overridden).toBe(true);
    expect(w.right!.refracted.map((l) => l.count)).toEqual([8, 36]);
  });
});
