import { describe, expect, it } from 'vitest';
import { lineDip } from '../../engine/structure/line-dip.js';
import { planarDip } from '../../engine/structure/planar-dip.js';
import type { OpposingPairVelocities } from '../../engine/output/interpretation.js';

const pair = (shots: [string, string], dipDegrees: number): OpposingPairVelocities => ({
  shots,
  downDipVelocity: 2000,
  upDipVelocity: 2200,
  trueVelocity: 2100,
  trueVelocityGentleDip: 2095,
  dipDegrees,
  criticalAngleDegrees: 20,
  depthUnderShots: [],
});
const shotX = new Map([
  ['W-off', -20],
  ['W-end', 0],
  ['E-end', 46],
  ['E-off', 66],
]);
const pairs = [pair(['W-end', 'E-end'], 1.5), pair(['W-off', 'E-off'], 2.5)];
const xs = Array.from({ length: 24 }, (_, i) => 2 * i);

describe('lineDip: features.dip comes from the χ² planar test (Draper & Smith 1998)', () => {
  it('reports the tested plane, with the widest pair’s slope-intercept dip beside it', () => {
    // A plane falling 0.05 m per metre: 2.86° down toward +x.
    const fit = planarDip(xs, xs.map((x) => 90 - 0.05 * x + (x % 4 === 0 ? 0.05 : -0.05)), 0.2);
    expect(fit?.fits).toBe(true);
    const dip = lineDip(fit!.fits ? fit : null, xs.length, 0, pairs, shotX)!;
    expect(dip.source).toBe('refractor-elevations');
    expect(dip.degrees).toBeCloseTo((Math.atan(0.05) * 180) / Math.PI, 1);
    expect(dip.slopeInterceptShots).toEqual(['W-off', 'E-off']);
    expect(dip.slopeInterceptDegrees).toBe(2.5);
  });

  it('gives no dip when the χ² test rejects one plane, even with a slope-intercept dip at hand', () => {
    // A bowl 2 m deep: no plane fits it within 0.2 m.
    const bowl = planarDip(xs, xs.map((x) => 90 - 2 * Math.sin((Math.PI * x) / 46)), 0.2);
    expect(bowl?.fits).toBe(false);
    expect(lineDip(null, xs.length, 0, pairs, shotX)).toBeNull();
  });

  it('gives no dip where a step was found', () => {
    const fit = planarDip(xs, xs.map((x) => 90 - 0.05 * x), 0.2);
    expect(lineDip(fit, xs.length, 1, pairs, shotX)).toBeNull();
  });

  it('falls back to the slope-intercept dip when too few depths can be tested', () => {
    expect(lineDip(null, 2, 0, pairs, shotX)).toEqual({ degrees: 2.5, source: 'slope-intercept', slopeInterceptShots: ['W-off', 'E-off'] });
    expect(lineDip(null, 2, 0, [], shotX)).toBeNull();
  });
});
