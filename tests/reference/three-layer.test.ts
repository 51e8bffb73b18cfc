import { describe, expect, it } from 'vitest';
import { interpret } from '../../engine/pipeline/interpret.js';
import { syntheticSurvey } from '../../engine/forward/synthetic.js';
import type { LayeredModel } from '../../engine/forward/model.js';
import type { Interpretation } from '../../engine/output/interpretation.js';
import type { Survey } from '../../engine/survey/survey.js';

/**
 * Three flat layers (invented test model). Closed-form first arrivals, Kearey, Brooks &
 * Hill (An Introduction to Geophysical Exploration, 3rd ed., 2002, ch. 5, multi-layer case):
 * head wave along the top of layer n, t = x/V_n + Σ_{i<n} 2·h_i·cos(θ_in)/V_i with
 * sin θ_in = V_i/V_n; direct wave t = x/V1. Depths: z1 = h1, z2 = h1 + h2.
 */
const V = [500, 1500, 4000];
const H = [3, 8];
const Z = [H[0], H[0] + H[1]];

function firstArrivalMs(offsetM: number): number {
  const times = [(1000 * offsetM) / V[0]];
  for (let n = 1; n < V.length; n++) {
    let t = offsetM / V[n];
    for (let i = 0; i < n; i++) t += (2 * H[i] * Math.cos(Math.asin(V[i] / V[n]))) / V[i];
    times.push(1000 * t);
  }
  return Math.min(...times);
}

const GEOPHONES = Array.from({ length: 48 }, (_, i) => ({ x: 2 * i, elevation: 0 }));

function closedFormSurvey(shots: [string, number][], options?: Survey['options']): Survey {
  return {
    geophones: GEOPHONES,
    shots: shots.map(([id, x]) => ({ id, x, times: GEOPHONES.map((g) => Math.round(firstArrivalMs(Math.abs(g.x - x)) * 100) / 100) })),
    ...(options ? { options } : {}),
  };
}

const NEAR_OFF_END: [string, number][] = [['W-off', -12], ['W-end', -1], ['mid', 47], ['E-end', 95], ['E-off', 107]];
const FAR_OFF_END: [string, number][] = [['W-off', -30], ['W-end', -1], ['mid', 47], ['E-end', 95], ['E-off', 125]];

function expectThreeLayers(r: Interpretation, tolerance: number): void {
  expect(r.layers).toHaveLength(3);
  r.layers.forEach((l, i) => expect(Math.abs(l.velocity / V[i] - 1), `V${i + 1}`).toBeLessThan(0.02));
  for (const s of r.stations) {
    expect(s.depths, `x = ${s.x}`).toHaveLength(2);
    s.depths.forEach((d, k) => {
      expect(d, `x = ${s.x}, refractor ${k + 1}`).not.toBeNull();
      expect(Math.abs((d as number) / Z[k] - 1), `x = ${s.x}, refractor ${k + 1}`).toBeLessThan(tolerance);
    });
    expect(s.depth).toBe(s.depths[0]);
  }
  expect(JSON.parse(JSON.stringify(r))).toEqual(r);
}

describe('three flat layers, closed-form times (Kearey, Brooks & Hill 2002 ch. 5; Telford et al. 1990 ch. 4)', () => {
  it('finds the second refractor unforced and strips both depths within 10 % under every geophone', () => {
    const r = interpret(closedFormSurvey(NEAR_OFF_END));
    expect(r.shots.some((s) => s.branchOfPick.includes(2))).toBe(true);
    expectThreeLayers(r, 0.1);
    expect(r.qc.warnings.map((w) => w.code)).not.toContain('second-refractor-not-mapped');
  });

  it('maps it the same when three layers are forced', () => {
    expectThreeLayers(interpret(closedFormSurvey(NEAR_OFF_END, { layers: 3 })), 0.1);
  });

  it('puts far off-end shots that see only the second refractor on branch 2, and still maps both', () => {
    const r = interpret(closedFormSurvey(FAR_OFF_END));
    // W-off at −30 m: every offset (30–124 m) is past the 1→2 crossover (about 25 m).
    expect(r.shots.find((s) => s.id === 'W-off')!.branchOfPick.every((b) => b === 2)).toBe(true);
    expectThreeLayers(r, 0.1);
  });

  it('with two layers forced, ignores the deeper branch cleanly: two velocities, one depth per station, no second-refractor notes', () => {
    const r = interpret(closedFormSurvey(NEAR_OFF_END, { layers: 2 }));
    expect(r.shots.every((s) => !s.branchOfPick.includes(2))).toBe(true);
    expect(r.layers).toHaveLength(2);
    for (const s of r.stations) expect(s.depths).toHaveLength(1);
    expect(r.qc.warnings.filter((w) => w.code.includes('second-refractor'))).toEqual([]);
    expect(JSON.parse(JSON.stringify(r))).toEqual(r);
  });
});

describe('three flat layers, eikonal synthetic line (engine/forward/synthetic.ts)', () => {
  // Invented model: 4 m at 600 m/s over 7 m at 1800 m/s over 4500 m/s; flat ground at 100 m.
  const model: LayeredModel = {
    surface: [{ x: -40, elevation: 100 }, { x: 140, elevation: 100 }],
    layers: [
      { velocity: 600 },
      { velocity: 1800, top: [{ x: -40, elevation: 96 }, { x: 140, elevation: 96 }] },
      { velocity: 4500, top: [{ x: -40, elevation: 89 }, { x: 140, elevation: 89 }] },
    ],
  };
  const survey = syntheticSurvey(model, {
    geophoneCount: 48,
    firstX: 0,
    spacing: 2,
    shots: [{ x: -14, id: 'W-off' }, { x: -1, id: 'W-end' }, { x: 47, id: 'mid' }, { x: 95, id: 'E-end' }, { x: 108, id: 'E-off' }],
  });

  it('finds three layers unforced; velocities within 3 % and both depths within 10 % under every geophone', () => {
    const r = interpret(survey);
    const truthV = [600, 1800, 4500];
    const truthZ = [4, 11];
    expect(r.layers).toHaveLength(3);
    r.layers.forEach((l, i) => expect(Math.abs(l.velocity / truthV[i] - 1), `V${i + 1}`).toBeLessThan(0.03));
    for (const s of r.stations) {
      s.depths.forEach((d, k) => {
        expect(d, `x = ${s.x}, refractor ${k + 1}`).not.toBeNull();
        expect(Math.abs((d as number) / truthZ[k] - 1), `x = ${s.x}, refractor ${k + 1}`).toBeLessThan(0.1);
      });
    }
    expect(JSON.parse(JSON.stringify(r))).toEqual(r);
  });

  it('with 0.2 ms pick noise (4 seeds): median depth error within 5 %, every depth within 20 % (common practice for one-way delays)', () => {
    const median = (a: number[]): number => [...a].sort((p, q) => p - q)[Math.floor(a.length / 2)];
    for (let seed = 1; seed <= 4; seed++) {
      const noisy = syntheticSurvey(model, {
        geophoneCount: 48,
        firstX: 0,
        spacing: 2,
        shots: [{ x: -14, id: 'W-off' }, { x: -1, id: 'W-end' }, { x: 47, id: 'mid' }, { x: 95, id: 'E-end' }, { x: 108, id: 'E-off' }],
      }, { noiseMs: 0.2, seed });
      const r = interpret(noisy);
      expect(r.layers, `seed ${seed}`).toHaveLength(3);
      [4, 11].forEach((truth, k) => {
        const errors = r.stations.map((s) => (s.depths[k] === null || s.depths[k] === undefined ? Infinity : Math.abs((s.depths[k] as number) / truth - 1)));
        expect(median(errors), `seed ${seed}, refractor ${k + 1}`).toBeLessThan(0.05);
        expect(Math.max(...errors), `seed ${seed}, refractor ${k + 1}`).toBeLessThan(0.2);
      });
    }
  });
});
