/**
 * Long refraction lines for the section-sheet tests and for looking at the sheets: closed-form
 * first arrivals over a gently dipping planar refractor (engine/forward/planar-refractor.ts;
 * Kearey, Brooks & Hill 2002, ch. 5) under an invented rolling ground, with shots spread
 * evenly along the line and off both ends. Invented data: for tests and previews only.
 */
import type { PlanarRefractorModel } from '../../engine/forward/planar-refractor.js';
import type { Survey } from '../../engine/survey/survey.js';
import { planarSurvey } from './planar-survey.js';
import { mulberry32 } from './random.js';

export interface LongLineLayout {
  geophones: number;
  spacingM: number;
  shots: number;
  /** Pick noise, ms (seeded); 0 for exact times. */
  noiseMs?: number;
}

/** A shallow refractor (about 8–14 m deep along a few hundred metres), 650 / 2600 m/s. */
export const LONG_LINE_MODEL: PlanarRefractorModel = { v1: 650, v2: 2600, refractorElevationAtZero: 92, dipDegrees: 0.15 };

/** Invented rolling ground, m. */
export function longLineGround(xM: number): number {
  return Math.round((100 + 2.5 * Math.sin(xM / 140) + 0.6 * Math.sin(xM / 23)) * 100) / 100;
}

/**
 * `shots` shots: one off each end (20 spacings out), one at each end, the rest evenly inside.
 * Ids S01, S02, … in order along the line.
 */
export function longLine(layout: LongLineLayout): Survey {
  const xs = Array.from({ length: layout.geophones }, (_, i) => i * layout.spacingM);
  const last = xs[xs.length - 1];
  const inside = Math.max(0, layout.shots - 4);
  const shotXs = [-20 * layout.spacingM, -layout.spacingM / 2];
  for (let k = 1; k <= inside; k++) shotXs.push(Math.round((k * last) / (inside + 1) / layout.spacingM) * layout.spacingM + layout.spacingM / 2);
  shotXs.push(last + layout.spacingM / 2, last + 20 * layout.spacingM);
  const shots = shotXs.slice(0, Math.max(layout.shots, 2)).sort((a, b) => a - b).map((xM, i) => ({ id: `S${String(i + 1).padStart(2, '0')}`, xM }));
  const noise = layout.noiseMs ? { sigmaMs: layout.noiseMs, rng: mulberry32(7) } : undefined;
  const survey = planarSurvey(LONG_LINE_MODEL, { geophoneXsM: xs, shots, groundElevationM: longLineGround }, noise);
  survey.name = `Long line, ${layout.geophones} geophones at ${layout.spacingM} m, ${layout.shots} shots`;
  survey.shots = survey.shots.map((s) => ({ ...s, times: s.times.map((t) => (t === null ? null : Math.round(t * 100) / 100)) }));
  return survey;
}
