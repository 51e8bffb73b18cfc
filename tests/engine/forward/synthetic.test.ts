import { describe, expect, it } from 'vitest';
import { syntheticSurvey, SyntheticError, type SyntheticLayout } from '../../../engine/forward/synthetic.js';
import { validateSyntheticRequest, syntheticSurveyFromRequest, SYNTHETIC_LIMITS } from '../../../engine/forward/synthetic-request.js';
import type { LayeredModel } from '../../../engine/forward/model.js';
import { firstArrivalMs } from '../../../engine/forward/planar-refractor.js';

const twoLayer: LayeredModel = {
  surface: [{ x: -20, elevation: 50 }, { x: 80, elevation: 50 }],
  layers: [{ velocity: 600 }, { velocity: 2400, top: [{ x: -20, elevation: 44.3 }, { x: 80, elevation: 44.3 }] }],
};
const layout: SyntheticLayout = {
  geophoneCount: 24,
  firstX: 0,
  spacing: 2,
  shots: [{ x: -10, id: 'W-off' }, { x: 0 }, { x: 23 }, { x: 46 }, { x: 56, id: 'E-off' }],
  name: 'Test line',
};

describe('syntheticSurvey', () => {
  const exact = syntheticSurvey(twoLayer, layout);

  it('lays out geophones and shots on the ground surface with the given ids and name', () => {
    expect(exact.name).toBe('Test line');
    expect(exact.geophones.map((g) => g.x)).toEqual(Array.from({ length: 24 }, (_, i) => 2 * i));
    expect(exact.geophones.every((g) => g.elevation === 50)).toBe(true);
    expect(exact.shots.map((s) => s.id)).toEqual(['W-off', 'S2', 'S3', 'S4', 'E-off']);
    expect(exact.shots.every((s) => s.elevation === 50 && s.times.length === 24)).toBe(true);
  });

  it('without noise gives the closed-form first arrivals (Kearey et al. 2002 ch. 5) to 0.5 %, rounded to 0.01 ms', () => {
    const p = { v1: 600, v2: 2400, refractorElevationAtZero: 44.3 - 50, dipDegrees: 0 };
    for (const shot of exact.shots) {
      shot.times.forEach((t, i) => {
        const x = exact.geophones[i].x;
        if (x === shot.x) return;
        const expected = firstArrivalMs(p, { x: shot.x, elevation: 0 }, { x, elevation: 0 });
        expect(Math.abs((t as number) - expected) / expected).toBeLessThan(0.005);
        expect(Math.round((t as number) * 100) / 100).toBe(t);
      });
    }
  });

  it('a shot at a geophone records 0 ms there', () => {
    expect(exact.shots[1].times[0]).toBe(0);
    expect(exact.shots[3].times[23]).toBe(0);
  });

  it('noise has about the requested standard deviation and mean zero', () => {
    const noisy = syntheticSurvey(twoLayer, layout, { noiseMs: 0.5, seed: 3 });
    const d: number[] = [];
    noisy.shots.forEach((s, k) => s.times.forEach((t, i) => {
      const e = exact.shots[k].times[i] as number;
      if (e > 2) d.push((t as number) - e);
    }));
    const mean = d.reduce((a, b) => a + b, 0) / d.length;
    const sd = Math.sqrt(d.reduce((a, b) => a + (b - mean) ** 2, 0) / (d.length - 1));
    expect(d.length).toBeGreaterThan(100);
    expect(Math.abs(mean)).toBeLessThan(0.15);
    expect(sd).toBeGreaterThan(0.4);
    expect(sd).toBeLessThan(0.6);
  });

  it('is deterministic for a seed and differs between seeds', () => {
    const a = syntheticSurvey(twoLayer, { ...layout, deadTraceFraction: 0.1 }, { noiseMs: 0.3, seed: 11 });
    const b = syntheticSurvey(twoLayer, { ...layout, deadTraceFraction: 0.1 }, { noiseMs: 0.3, seed: 11 });
    const c = syntheticSurvey(twoLayer, { ...layout, deadTraceFraction: 0.1 }, { noiseMs: 0.3, seed: 12 });
    expect(a).toEqual(b);
    expect(a).not.toEqual(c);
  });

  it('kills listed geophones in every shot, and the requested share of traces at random', () => {
    const listed = syntheticSurvey(twoLayer, { ...layout, deadTraces: [3, 17] });
    for (const s of listed.shots) {
      expect(s.times[3]).toBeNull();
      expect(s.times[17]).toBeNull();
      expect(s.times.filter((t) => t === null)).toHaveLength(2);
    }
    const share = syntheticSurvey(twoLayer, { ...layout, deadTraceFraction: 0.25 }, { seed: 5 });
    const dead = share.shots.flatMap((s) => s.times).filter((t) => t === null).length;
    expect(dead).toBe(Math.round(0.25 * 5 * 24));
  });

  it('killing traces leaves the noise on the live ones unchanged', () => {
    const all = syntheticSurvey(twoLayer, layout, { noiseMs: 0.3, seed: 9 });
    const some = syntheticSurvey(twoLayer, { ...layout, deadTraceFraction: 0.3 }, { noiseMs: 0.3, seed: 9 });
    some.shots.forEach((s, k) => s.times.forEach((t, i) => {
      if (t !== null) expect(t).toBe(all.shots[k].times[i]);
    }));
  });

  it('reads elevations from a sloping surface', () => {
    const sloping: LayeredModel = { surface: [{ x: 0, elevation: 10 }, { x: 46, elevation: 33 }], layers: [{ velocity: 800 }] };
    const s = syntheticSurvey(sloping, { geophoneCount: 24, firstX: 0, spacing: 2, shots: [{ x: 0 }] });
    expect(s.geophones[10].elevation).toBeCloseTo(20, 6);
    // Along a straight slope the first arrival is the straight ray: distance / V.
    const t = s.shots[0].times[23] as number;
    expect(Math.abs(t - (1000 * Math.hypot(46, 23)) / 800)).toBeLessThan(0.005 * t);
  });

  it('throws SyntheticError naming the field for a bad layout', () => {
    expect(() => syntheticSurvey(twoLayer, { ...layout, spacing: -1 })).toThrow(SyntheticError);
    let caught: unknown = null;
    try {
      syntheticSurvey(twoLayer, { ...layout, geophoneCount: 0 });
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(SyntheticError);
    expect((caught as SyntheticError).problems[0].path).toBe('/layout/geophoneCount');
  });
});

describe('validateSyntheticRequest', () => {
  const good = { model: twoLayer, layout, noiseMs: 0.2, seed: 4, cellM: 0.5 };

  it('accepts a sound request, which then runs', () => {
    expect(validateSyntheticRequest(good)).toEqual([]);
    expect(syntheticSurveyFromRequest(good).shots).toHaveLength(5);
  });

  it('rejects a non-object and missing parts', () => {
    expect(validateSyntheticRequest(null)[0].code).toBe('request-not-object');
    expect(validateSyntheticRequest([])[0].code).toBe('request-not-object');
    const codes = validateSyntheticRequest({}).map((p) => p.code);
    expect(codes).toContain('model-missing');
    expect(codes).toContain('layout-missing');
  });

  it('names each bad field with a JSON pointer and a stable code', () => {
    const bad = {
      model: {
        surface: [{ x: 0, elevation: 'high' }],
        layers: [{ velocity: -5 }, { velocity: { contactsX: [10, 5], velocities: [2000, 2500, 3000] } }],
      },
      layout: { geophoneCount: 2000, firstX: 0, spacing: 0, shots: [{ x: 1, id: 'A' }, { x: 2, id: 'A' }], deadTraceFraction: 2, extra: 1 },
      noiseMs: -1,
      seed: 1.5,
      cellM: 0.001,
      colour: 'red',
    };
    const byPath = new Map(validateSyntheticRequest(bad).map((p) => [p.path, p.code]));
    expect(byPath.get('/model/surface/0/elevation')).toBe('vertex-bad-number');
    expect(byPath.get('/model/layers/0/velocity')).toBe('velocity-out-of-range');
    expect(byPath.get('/model/layers/1/top')).toBe('top-missing');
    expect(byPath.get('/model/layers/1/velocity/contactsX/1')).toBe('contacts-not-increasing');
    expect(byPath.get('/layout/geophoneCount')).toBe('geophone-count-out-of-range');
    expect(byPath.get('/layout/spacing')).toBe('spacing-out-of-range');
    expect(byPath.get('/layout/shots/1/id')).toBe('shot-id-duplicate');
    expect(byPath.get('/layout/deadTraceFraction')).toBe('dead-fraction-out-of-range');
    expect(byPath.get('/layout/extra')).toBe('unknown-field');
    expect(byPath.get('/noiseMs')).toBe('noise-out-of-range');
    expect(byPath.get('/seed')).toBe('seed-not-integer');
    expect(byPath.get('/cellM')).toBe('cell-out-of-range');
    expect(byPath.get('/colour')).toBe('unknown-field');
  });

  it('refuses more than 64 shots and dead-trace indices off the spread', () => {
    const many = { model: twoLayer, layout: { ...layout, shots: Array.from({ length: 65 }, (_, i) => ({ x: i })) } };
    expect(validateSyntheticRequest(many).map((p) => p.path)).toContain('/layout/shots');
    const off = { model: twoLayer, layout: { ...layout, deadTraces: [24] } };
    expect(validateSyntheticRequest(off).map((p) => p.path)).toEqual(['/layout/deadTraces/0']);
  });

  it('refuses a grid above the node limit before building it', () => {
    const deep: LayeredModel = {
      surface: [{ x: 0, elevation: 0 }],
      layers: [{ velocity: 500 }, { velocity: 3000, top: [{ x: 0, elevation: -2000 }] }],
    };
    const problems = validateSyntheticRequest({ model: deep, layout, cellM: 0.1 });
    expect(problems.map((p) => p.code)).toEqual(['grid-too-large']);
    expect(problems[0].path).toBe('/cellM');
  });

  it('refuses nodes × shots above SYNTHETIC_LIMITS.maxNodeSolves, and accepts the same line with fewer shots', () => {
    // A 2 km section about 40 m deep at 0.25 m: ≈ 8000 × 190 nodes, ≈ 1.5 million; 64 shots is ≈ 97 million node-solves.
    const long: LayeredModel = {
      surface: [{ x: 0, elevation: 100 }, { x: 2000, elevation: 100 }],
      layers: [{ velocity: 600 }, { velocity: 2400, top: [{ x: 0, elevation: 70 }, { x: 2000, elevation: 70 }] }],
    };
    const wide = { geophoneCount: 1000, firstX: 0, spacing: 2 };
    const shots = (n: number): { x: number }[] => Array.from({ length: n }, (_, i) => ({ x: (i * 1998) / Math.max(1, n - 1) }));
    const many = validateSyntheticRequest({ model: long, layout: { ...wide, shots: shots(64) } });
    expect(many.map((p) => p.code)).toEqual(['too-much-work']);
    expect(many[0].message).toContain(String(SYNTHETIC_LIMITS.maxNodeSolves));
    expect(validateSyntheticRequest({ model: long, layout: { ...wide, shots: shots(2) } })).toEqual([]);
  });
});
