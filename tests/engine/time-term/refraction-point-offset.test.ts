/**
 * Time terms at the refraction points (engine/time-term/refraction-point-offset.ts):
 * - the offset from a delay is z·tan(ic) (Snell's law at the critical angle, sin ic = V1/V2;
 *   Kearey, Brooks & Hill 2002, ch. 5: the head wave leaves the refractor z·tan(ic) from the
 *   point below the geophone);
 * - the picks are re-pointed as the method says: the geophone term h toward the shot, of
 *   repeated positions the same spread's geophone, beyond the ends a term of its own; a shot
 *   on the spread split into its two legs, one off it left free.
 */
import { describe, expect, it } from 'vitest';
import { atRefractionPoints, refractionPointOffsetM } from '../../../engine/time-term/refraction-point-offset.js';

describe('refractionPointOffsetM', () => {
  it('is z·tan(ic) for the delay of a flat refractor at depth z (a = z·cos(ic)/V1)', () => {
    const v1 = 600;
    const v2 = 2400;
    const ic = Math.asin(v1 / v2);
    for (const z of [4, 8, 15]) {
      const delayMs = (1000 * z * Math.cos(ic)) / v1;
      expect(refractionPointOffsetM([delayMs, delayMs, null], v1, v2)).toBeCloseTo(z * Math.tan(ic), 9);
    }
  });

  it('is 0 where the velocities give no critical angle or there are no terms', () => {
    expect(refractionPointOffsetM([10], 2400, 600)).toBe(0);
    expect(refractionPointOffsetM([null], 600, 2400)).toBe(0);
  });
});

describe('atRefractionPoints', () => {
  // Two spreads overlapping at x = 4 and 6 (geophones 0-3 and 4-7); A records the first, B the second.
  const gx = [0, 2, 4, 6, 4, 6, 8, 10];
  const shots = [-10, -12, 5, 20]; // A, B, a shot on the spread, one off its east end
  const observations = [
    { shot: 0, geophone: 3, timeMs: 10 }, // A at the first spread's x = 6: refraction point at 4
    { shot: 1, geophone: 5, timeMs: 11 }, // B at the second spread's x = 6: refraction point at 4
    { shot: 0, geophone: 0, timeMs: 12 }, // A at x = 0: refraction point beyond the end
    { shot: 2, geophone: 1, timeMs: 13 }, // x = 2, shot to its right: refraction point at 4
    { shot: 2, geophone: 6, timeMs: 14 }, // x = 8, shot to its left: refraction point at 6
    { shot: 3, geophone: 6, timeMs: 15 }, // x = 8 from the east: refraction point at 10
    { shot: 0, geophone: 2, timeMs: 16 },
    { shot: 1, geophone: 4, timeMs: 17 },
  ];
  const moved = atRefractionPoints(gx, shots, observations, 2);

  it('takes the geophone term h toward the shot; at a repeated position the one the same shot was recorded on', () => {
    expect(moved.observations[0].geophone).toBe(2);
    expect(moved.observations[1].geophone).toBe(4);
    expect(moved.geophoneXsM[moved.observations[3].geophone]).toBe(4);
    expect(moved.geophoneXsM[moved.observations[4].geophone]).toBe(6);
    expect(moved.observations[5].geophone).toBe(7);
  });

  it('gives a refraction point beyond the spread a term of its own', () => {
    const g = moved.observations[2].geophone;
    expect(g).toBeGreaterThanOrEqual(gx.length);
    expect(moved.geophoneXsM[g]).toBe(-2);
  });

  it('splits a shot on the spread into its two legs and leaves one off it free', () => {
    const [right, left] = moved.legsOfShot[2];
    expect(moved.shotXsM[right]).toBe(7);
    expect(moved.shotXsM[left]).toBe(3);
    expect(moved.observations[4].shot).toBe(right);
    expect(moved.observations[3].shot).toBe(left);
    expect(moved.legsOfShot[0].map((k) => moved.shotXsM[k])).toEqual([-Infinity]);
    expect(moved.legsOfShot[3].map((k) => moved.shotXsM[k])).toEqual([Infinity]);
  });

  it('keeps the times and the real shot–geophone spans (the slowness lengths)', () => {
    expect(moved.observations.map((o) => o.timeMs)).toEqual(observations.map((o) => o.timeMs));
    expect(moved.observations[0].spanM).toEqual([-10, 6]);
    expect(moved.observations[3].spanM).toEqual([2, 5]);
  });
});
