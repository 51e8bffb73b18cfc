/**
 * Survey documents whose picks are the closed-form first arrivals over a planar two-layer
 * model (engine/forward/planar-refractor.ts: Kearey, Brooks & Hill 2002, ch. 5; Telford,
 * Geldart & Sheriff 1990, ch. 4), for reference checks. Noise-free unless a noise level
 * and a seeded generator are given.
 */
import { firstArrivalMs, type PlanarRefractorModel } from '../../engine/forward/planar-refractor.js';
import type { Survey } from '../../engine/survey/survey.js';
import { gaussian } from './random.js';

export interface PlanarLayout {
  geophoneXsM: number[];
  shots: { id: string; xM: number }[];
  /** Ground elevation along the line, m. */
  groundElevationM: (xM: number) => number;
}

/** The usual five-shot layout: off-end, end, mid-spread, end, off-end; 24 geophones. */
export function fiveShotLayout(opts: { spacingM?: number; offEndM?: number; ground?: (xM: number) => number } = {}): PlanarLayout {
  const spacing = opts.spacingM ?? 3;
  const geophoneXsM = Array.from({ length: 24 }, (_, i) => i * spacing);
  const last = geophoneXsM[geophoneXsM.length - 1];
  const offEnd = opts.offEndM ?? 60;
  return {
    geophoneXsM,
    shots: [
      { id: 'W-off', xM: -offEnd },
      { id: 'W-end', xM: -spacing / 2 },
      { id: 'Mid', xM: last / 2 },
      { id: 'E-end', xM: last + spacing / 2 },
      { id: 'E-off', xM: last + offEnd },
    ],
    groundElevationM: opts.ground ?? (() => 100),
  };
}

export function planarSurvey(
  model: PlanarRefractorModel,
  layout: PlanarLayout,
  noise?: { sigmaMs: number; rng: () => number },
): Survey {
  const geophones = layout.geophoneXsM.map((x) => ({ x, elevation: layout.groundElevationM(x) }));
  return {
    name: 'planar reference',
    geophones,
    shots: layout.shots.map((s) => {
      const shotPoint = { x: s.xM, elevation: layout.groundElevationM(s.xM) };
      return {
        id: s.id,
        x: s.xM,
        elevation: shotPoint.elevation,
        times: geophones.map((g) => {
          const t = firstArrivalMs(model, shotPoint, g);
          return noise ? Math.max(0, t + noise.sigmaMs * gaussian(noise.rng)) : t;
        }),
      };
    }),
  };
}
