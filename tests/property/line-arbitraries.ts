/**
 * fast-check generators of refraction lines shaped like real ones, for the property tests:
 * spreads of 2 to 96 geophones (now and then up to the 1,024 limit) at tiny to huge
 * spacings, flat or sloping or rough ground, shots at the ends, inside the spread, on a
 * geophone, off either end and far out, one-sided layouts, dead traces and all-null shots,
 * picks from a closed-form two- or three-layer model with seeded noise, or picks that make
 * no sense (constant, reversed, random), and random options.
 *
 * Two-layer times: engine/forward/planar-refractor.ts (Kearey, Brooks & Hill 2002, ch. 5).
 * Three-layer times over flat interfaces: t = x/V3 + 2·h1·cos θ13/V1 + 2·h2·cos θ23/V2,
 * sin θi3 = Vi/V3 (Kearey, Brooks & Hill 2002, eq. 5.13). The times only need to look like
 * a line: these tests check that nothing escapes, not that the depths are right.
 */
import fc from 'fast-check';
import { firstArrivalMs, type PlanarRefractorModel } from '../../engine/forward/planar-refractor.js';
import type { Survey, SurveyOptions } from '../../engine/survey/survey.js';
import { gaussian, mulberry32 } from '../helpers/random.js';

/** How the fast-check runs scale: PROPERTY_LONG=1 (npm run test:properties-long) runs about 100,000 cases in all. */
export const LONG_RUN = process.env.PROPERTY_LONG === '1';
/** One seed for every property, so a failure replays (fast-check prints seed and path). */
export const PROPERTY_SEED = Number(process.env.PROPERTY_SEED) || 20261205;

export function runs(short: number, long: number): { numRuns: number; seed: number } {
  return { numRuns: LONG_RUN ? long : short, seed: PROPERTY_SEED };
}

type ShotPlace = 'end-left' | 'end-right' | 'inside' | 'on-geophone' | 'off-left' | 'off-right' | 'far-left' | 'far-right';

interface ShotSpec {
  place: ShotPlace;
  /** Where along the spread (inside) or how far out (off-end), 0–1. */
  at: number;
  allNull: boolean;
  deadFraction: number;
}

export interface LineSpec {
  geophones: number;
  spacingM: number;
  x0: number;
  ground: 'flat' | 'slope' | 'rough';
  slopePct: number;
  v1: number;
  v2Ratio: number;
  depthM: number;
  dipDegrees: number;
  third: { v3Ratio: number; extraDepthM: number } | null;
  shots: ShotSpec[];
  picks: 'model' | 'constant' | 'reversed' | 'random';
  noiseMs: number;
  noiseSeed: number;
  elevationsGiven: boolean;
  options: SurveyOptions | undefined;
}

const shotSpec: fc.Arbitrary<ShotSpec> = fc.record({
  place: fc.constantFrom<ShotPlace>('end-left', 'end-right', 'inside', 'on-geophone', 'off-left', 'off-right', 'far-left', 'far-right'),
  at: fc.double({ min: 0, max: 1, noNaN: true }),
  allNull: fc.oneof({ weight: 9, arbitrary: fc.constant(false) }, { weight: 1, arbitrary: fc.constant(true) }),
  deadFraction: fc.oneof(fc.constant(0), fc.constant(0), fc.double({ min: 0, max: 1, noNaN: true })),
});

/** The five-shot layout most lines use (DESIGN.md), so that many generated lines are ordinary ones. */
const fiveShots: ShotSpec[] = [
  { place: 'off-left', at: 0.5, allNull: false, deadFraction: 0 },
  { place: 'end-left', at: 0, allNull: false, deadFraction: 0 },
  { place: 'inside', at: 0.5, allNull: false, deadFraction: 0 },
  { place: 'end-right', at: 0, allNull: false, deadFraction: 0 },
  { place: 'off-right', at: 0.5, allNull: false, deadFraction: 0 },
];

const optionsArb: fc.Arbitrary<SurveyOptions | undefined> = fc.oneof(
  { weight: 4, arbitrary: fc.constant(undefined) },
  {
    weight: 3,
    arbitrary: fc.record(
      {
        layers: fc.constantFrom<2 | 3>(2, 3),
        reciprocalToleranceMs: fc.double({ min: 0.01, max: 50, noNaN: true }),
        method: fc.constantFrom<'plus-minus' | 'grm' | 'time-term'>('plus-minus', 'grm', 'time-term'),
        residuals: fc.boolean(),
        pickUncertaintyMs: fc.double({ min: 0.01, max: 10, noNaN: true }),
      },
      { requiredKeys: [] },
    ),
  },
);

export const lineSpec: fc.Arbitrary<LineSpec> = fc.record({
  geophones: fc.oneof({ weight: 12, arbitrary: fc.integer({ min: 2, max: 60 }) }, { weight: 2, arbitrary: fc.integer({ min: 61, max: 96 }) }, { weight: 1, arbitrary: fc.constantFrom(2, 3, 4, 1024) }),
  spacingM: fc.oneof(fc.constantFrom(0.05, 0.5, 1, 1.5, 2, 3, 5, 10), fc.double({ min: 0.01, max: 200, noNaN: true })),
  x0: fc.oneof(fc.constant(0), fc.double({ min: -5000, max: 5000, noNaN: true })),
  ground: fc.constantFrom<'flat' | 'slope' | 'rough'>('flat', 'slope', 'rough'),
  slopePct: fc.double({ min: -30, max: 30, noNaN: true }),
  v1: fc.double({ min: 150, max: 2500, noNaN: true }),
  v2Ratio: fc.oneof(fc.double({ min: 1.05, max: 8, noNaN: true }), fc.constant(1.0001)),
  depthM: fc.double({ min: 0.2, max: 60, noNaN: true }),
  dipDegrees: fc.oneof(fc.constant(0), fc.double({ min: -15, max: 15, noNaN: true })),
  third: fc.option(fc.record({ v3Ratio: fc.double({ min: 1.1, max: 3, noNaN: true }), extraDepthM: fc.double({ min: 1, max: 40, noNaN: true }) }), { freq: 3 }),
  shots: fc.oneof(fc.constant(fiveShots), fc.array(shotSpec, { minLength: 1, maxLength: 12 })),
  picks: fc.oneof({ weight: 8, arbitrary: fc.constant<'model'>('model') }, { weight: 1, arbitrary: fc.constantFrom<'constant' | 'reversed' | 'random'>('constant', 'reversed', 'random') }),
  noiseMs: fc.oneof(fc.constant(0), fc.double({ min: 0, max: 3, noNaN: true })),
  noiseSeed: fc.integer({ min: 1, max: 2 ** 31 - 1 }),
  elevationsGiven: fc.boolean(),
  options: optionsArb,
});

function shotX(spec: ShotSpec, xs: number[], spacing: number, k: number): number {
  const first = xs[0];
  const last = xs[xs.length - 1];
  const length = last - first;
  switch (spec.place) {
    case 'end-left':
      return first - spacing / 2;
    case 'end-right':
      return last + spacing / 2;
    case 'inside':
      return first + spec.at * length;
    case 'on-geophone':
      return xs[Math.min(xs.length - 1, Math.floor(spec.at * xs.length))];
    case 'off-left':
      return first - (0.1 + spec.at) * Math.max(length, spacing) * 0.6;
    case 'off-right':
      return last + (0.1 + spec.at) * Math.max(length, spacing) * 0.6;
    case 'far-left':
      return first - (2 + 4 * spec.at) * Math.max(length, spacing) - k;
    default:
      return last + (2 + 4 * spec.at) * Math.max(length, spacing) + k;
  }
}

/** The survey document of a line spec. O(G·S). */
export function surveyFromSpec(spec: LineSpec): Survey {
  const rng = mulberry32(spec.noiseSeed);
  const xs = Array.from({ length: spec.geophones }, (_, i) => spec.x0 + i * spec.spacingM);
  const groundAt = (x: number): number => {
    const d = x - spec.x0;
    if (spec.ground === 'flat') return 100;
    if (spec.ground === 'slope') return 100 + (spec.slopePct / 100) * d;
    return 100 + (spec.slopePct / 100) * d + 0.5 * Math.sin(d / Math.max(spec.spacingM, 0.01));
  };
  const v2 = spec.v1 * spec.v2Ratio;
  const model: PlanarRefractorModel = {
    v1: spec.v1,
    v2,
    refractorElevationAtZero: groundAt(spec.x0) - spec.depthM + Math.tan((spec.dipDegrees * Math.PI) / 180) * spec.x0,
    dipDegrees: spec.dipDegrees,
  };
  const thirdTime = (a: number, b: number): number => {
    if (!spec.third) return Infinity;
    const v3 = v2 * spec.third.v3Ratio;
    const c13 = Math.sqrt(1 - (spec.v1 / v3) ** 2);
    const c23 = Math.sqrt(1 - (v2 / v3) ** 2);
    return Math.abs(b - a) / v3 * 1000 + ((2 * spec.depthM * c13) / spec.v1 + (2 * spec.third.extraDepthM * c23) / v2) * 1000;
  };
  const geophones = xs.map((x) => (spec.elevationsGiven ? { x, elevation: groundAt(x) } : { x }));
  const shots = spec.shots.map((s, k) => {
    const x = shotX(s, xs, spec.spacingM, k);
    const shotPoint = { x, elevation: spec.elevationsGiven ? groundAt(x) : 100 };
    const times = xs.map((gx, i): number | null => {
      if (s.allNull || rng() < s.deadFraction) return null;
      const g = { x: gx, elevation: spec.elevationsGiven ? groundAt(gx) : 100 };
      let t: number;
      if (spec.picks === 'constant') t = 20;
      else if (spec.picks === 'reversed') t = 5 + (xs.length - i) * 2;
      else if (spec.picks === 'random') t = rng() * 200;
      else t = Math.min(firstArrivalMs(model, shotPoint, g), thirdTime(x, gx));
      t += spec.noiseMs * gaussian(rng);
      return Math.min(9_999, Math.max(0, t));
    });
    return { id: `S${k + 1}`, x, ...(spec.elevationsGiven ? { elevation: shotPoint.elevation } : {}), times };
  });
  return {
    name: 'property line',
    geophones,
    shots,
    ...(spec.options ? { options: spec.options } : {}),
  };
}

export const surveyArb: fc.Arbitrary<Survey> = lineSpec.map(surveyFromSpec);

/** Every number in a value is finite (nulls allowed); returns the first path that is not, or null. */
export function firstNonFinite(value: unknown, path = ''): string | null {
  if (typeof value === 'number') return Number.isFinite(value) ? null : path || '/';
  if (Array.isArray(value)) {
    for (let k = 0; k < value.length; k++) {
      const found = firstNonFinite(value[k], `${path}/${k}`);
      if (found !== null) return found;
    }
    return null;
  }
  if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) {
      const found = firstNonFinite(v, `${path}/${k}`);
      if (found !== null) return found;
    }
  }
  return null;
}
