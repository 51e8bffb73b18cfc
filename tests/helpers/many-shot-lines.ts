/**
 * Lines with many shots for the time–distance plot's tests: closed-form two-layer first
 * arrivals (head wave t = x/V2 + 2h·cos(ic)/V1, direct wave t = x/V1; Telford, Geldart &
 * Sheriff, Applied Geophysics, 2nd ed., 1990, §4.3, section number from memory; coded in
 * engine/forward/planar-refractor.ts) over a refractor 8 m down dipping 2°, geophones every
 * 2 m. Invented data, for tests only.
 */
import type { PlanarRefractorModel } from '../../engine/forward/planar-refractor.js';
import type { Survey } from '../../engine/survey/survey.js';
import { planarSurvey } from './planar-survey.js';

export const MANY_SHOT_MODEL: PlanarRefractorModel = { v1: 600, v2: 2400, refractorElevationAtZero: 92, dipDegrees: 2 };

function line(name: string, geophoneCount: number, shotXs: number[]): Survey {
  const survey = planarSurvey(MANY_SHOT_MODEL, {
    geophoneXsM: Array.from({ length: geophoneCount }, (_, i) => 2 * i),
    shots: shotXs.map((xM, k) => ({ id: `S${k + 1}`, xM })),
    groundElevationM: () => 100,
  });
  return { ...survey, name };
}

/** Ten shots about 10 m apart on 48 geophones (several pairs closer than the crossover distance). */
export function tenShotLine(): Survey {
  return line('10-shot test line', 48, [-1, 9, 19, 31, 41, 51, 63, 75, 85, 95]);
}

/** Forty shots every 5 m on 96 geophones, listed out of line order (the plot must not care). */
export function fortyShotLine(): Survey {
  const survey = line('40-shot test line', 96, Array.from({ length: 40 }, (_, k) => -1 + 5 * k));
  // Survey order: odd positions first, then even ones.
  const shots = [...survey.shots.filter((_, k) => k % 2 === 1), ...survey.shots.filter((_, k) => k % 2 === 0)];
  return { ...survey, shots };
}
