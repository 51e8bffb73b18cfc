import { describe, expect, it } from 'vitest';
import {
  arcFootPointsM,
  envelopeElevationM,
  envelopeElevationsM,
  lowerArcElevationM,
  verticalDepthsFromArcsM,
  type DepthArc,
} from '../../engine/depth/depth-arcs.js';
import {
  perpendicularDistanceToRefractor,
  verticalDepthToRefractor,
  type PlanarRefractorModel,
} from '../../engine/forward/planar-refractor.js';

// Closed form: for a planar refractor, the arc about each surface point with radius equal
// to its perpendicular distance to the plane touches the plane, so the envelope of the arcs
// is the plane itself (Hagedoorn, Geophysical Prospecting 7, 1959; geometry of the
// perpendicular distance as in engine/forward/planar-refractor.ts, Telford et al. 1990 ch. 4).
function planarArcs(model: PlanarRefractorModel, ground: (x: number) => number, xs: number[]): DepthArc[] {
  return xs.map((x) => ({
    xM: x,
    elevationM: ground(x),
    normalDepthM: perpendicularDistanceToRefractor(model, { x, elevation: ground(x) }),
  }));
}

const xs = Array.from({ length: 24 }, (_, i) => i * 2);

describe('verticalDepthsFromArcsM', () => {
  for (const dipDegrees of [0, 5, -8, 20]) {
    it(`recovers the vertical depth of a planar refractor dipping ${dipDegrees}° exactly`, () => {
      const model = { v1: 600, v2: 2400, refractorElevationAtZero: 90, dipDegrees };
      const ground = () => 100;
      const depths = verticalDepthsFromArcsM(planarArcs(model, ground, xs));
      depths.forEach((d, i) => {
        const truth = verticalDepthToRefractor(model, { x: xs[i], elevation: 100 });
        expect(d).not.toBeNull();
        expect(Math.abs((d as number) - truth)).toBeLessThan(1e-9 * truth + 1e-9);
      });
    });
  }

  it('recovers a dipping plane under sloping ground', () => {
    const model = { v1: 600, v2: 2400, refractorElevationAtZero: 90, dipDegrees: 6 };
    const ground = (x: number) => 100 + 0.05 * x;
    const depths = verticalDepthsFromArcsM(planarArcs(model, ground, xs));
    depths.forEach((d, i) => {
      const truth = verticalDepthToRefractor(model, { x: xs[i], elevation: ground(xs[i]) });
      expect(d as number).toBeCloseTo(truth, 9);
    });
  });

  it('gives vertical depth greater than normal depth under a dipping refractor (z/cos θ)', () => {
    const model = { v1: 600, v2: 2400, refractorElevationAtZero: 90, dipDegrees: 10 };
    const arcs = planarArcs(model, () => 100, xs);
    const depths = verticalDepthsFromArcsM(arcs);
    depths.forEach((d, i) => {
      expect(d as number).toBeGreaterThan(arcs[i].normalDepthM as number);
      expect(d as number).toBeCloseTo((arcs[i].normalDepthM as number) / Math.cos((10 * Math.PI) / 180), 9);
    });
  });

  it('leaves a geophone without an arc null and still uses the others', () => {
    const arcs: DepthArc[] = [
      { xM: 0, elevationM: 10, normalDepthM: 5 },
      { xM: 2, elevationM: 10, normalDepthM: null },
      { xM: 4, elevationM: 10, normalDepthM: 5 },
    ];
    expect(verticalDepthsFromArcsM(arcs)).toEqual([5, null, 5]);
  });

  it('puts the refractor on or below every arc (the minimum, not the maximum, of the arcs)', () => {
    // Irregular normal depths: the envelope must never enter an arc.
    const arcs: DepthArc[] = xs.map((x, i) => ({ xM: x, elevationM: 50 + Math.sin(i), normalDepthM: 6 + 2 * Math.cos(i * 0.7) }));
    for (let x = 0; x <= 46; x += 0.25) {
      const y = envelopeElevationM(arcs, x) as number;
      for (const a of arcs) {
        const arcY = lowerArcElevationM(a, x);
        if (arcY !== null) expect(y).toBeLessThanOrEqual(arcY + 1e-9);
      }
    }
    // ...and touches the arc of the geophone above it or lies below it; never above ground − z.
    verticalDepthsFromArcsM(arcs).forEach((d, i) => expect(d as number).toBeGreaterThanOrEqual(arcs[i].normalDepthM as number - 1e-9));
  });
});

describe('envelopeElevationsM', () => {
  it('gives at every x what envelopeElevationM gives there', () => {
    const xs = Array.from({ length: 24 }, (_, i) => 2 * i);
    const arcs: DepthArc[] = xs.map((x, i) => ({ xM: x, elevationM: 50 + Math.sin(i), normalDepthM: i === 7 ? null : 6 + 2 * Math.cos(i * 0.7) }));
    const at = [-30, -3, 0, 1.3, 13, 14, 27.5, 46, 49, 80];
    expect(envelopeElevationsM(arcs, at)).toEqual(at.map((x) => envelopeElevationM(arcs, x)));
  });

  it('over a planar refractor, the envelope of arcs about the feet of a first set of arcs is the plane a normal thickness below (Hagedoorn 1959, applied twice)', () => {
    // Two parallel planes 4 m apart, dipping 10°, under a flat ground at 100 m: arcs of the
    // normal depth to the first about the geophones, then arcs of 4 m about their feet.
    const dip = (10 * Math.PI) / 180;
    const xs = Array.from({ length: 31 }, (_, i) => 2 * i);
    const firstTop = (x: number): number => 95 - x * Math.tan(dip);
    const first = xs.map((x) => ({ xM: x, elevationM: 100, normalDepthM: (100 - firstTop(x)) * Math.cos(dip) }));
    const feet = arcFootPointsM(first);
    const second = feet.map((f) => ({ xM: f!.xM, elevationM: f!.elevationM, normalDepthM: 4 }));
    const y = envelopeElevationsM(second, xs.slice(5, 26));
    y.forEach((e, k) => expect(e as number).toBeCloseTo(firstTop(xs[k + 5]) - 4 / Math.cos(dip), 6));
  });
});

describe('lowerArcElevationM', () => {
  it('is the lower semicircle of radius z about the geophone', () => {
    const arc = { xM: 10, elevationM: 20, normalDepthM: 5 };
    expect(lowerArcElevationM(arc, 10)).toBe(15);
    expect(lowerArcElevationM(arc, 13)).toBeCloseTo(16, 12);
    expect(lowerArcElevationM(arc, 16)).toBeNull();
  });
});

describe('arcFootPointsM', () => {
  it('puts each foot on the plane, at the foot of the perpendicular from its geophone', () => {
    const model = { v1: 600, v2: 2400, refractorElevationAtZero: 90, dipDegrees: -8 };
    const ground = (x: number) => 100 - 0.03 * x;
    const arcs = planarArcs(model, ground, xs);
    const theta = (model.dipDegrees * Math.PI) / 180;
    arcFootPointsM(arcs).forEach((foot, i) => {
      const z = arcs[i].normalDepthM as number;
      // Foot = geophone − z·(sin θ, cos θ): the plane's upward unit normal (geometry of
      // perpendicularDistanceToRefractor, engine/forward/planar-refractor.ts).
      expect(foot!.xM).toBeCloseTo(xs[i] - z * Math.sin(theta), 9);
      expect(foot!.elevationM).toBeCloseTo(ground(xs[i]) - z * Math.cos(theta), 9);
      expect(foot!.elevationM).toBeCloseTo(model.refractorElevationAtZero - Math.tan(theta) * foot!.xM, 9);
    });
  });

  it('is null where a geophone has no arc, and the arc bottom for a lone arc', () => {
    const feet = arcFootPointsM([
      { xM: 0, elevationM: 10, normalDepthM: null },
      { xM: 5, elevationM: 10, normalDepthM: 4 },
    ]);
    expect(feet).toEqual([null, { xM: 5, elevationM: 6 }]);
  });
});
