/**
 * Step detectors: delay-time profile, single branches, and their combination.
 *
 * Synthetic first arrivals over a stepped refractor come from Fermat's principle, computed
 * here by brute force: the interface (flat at depth zL for x < xs, a vertical face at xs,
 * flat at depth zR beyond) is sampled every 0.1 m, and the least time from the shot to each
 * interface point is found by Dijkstra's algorithm over straight segments, each travelled
 * at V1 when it lies in the top layer and at V2 when it lies in the refractor (head waves
 * run along the interface at V2, diffractions round the corners are included). A geophone's
 * time is the least over interface points of that time plus the straight V1 leg up to it.
 * Over a flat stretch this reproduces t = x/V2 + 2·z·cos(ic)/V1 (Kearey, Brooks & Hill
 * 2002 ch. 5), which the first test checks. Delay times follow Hagedoorn (1959):
 * δ = (t_AG + t_BG − t_AB)/2. Expected jump Δt = Δz·cos(ic)/V1 (DESIGN.md).
 */
import { describe, expect, it } from 'vitest';
import {
  combineStepEvidence,
  correctStepPosition,
  findBranchSteps,
  findDelayTimeSteps,
  throwFromDelayJump,
} from '../../../engine/structure/steps.js';
import { headWaveTimeMs, type PlanarRefractorModel } from '../../../engine/forward/planar-refractor.js';
import { gaussian, mulberry32 } from '../../helpers/random.js';

interface SteppedModel {
  v1: number;
  v2: number;
  xs: number;
  zL: number;
  zR: number;
}

type Pt = [number, number];

function sideDepth(m: SteppedModel, x: number): number {
  return x < m.xs ? m.zL : m.zR;
}

/** Whether the straight segment p→q lies in the top layer (above) or the refractor (below). */
function segmentIn(m: SteppedModel, p: Pt, q: Pt, layer: 'top' | 'refractor'): boolean {
  const [x0, z0] = p[0] <= q[0] ? p : q;
  const [x1, z1] = p[0] <= q[0] ? q : p;
  const depthAt = (x: number): number => (x1 === x0 ? z0 : z0 + ((z1 - z0) * (x - x0)) / (x1 - x0));
  const ok = (z: number, limit: number): boolean => (layer === 'top' ? z <= limit + 1e-9 : z >= limit - 1e-9);
  // The interface is flat on each side, so checking the ends of each side's portion suffices.
  if (x0 < m.xs) {
    const end = Math.min(x1, m.xs);
    if (end > x0 && (!ok(depthAt(x0), m.zL) || !ok(depthAt(end), m.zL))) return false;
  }
  if (x1 > m.xs) {
    const start = Math.max(x0, m.xs);
    if (x1 > start && (!ok(depthAt(start), m.zR) || !ok(depthAt(x1), m.zR))) return false;
  }
  return true;
}

function interfaceNodes(m: SteppedModel, xMin: number, xMax: number): Pt[] {
  const nodes: Pt[] = [];
  const ds = 0.1;
  for (let x = xMin; x < Math.min(m.xs, xMax); x += ds) nodes.push([x, m.zL]);
  if (m.xs >= xMin && m.xs <= xMax) {
    const top = Math.min(m.zL, m.zR);
    const bottom = Math.max(m.zL, m.zR);
    for (let z = top; z <= bottom + 1e-9; z += ds) nodes.push([m.xs, z]);
    nodes.push([m.xs, bottom]);
  }
  for (let x = Math.max(m.xs + ds, xMin); x <= xMax; x += ds) nodes.push([x, m.zR]);
  return nodes;
}

/** First refracted (head or diffracted) arrival, ms, at each receiver from a surface shot. */
function refractedTimesMs(m: SteppedModel, shotX: number, receiversX: number[]): number[] {
  const nodes = interfaceNodes(m, Math.min(shotX, ...receiversX) - 1, Math.max(shotX, ...receiversX) + 1);
  const n = nodes.length;
  const shot: Pt = [shotX, 0];
  const dist = nodes.map((p) => (segmentIn(m, shot, p, 'top') ? Math.hypot(p[0] - shotX, p[1]) / m.v1 : Infinity));
  const done = new Array<boolean>(n).fill(false);
  for (let it = 0; it < n; it++) {
    let u = -1;
    for (let i = 0; i < n; i++) if (!done[i] && (u < 0 || dist[i] < dist[u])) u = i;
    if (u < 0 || dist[u] === Infinity) break;
    done[u] = true;
    const p = nodes[u];
    for (let i = 0; i < n; i++) {
      if (done[i]) continue;
      const q = nodes[i];
      const len = Math.hypot(q[0] - p[0], q[1] - p[1]);
      let cost = Infinity;
      if (segmentIn(m, p, q, 'refractor')) cost = len / m.v2;
      else if (segmentIn(m, p, q, 'top')) cost = len / m.v1;
      if (dist[u] + cost < dist[i]) dist[i] = dist[u] + cost;
    }
  }
  return receiversX.map((gx) => {
    const g: Pt = [gx, 0];
    let best = Infinity;
    for (let i = 0; i < n; i++) {
      if (dist[i] === Infinity || !segmentIn(m, nodes[i], g, 'top')) continue;
      best = Math.min(best, dist[i] + Math.hypot(gx - nodes[i][0], nodes[i][1]) / m.v1);
    }
    return 1000 * best;
  });
}

const SPACING = 2;
const XS = Array.from({ length: 48 }, (_, i) => i * SPACING);
const SHOT_A = -24;
const SHOT_B = 118;

interface Synthetic {
  tA: number[];
  tB: number[];
  delay: number[];
  depth: number[];
}

const cache = new Map<string, { tA: number[]; tB: number[]; tAB: number }>();
function synthetic(m: SteppedModel, pickSigmaMs: number, seed: number, xs: number[] = XS): Synthetic {
  const key = JSON.stringify([m, xs]);
  if (!cache.has(key)) {
    const a = refractedTimesMs(m, SHOT_A, [...xs, SHOT_B]);
    const b = refractedTimesMs(m, SHOT_B, xs);
    cache.set(key, { tA: a.slice(0, xs.length), tB: b, tAB: a[xs.length] });
  }
  const exact = cache.get(key)!;
  const rng = mulberry32(seed);
  const tA = exact.tA.map((t) => t + pickSigmaMs * gaussian(rng));
  const tB = exact.tB.map((t) => t + pickSigmaMs * gaussian(rng));
  const tAB = exact.tAB + pickSigmaMs * gaussian(rng);
  return { tA, tB, delay: tA.map((t, i) => (t + tB[i] - tAB) / 2), depth: xs.map((x) => sideDepth(m, x)) };
}

const DOWN_RIGHT: SteppedModel = { v1: 1000, v2: 2500, xs: 47, zL: 5, zR: 9 };
const DOWN_LEFT: SteppedModel = { v1: 1000, v2: 2500, xs: 47, zL: 9, zR: 5 };
const SLOW_TOP: SteppedModel = { v1: 600, v2: 3000, xs: 61, zL: 4, zR: 7 };

describe('stepped-refractor synthetic (Fermat by Dijkstra)', () => {
  it('reproduces the flat-refractor head-wave formula away from the step (Kearey et al. 2002 ch. 5)', () => {
    const flat: SteppedModel = { v1: 1000, v2: 2500, xs: 1000, zL: 6, zR: 6 };
    const t = refractedTimesMs(flat, 0, [20, 40, 60]);
    const ic = Math.asin(flat.v1 / flat.v2);
    [20, 40, 60].forEach((x, i) => {
      const closed = (1000 * x) / flat.v2 + (1000 * 2 * 6 * Math.cos(ic)) / flat.v1;
      expect(Math.abs(t[i] - closed)).toBeLessThan(0.01);
    });
  });
});

describe('findDelayTimeSteps', () => {
  const cases: [string, SteppedModel][] = [
    ['4 m down toward +x, V1 1000, V2 2500', DOWN_RIGHT],
    ['4 m down toward −x, V1 1000, V2 2500', DOWN_LEFT],
    ['3 m down toward +x, V1 600, V2 3000', SLOW_TOP],
  ];
  const XS3 = Array.from({ length: 32 }, (_, i) => i * 3);
  for (const [label, m] of cases) {
    it(`finds the step (${label}) at 3 m spacing within two spacings, throw within 30 %, right sign, over 20 seeds`, () => {
      const trueThrow = m.zR - m.zL;
      let worstPos = 0;
      let worstThrow = 0;
      for (let seed = 1; seed <= 20; seed++) {
        const s = synthetic(m, 0.4, seed, XS3);
        const found = findDelayTimeSteps(XS3, s.delay, { pickSigmaMs: 0.4, v1MPerS: m.v1, v2MPerS: m.v2 });
        expect(found).toHaveLength(1);
        const f = found[0];
        worstPos = Math.max(worstPos, Math.abs(f.x - m.xs));
        worstThrow = Math.max(worstThrow, Math.abs(f.throwM / trueThrow - 1));
        expect(Math.sign(f.throwM)).toBe(Math.sign(trueThrow));
        expect(Math.abs(f.x - m.xs)).toBeLessThanOrEqual(2 * 3);
        expect(Math.abs(f.throwM / trueThrow - 1)).toBeLessThan(0.3);
      }
      console.log(`[steps] delay-time, 3 m spacing, ${label}: worst position error ${worstPos.toFixed(1)} m, worst throw error ${(100 * worstThrow).toFixed(1)} %`);
    });

    it(`finds the step (${label}) at 2 m spacing within 0.75 of the deeper depth, throw within 30 %, over 20 seeds`, () => {
      // At 2 m spacing the ramp's centre lies 3–5 m toward the downthrown side in this
      // Fermat model (diffraction at the step's corners makes the smear asymmetric), which is
      // more than two spacings; the bound here is the physical one, a fraction of the depth
      // over which DESIGN.md says steps are smeared.
      const trueThrow = m.zR - m.zL;
      const zDeep = Math.max(m.zL, m.zR);
      const errors: number[] = [];
      let worstThrow = 0;
      let towardDownthrown = 0;
      for (let seed = 1; seed <= 20; seed++) {
        const s = synthetic(m, 0.4, seed);
        const found = findDelayTimeSteps(XS, s.delay, { pickSigmaMs: 0.4, v1MPerS: m.v1, v2MPerS: m.v2 });
        expect(found).toHaveLength(1);
        const f = found[0];
        errors.push(f.x - m.xs);
        if (Math.sign(f.x - m.xs) === Math.sign(trueThrow)) towardDownthrown++;
        worstThrow = Math.max(worstThrow, Math.abs(f.throwM / trueThrow - 1));
        expect(Math.sign(f.throwM)).toBe(Math.sign(trueThrow));
        expect(Math.abs(f.x - m.xs)).toBeLessThanOrEqual(0.75 * zDeep);
        expect(Math.abs(f.throwM / trueThrow - 1)).toBeLessThan(0.3);
      }
      const mean = errors.reduce((a, e) => a + e, 0) / errors.length;
      const worst = Math.max(...errors.map(Math.abs));
      console.log(`[steps] delay-time, 2 m spacing, ${label}: position error mean ${mean.toFixed(1)} m, worst ${worst.toFixed(1)} m (${(worst / SPACING).toFixed(1)} spacings), ${towardDownthrown}/20 toward the downthrown side; worst throw error ${(100 * worstThrow).toFixed(1)} %`);
    });
  }

  it('uses a given depth profile as well as the one implied by the delay times', () => {
    const s = synthetic(DOWN_RIGHT, 0.4, 9);
    const found = findDelayTimeSteps(XS, s.delay, { pickSigmaMs: 0.4, v1MPerS: 1000, v2MPerS: 2500, depthM: s.depth });
    expect(found).toHaveLength(1);
    expect(Math.abs(found[0].x - 47)).toBeLessThanOrEqual(0.75 * 9);
    expect(found[0].throwM).toBeGreaterThan(0);
  });

  it('reports no step on a dipping planar refractor (closed-form head waves, 50 seeds)', () => {
    // engine/forward/planar-refractor.ts: Kearey et al. 2002 ch. 5 dipping-layer times.
    const model: PlanarRefractorModel = { v1: 1000, v2: 2500, refractorElevationAtZero: -4, dipDegrees: 5 };
    let falseAlarms = 0;
    for (let seed = 1; seed <= 50; seed++) {
      const rng = mulberry32(seed);
      const a = { x: SHOT_A, elevation: 0 };
      const b = { x: SHOT_B, elevation: 0 };
      const tAB = headWaveTimeMs(model, a, b)! + 0.4 * gaussian(rng);
      const delay = XS.map((x) => {
        const g = { x, elevation: 0 };
        return (headWaveTimeMs(model, a, g)! + 0.4 * gaussian(rng) + headWaveTimeMs(model, b, g)! + 0.4 * gaussian(rng) - tAB) / 2;
      });
      if (findDelayTimeSteps(XS, delay, { pickSigmaMs: 0.4, v1MPerS: 1000, v2MPerS: 2500 }).length) falseAlarms++;
    }
    console.log(`[steps] dipping planar refractor (5°): ${falseAlarms} false steps in 50 profiles`);
    expect(falseAlarms).toBe(0);
  });

  it('reports no step on a kinked (continuous, slope-changing) profile, 50 seeds', () => {
    let falseAlarms = 0;
    for (let seed = 1; seed <= 50; seed++) {
      const rng = mulberry32(1000 + seed);
      // Refractor flat to x = 47 m, then dipping: delay slope 0 then 0.12 ms/m (a kink, no jump).
      const delay = XS.map((x) => 4 + 0.12 * Math.max(0, x - 47) + (0.4 / Math.SQRT2) * gaussian(rng));
      if (findDelayTimeSteps(XS, delay, { pickSigmaMs: 0.4, v1MPerS: 1000, v2MPerS: 2500 }).length) falseAlarms++;
    }
    console.log(`[steps] kinked delay profile: ${falseAlarms} false steps in 50 profiles`);
    expect(falseAlarms).toBe(0);
  });

  it('names the field on bad input', () => {
    expect(() => findDelayTimeSteps(XS, XS.map(() => 1), { pickSigmaMs: 0.4, v1MPerS: 2500, v2MPerS: 1000 })).toThrow(/v2MPerS/);
    expect(() => findDelayTimeSteps(XS, [1, 2], { pickSigmaMs: 0.4, v1MPerS: 1000, v2MPerS: 2500 })).toThrow(/delayTimeMs/);
    expect(() => findDelayTimeSteps(XS, XS.map(() => 1), { pickSigmaMs: -1, v1MPerS: 1000, v2MPerS: 2500 })).toThrow(/pickSigmaMs/);
    expect(() => findDelayTimeSteps(XS, XS.map(() => 1), { pickSigmaMs: 0.4, v1MPerS: 1000, v2MPerS: 2500, depthM: [1] })).toThrow(/depthM/);
  });
});

describe('throwFromDelayJump and correctStepPosition', () => {
  it('inverts Δt = Δz·cos(ic)/V1 (DESIGN.md)', () => {
    const ic = Math.asin(1000 / 2500);
    const dt = (1000 * 3 * Math.cos(ic)) / 1000;
    expect(throwFromDelayJump(dt, 1000, 2500)).toBeCloseTo(3, 10);
    expect(throwFromDelayJump(-dt, 1000, 2500)).toBeCloseTo(-3, 10);
  });

  it('shifts a seen position back by z·tan(ic) against the shooting direction', () => {
    const shift = 8 * Math.tan(Math.asin(1000 / 2000));
    expect(correctStepPosition(50, 8, 1000, 2000, 1)).toBeCloseTo(50 - shift, 10);
    expect(correctStepPosition(50, 8, 1000, 2000, -1)).toBeCloseTo(50 + shift, 10);
    expect(() => correctStepPosition(50, -1, 1000, 2000, 1)).toThrow(/depthM/);
  });
});

describe('findBranchSteps', () => {
  it('finds the jump in forward and reverse off-end branches with the +x-minus-−x sign of the throw (20 seeds each, both step directions)', () => {
    // Measured, not assumed: a single shot's branch is noisier than the delay-time profile
    // (σ instead of σ/√2, one side only), so it can miss; and where the shot shoots toward
    // the downthrown side the corner diffraction widens the transition beyond z·tan(ic),
    // so the corrected position is less exact there. Bounds: detected in at least half the
    // seeds, sign always right, corrected position within the deeper depth of the step.
    const lines: string[] = [];
    for (const m of [DOWN_RIGHT, DOWN_LEFT]) {
      const zDeep = Math.max(m.zL, m.zR);
      for (const [name, shotX] of [['forward', SHOT_A], ['reverse', SHOT_B]] as const) {
        let hits = 0;
        let wrongSign = 0;
        let worst = 0;
        let seenMinusTrue = 0;
        for (let seed = 1; seed <= 20; seed++) {
          const s = synthetic(m, 0.4, seed);
          const times = name === 'forward' ? s.tA : s.tB;
          const found = findBranchSteps(XS, times, { pickSigmaMs: 0.4, v1MPerS: m.v1, v2MPerS: m.v2, depthM: s.depth, shotXM: shotX, shot: name });
          expect(found.length).toBeLessThanOrEqual(1);
          if (!found.length) continue;
          hits++;
          const f = found[0];
          expect(f.direction).toBe(name === 'forward' ? 1 : -1);
          if (Math.sign(f.jumpMs) !== Math.sign(m.zR - m.zL)) wrongSign++;
          worst = Math.max(worst, Math.abs(f.x - m.xs));
          seenMinusTrue += f.xSeen - m.xs;
          expect(Math.abs(f.x - m.xs)).toBeLessThanOrEqual(zDeep);
        }
        lines.push(`${m.zR > m.zL ? 'down toward +x' : 'down toward −x'}, ${name}: detected ${hits}/20, wrong sign ${wrongSign}, mean seen−true ${(seenMinusTrue / Math.max(hits, 1)).toFixed(1)} m, worst corrected error ${worst.toFixed(1)} m`);
        expect(hits).toBeGreaterThanOrEqual(10);
        expect(wrongSign).toBe(0);
      }
    }
    console.log(`[steps] branch steps (true x=47, 2 m spacing, 0.4 ms picks):\n  ${lines.join('\n  ')}`);
  });

  it('finds nothing in a straight branch and refuses picks on both sides of the shot', () => {
    const rng = mulberry32(3);
    const t = XS.map((x) => 12 + (1000 * (x - SHOT_A)) / 2500 + 0.4 * gaussian(rng));
    expect(findBranchSteps(XS, t, { pickSigmaMs: 0.4, v1MPerS: 1000, v2MPerS: 2500, shotXM: SHOT_A })).toEqual([]);
    expect(() => findBranchSteps(XS, t, { pickSigmaMs: 0.4, v1MPerS: 1000, v2MPerS: 2500, shotXM: 40 })).toThrow(/one side/);
  });
});

describe('combineStepEvidence', () => {
  it('merges the delay-time step with both branches into one Step seen in all three', () => {
    const m = DOWN_RIGHT;
    const s = synthetic(m, 0.4, 5);
    const common = { pickSigmaMs: 0.4, v1MPerS: m.v1, v2MPerS: m.v2, depthM: s.depth };
    const delaySteps = findDelayTimeSteps(XS, s.delay, common);
    const branches = [
      ...findBranchSteps(XS, s.tA, { ...common, shotXM: SHOT_A, shot: 'A' }),
      ...findBranchSteps(XS, s.tB, { ...common, shotXM: SHOT_B, shot: 'B' }),
    ];
    const steps = combineStepEvidence(delaySteps, branches, { matchDistanceM: 9 });
    expect(steps).toHaveLength(1);
    expect(steps[0].seenIn).toEqual(['delay-time', 'A', 'B']);
    expect(steps[0].throw).toBeGreaterThan(0);
    expect(Math.abs(steps[0].x - 47)).toBeLessThanOrEqual(0.75 * 9);
  });

  it('reports a branch-only step when two shots agree, and not when one shot alone sees it', () => {
    const b = (shot: string, x: number, jumpMs: number) => ({ shot, direction: 1 as const, xSeen: x, x, jumpMs, standardErrorMs: 0.3, throwM: jumpMs * 1.1, rampWidthM: 4, centreM: x });
    const two = combineStepEvidence([], [b('A', 30, 2), b('B', 31, 2.2)], { matchDistanceM: 4 });
    expect(two).toHaveLength(1);
    expect(two[0].x).toBeCloseTo(30.5, 10);
    expect(two[0].seenIn).toEqual(['A', 'B']);
    expect(combineStepEvidence([], [b('A', 30, 2)], { matchDistanceM: 4 })).toEqual([]);
    // Opposite signs are different events, never one step.
    expect(combineStepEvidence([], [b('A', 30, 2), b('B', 31, -2)], { matchDistanceM: 4 })).toEqual([]);
    expect(() => combineStepEvidence([], [], { matchDistanceM: 0 })).toThrow(/matchDistanceM/);
  });
});
