import { describe, expect, it } from 'vitest';
import { normalDepthFromDelayM, plusMinus } from '../../engine/plus-minus/plus-minus.js';
import { fromNullable, toNullable } from '../../engine/shared/nan-none.js';

describe('plusMinus', () => {
  // Delay-time form of head-wave times (Hagedoorn, Geophysical Prospecting 7, 1959):
  // t(S, G) = aS + aG + |xG − xS|/V2. Chosen delays; the method must give back 2·aG.
  const v2 = 2500; // m/s
  const shotA = { x: -5, delayMs: 4 };
  const shotB = { x: 55, delayMs: 6 };
  const xs = [0, 10, 20, 30, 40, 50];
  const delays = [3, 5, 7, 6, 4, 2];
  const t = (s: { x: number; delayMs: number }, i: number) => s.delayMs + delays[i] + (1000 * Math.abs(xs[i] - s.x)) / v2;
  const tAB = shotA.delayMs + shotB.delayMs + (1000 * (shotB.x - shotA.x)) / v2;
  const r = plusMinus({
    leftShotXM: shotA.x,
    rightShotXM: shotB.x,
    geophoneXM: xs,
    leftTimesMs: Array.from(xs, (_, i) => t(shotA, i)),
    rightTimesMs: Array.from(xs, (_, i) => t(shotB, i)),
    reciprocalTimeMs: tAB,
  });

  it('gives T+ = 2 × the delay time at each geophone, whatever the shot delays', () => {
    r.plusTimeMs.forEach((p, i) => expect(p).toBeCloseTo(2 * delays[i], 10));
  });

  it('gives T− = tAG − tBG', () => {
    r.minusTimeMs.forEach((m, i) => expect(m).toBeCloseTo(t(shotA, i) - t(shotB, i), 10));
  });

  it('leaves geophones outside the pair, or without both arrivals, null', () => {
    const r = plusMinus({
      leftShotXM: 5,
      rightShotXM: 45,
      geophoneXM: xs,
      leftTimesMs: fromNullable([1, 2, null, 4, 5, 6]),
      rightTimesMs: fromNullable([6, 5, 4, 3, null, 1]),
      reciprocalTimeMs: 3,
    });
    // None is NaN in the per-pair arrays (engine/shared/nan-none.ts), null once converted.
    expect(toNullable(r.plusTimeMs)).toEqual([null, 4, null, 4, null, null]);
    expect(toNullable(r.minusTimeMs)).toEqual([null, -3, null, 1, null, null]);
  });
});

describe('normalDepthFromDelayM', () => {
  it('inverts the head-wave delay time a = z·cos(ic)/V1 (Kearey, Brooks & Hill 2002, ch. 5)', () => {
    const v1 = 600;
    const v2 = 2400;
    const z = 7.5;
    const ic = Math.asin(v1 / v2);
    const delayMs = (1000 * z * Math.cos(ic)) / v1;
    expect(normalDepthFromDelayM(delayMs, v1, v2)).toBeCloseTo(z, 10);
  });

  it('returns null unless V2 > V1 > 0', () => {
    expect(normalDepthFromDelayM(5, 600, 600)).toBeNull();
    expect(normalDepthFromDelayM(5, 600, 500)).toBeNull();
    expect(normalDepthFromDelayM(5, 0, 500)).toBeNull();
    expect(normalDepthFromDelayM(Number.NaN, 600, 2000)).toBeNull();
  });
});
