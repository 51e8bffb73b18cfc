/**
 * planarDip and localDips. Refractor elevations come from the shared closed-form planar
 * model (engine/forward/planar-refractor.ts: elevation of the plane under a surface point,
 * Kearey, Brooks & Hill 2002 ch. 5 geometry) with seeded Gaussian noise.
 */
import { describe, expect, it } from 'vitest';
import { localDips, planarDip } from '../../../engine/structure/planar-dip.js';
import { verticalDepthToRefractor, type PlanarRefractorModel } from '../../../engine/forward/planar-refractor.js';
import { gaussian, mulberry32 } from '../../helpers/random.js';

const XS = Array.from({ length: 48 }, (_, i) => i * 2);

function noisyPlane(model: PlanarRefractorModel, sigmaM: number, seed: number): number[] {
  const rng = mulberry32(seed);
  return XS.map((x) => {
    const ground = 100 + 1.5 * Math.sin(x / 15); // gentle topography
    const p = { x, elevation: ground };
    return ground - verticalDepthToRefractor(model, p) + sigmaM * gaussian(rng);
  });
}

describe('planarDip', () => {
  it('recovers a 6° dip deepening toward +x within 0.5° from noisy elevations (σ = 0.3 m, 20 seeds)', () => {
    const model: PlanarRefractorModel = { v1: 800, v2: 3000, refractorElevationAtZero: 92, dipDegrees: 6 };
    let worst = 0;
    let fits = 0;
    for (let seed = 1; seed <= 20; seed++) {
      const r = planarDip(XS, noisyPlane(model, 0.3, seed), 0.3)!;
      worst = Math.max(worst, Math.abs(r.degrees - 6));
      expect(Math.abs(r.degrees - 6)).toBeLessThan(0.5);
      expect(Math.abs(r.interceptM - 92)).toBeLessThan(0.5);
      if (r.fits) fits++;
    }
    console.log(`[planar-dip] 6° plane, σ 0.3 m: worst dip error ${worst.toFixed(3)}°, plane accepted in ${fits}/20 (99 % χ² level)`);
    // At the 99 % level a true plane is rejected about once in a hundred fits.
    expect(fits).toBeGreaterThanOrEqual(18);
  });

  it('gives a negative dip where the refractor rises toward +x', () => {
    const model: PlanarRefractorModel = { v1: 800, v2: 3000, refractorElevationAtZero: 80, dipDegrees: -4 };
    const r = planarDip(XS, noisyPlane(model, 0.2, 3), 0.2)!;
    expect(r.degrees).toBeLessThan(-3.5);
    expect(r.degrees).toBeGreaterThan(-4.5);
  });

  it('rejects one plane for a stepped refractor (3 m step at mid-line)', () => {
    const rng = mulberry32(11);
    const elev = XS.map((x) => 90 - (x > 47 ? 3 : 0) + 0.3 * gaussian(rng));
    const r = planarDip(XS, elev, 0.3)!;
    expect(r.fits).toBe(false);
    // A line through a 3 m step leaves residuals of about 3/4 m rms on top of the noise.
    expect(r.rmsM).toBeGreaterThan(2 * 0.3);
  });

  it('skips nulls, returns null with fewer than two points, names bad fields', () => {
    const elev: (number | null)[] = XS.map((x) => 90 - 0.1 * x);
    elev[3] = null;
    expect(planarDip(XS, elev, 0.1)!.count).toBe(47);
    expect(planarDip([0, 1], [null, 3], 0.1)).toBeNull();
    expect(() => planarDip(XS, elev, 0)).toThrow(/sigmaM/);
    expect(() => planarDip(XS, [1, 2], 0.1)).toThrow(/refractorElevationM/);
  });
});

describe('localDips', () => {
  it('gives each segment its own dip', () => {
    const rng = mulberry32(5);
    // Flat to 46 m, then deepening at 10° (elevation falls by tan 10° per metre).
    const elev = XS.map((x) => 90 - Math.tan((10 * Math.PI) / 180) * Math.max(0, x - 46) + 0.1 * gaussian(rng));
    const [a, b] = localDips(XS, elev, [{ from: 0, to: 46 }, { from: 46, to: 94 }], 0.1);
    expect(Math.abs(a!.degrees)).toBeLessThan(0.5);
    expect(Math.abs(b!.degrees - 10)).toBeLessThan(0.5);
    expect(localDips(XS, elev, [{ from: 200, to: 300 }])[0]).toBeNull();
    expect(() => localDips(XS, elev, [{ from: 5, to: 1 }])).toThrow(/segments\[0\]/);
  });
});
