/**
 * findRefractorVelocityChanges: lateral change of refractor velocity from T−.
 *
 * Synthetic T− over a flat refractor at depth h whose velocity is V2a for x < xc and V2b
 * beyond. Head-wave time from a surface shot at xA to a geophone at xG (Fermat's principle;
 * Kearey, Brooks & Hill 2002 ch. 5 for the uniform case): the ray goes down to the
 * refractor at a, runs along it to b, and comes up to G:
 *   t(a, b) = √(h² + (a − xA)²)/V1 + ∫_a^b dx/V2(x) + √(h² + (xG − b)²)/V1,
 * minimised over a and b. Over a uniform stretch the minimum is at |a − xA| = h·tan ic, so
 * t = ∫_{xA}^{xG} dx/V2 + h·cos(ic_A)/V1 + h·cos(ic_G)/V1 (the closed form), and
 * T− = t_AG − t_BG has slope 2/V2(x) (Hagedoorn 1959). The test minimises t(a, b) by brute
 * force on a 1 cm grid, so the smooth transition near xc is included rather than assumed.
 */
import { describe, expect, it } from 'vitest';
import { findRefractorVelocityChanges } from '../../../engine/structure/velocity-changes.js';
import { StructureInputError } from '../../../engine/structure/structure-input.js';
import { gaussian, mulberry32 } from '../../helpers/random.js';

const V1 = 800;
const DEPTH_M = 6;
const SPACING_M = 2;
const XS = Array.from({ length: 48 }, (_, i) => i * SPACING_M);

/** ∫_a^b dx/V2(x), s/m·m = s, for a refractor with a velocity change at xc. */
function slownessIntegral(a: number, b: number, xc: number, v2a: number, v2b: number): number {
  const lo = Math.min(a, b);
  const hi = Math.max(a, b);
  const leftPart = Math.max(0, Math.min(hi, xc) - lo);
  const rightPart = Math.max(0, hi - Math.max(lo, xc));
  return leftPart / v2a + rightPart / v2b;
}

/** Head-wave time, ms, from a shot at xShot to a geophone at xG by brute-force Fermat minimisation. */
function headWaveMs(xShot: number, xG: number, xc: number, v2a: number, v2b: number): number {
  const dir = Math.sign(xG - xShot);
  let best = Infinity;
  const span = Math.abs(xG - xShot);
  // Down-going leg: near the shot, critical angle of the local velocity gives the entry point.
  const vShot = (xShot < xc ? v2a : v2b);
  const a = xShot + dir * DEPTH_M * Math.tan(Math.asin(V1 / vShot));
  const down = Math.hypot(DEPTH_M, a - xShot) / V1;
  for (let d = 0; d <= span; d += 0.01) {
    const b = xG - dir * d;
    if ((b - a) * dir < 0) break;
    const t = down + slownessIntegral(a, b, xc, v2a, v2b) + Math.hypot(DEPTH_M, d) / V1;
    if (t < best) best = t;
  }
  return 1000 * best;
}

function minusTimes(xc: number, v2a: number, v2b: number, pickSigmaMs: number, seed: number): number[] {
  const rng = mulberry32(seed);
  return XS.map((x) => {
    const tA = headWaveMs(-30, x, xc, v2a, v2b) + pickSigmaMs * gaussian(rng);
    const tB = headWaveMs(124, x, xc, v2a, v2b) + pickSigmaMs * gaussian(rng);
    return tA - tB;
  });
}

describe('findRefractorVelocityChanges', () => {
  it('finds a change from 2200 to 3900 m/s within 3 spacings with both velocities within 5 % (0.4 ms picks, 10 seeds)', () => {
    const report: string[] = [];
    for (let seed = 1; seed <= 10; seed++) {
      const tm = minusTimes(47, 2200, 3900, 0.4, seed);
      const r = findRefractorVelocityChanges(XS, tm, { pickSigmaMs: 0.4 });
      expect(r.changes).toHaveLength(1);
      const c = r.changes[0];
      report.push(`seed ${seed}: x=${c.x.toFixed(1)} left=${c.left.toFixed(0)} right=${c.right.toFixed(0)}`);
      expect(Math.abs(c.x - 47)).toBeLessThanOrEqual(3 * SPACING_M);
      expect(Math.abs(c.left / 2200 - 1)).toBeLessThan(0.05);
      expect(Math.abs(c.right / 3900 - 1)).toBeLessThan(0.05);
      expect(r.segments).toHaveLength(2);
      expect(r.segments[0].to).toBe(c.x);
      expect(r.segments[1].from).toBe(c.x);
    }
    console.log(`[velocity-changes] detection 2200→3900 m/s at x=47 m:\n  ${report.join('\n  ')}`);
  });

  it('finds a decrease in velocity as well (3900 → 2200 m/s)', () => {
    const r = findRefractorVelocityChanges(XS, minusTimes(47, 3900, 2200, 0.4, 77), { pickSigmaMs: 0.4 });
    expect(r.changes).toHaveLength(1);
    expect(r.changes[0].left).toBeGreaterThan(r.changes[0].right);
    expect(Math.abs(r.changes[0].x - 47)).toBeLessThanOrEqual(3 * SPACING_M);
  });

  it('reports no change on a uniform refractor with 0.3, 0.4 and 0.5 ms pick noise (50 seeds each)', () => {
    let falseAlarms = 0;
    let runs = 0;
    const velocityErrors: number[] = [];
    for (const sigma of [0.3, 0.4, 0.5]) {
      for (let seed = 100; seed < 150; seed++) {
        const r = findRefractorVelocityChanges(XS, minusTimes(1e9, 3000, 3000, sigma, seed), { pickSigmaMs: sigma });
        runs++;
        if (r.changes.length > 0) falseAlarms++;
        expect(r.segments.length).toBeGreaterThanOrEqual(1);
        velocityErrors.push(Math.abs(r.segments[0].velocity / 3000 - 1));
      }
    }
    console.log(`[velocity-changes] uniform 3000 m/s: ${falseAlarms} false alarms in ${runs} profiles; worst single-segment velocity error ${(100 * Math.max(...velocityErrors)).toFixed(2)} %`);
    expect(falseAlarms).toBe(0);
  });

  it('standard error of the velocity matches the scatter over seeds within a factor of 1.5', () => {
    const vs: number[] = [];
    let seSum = 0;
    for (let seed = 200; seed < 240; seed++) {
      const r = findRefractorVelocityChanges(XS, minusTimes(1e9, 3000, 3000, 0.4, seed), { pickSigmaMs: 0.4 });
      vs.push(r.segments[0].velocity);
      seSum += r.segments[0].standardError;
    }
    const mean = vs.reduce((s, v) => s + v, 0) / vs.length;
    const sd = Math.sqrt(vs.reduce((s, v) => s + (v - mean) ** 2, 0) / (vs.length - 1));
    const meanSe = seSum / vs.length;
    console.log(`[velocity-changes] velocity scatter ${sd.toFixed(1)} m/s vs mean standard error ${meanSe.toFixed(1)} m/s`);
    expect(meanSe / sd).toBeGreaterThan(1 / 1.5);
    expect(meanSe / sd).toBeLessThan(1.5);
  });

  it('rejects a change too small to be significant (3000 → 3060 m/s, 2 %)', () => {
    const r = findRefractorVelocityChanges(XS, minusTimes(47, 3000, 3060, 0.5, 5), { pickSigmaMs: 0.5 });
    expect(r.changes).toHaveLength(0);
  });

  it('works whichever shot is forward (T− decreasing with x)', () => {
    const tm = minusTimes(47, 2200, 3900, 0.4, 3).map((t) => -t);
    const r = findRefractorVelocityChanges(XS, tm, { pickSigmaMs: 0.4 });
    expect(r.changes).toHaveLength(1);
    expect(Math.abs(r.changes[0].left / 2200 - 1)).toBeLessThan(0.05);
  });

  it('skips null minus times and returns no segment with fewer than two values', () => {
    const tm: (number | null)[] = minusTimes(47, 2200, 3900, 0.4, 4);
    for (let i = 0; i < 48; i += 5) tm[i] = null;
    expect(findRefractorVelocityChanges(XS, tm, { pickSigmaMs: 0.4 }).changes).toHaveLength(1);
    const empty = findRefractorVelocityChanges([0, 2, 4], [null, 1, null], { pickSigmaMs: 0.4 });
    expect(empty.segments).toEqual([]);
  });

  it('names the field on bad input', () => {
    expect(() => findRefractorVelocityChanges([0, 2, 1], [0, 1, 2], { pickSigmaMs: 0.4 })).toThrow(/xM\[2\]/);
    expect(() => findRefractorVelocityChanges([0, 2, 4], [0, 1], { pickSigmaMs: 0.4 })).toThrow(/minusTimeMs/);
    expect(() => findRefractorVelocityChanges([0, 2, 4], [0, Number.NaN, 2], { pickSigmaMs: 0.4 })).toThrow(/minusTimeMs\[1\]/);
    expect(() => findRefractorVelocityChanges([0, 2, 4], [0, 1, 2], { pickSigmaMs: 0 })).toThrow(StructureInputError);
    expect(() => findRefractorVelocityChanges([0, 2, 4], [0, 1, 2], { pickSigmaMs: 0.4, minSegmentPoints: 1 })).toThrow(/minSegmentPoints/);
  });
});
