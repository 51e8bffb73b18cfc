/**
 * Invented demo lines: survey documents whose first arrivals come from the closed-form
 * two-layer planar refractor (engine/forward/planar-refractor.ts: head wave
 * t = (dA + dB)·cos(ic)/V1 + L/V2, direct wave t = |AB|/V1; Kearey, Brooks & Hill,
 * An Introduction to Geophysical Exploration, 3rd ed., 2002, ch. 5; Telford, Geldart &
 * Sheriff, Applied Geophysics, 2nd ed., 1990, ch. 4).
 *
 * The sites, lines and geology are made up for demonstrations; no real place, client or
 * crew. The picks are exact first arrivals (the earlier of direct wave and head wave)
 * rounded to 0.1 ms, with no noise added, so an interpretation can be compared with the
 * model that made them.
 */
import { firstArrivalMs, type PlanarRefractorModel, type SurfacePoint } from '../forward/planar-refractor.js';
import type { Survey } from '../survey/survey.js';
import { roundTo } from '../shared/numbers.js';

/** A demo line's model: the refractor, the ground and the layout that made its picks. */
export interface DemoLineModel {
  refractor: PlanarRefractorModel;
  /** Ground elevation along the line, m (rounded to 0.01 m as written in the survey). */
  groundElevationM: (xM: number) => number;
  geophoneXsM: number[];
  shots: { id: string; xM: number }[];
}

function geophoneXs(count: number, spacingM: number): number[] {
  return Array.from({ length: count }, (_, i) => i * spacingM);
}

/** Builds the survey document of a model: exact first arrivals rounded to 0.1 ms. */
function surveyFromModel(model: DemoLineModel, name: string, date: string): Survey {
  const point = (x: number): SurfacePoint => ({ x, elevation: model.groundElevationM(x) });
  const geophones = model.geophoneXsM.map((x) => ({ x, elevation: model.groundElevationM(x) }));
  const shots = model.shots.map((s) => ({
    id: s.id,
    x: s.xM,
    elevation: model.groundElevationM(s.xM),
    times: geophones.map((g) => roundTo(firstArrivalMs(model.refractor, point(s.xM), g), 1) as number | null),
  }));
  return { name, date, geophones, shots };
}

/**
 * The main demo's model. Invented scenario: "Demo A", a pump-station terrace on a gently
 * falling valley side. About 4–9 m of clayey colluvium and weathered sandstone (V1 = 700 m/s)
 * over sound sandstone (V2 = 2800 m/s) whose top dips 3.5° toward +x (east, down the valley).
 * 24 geophones at 3 m (x = 0 … 69 m); shots off-end west (−24 m), at the west end (−1.5 m),
 * mid-spread (34.5 m), at the east end (70.5 m) and off-end east (94 m).
 * Ground: 86 m at x = 0, falling 2.2 cm per metre with a 0.3 m swell (wavelength 90 m).
 */
export function demoLineModel(): DemoLineModel {
  return {
    refractor: { v1: 700, v2: 2800, refractorElevationAtZero: 81, dipDegrees: 3.5 },
    groundElevationM: (x) => roundTo(86 - 0.022 * x + 0.3 * Math.sin((2 * Math.PI * x) / 90), 2),
    geophoneXsM: geophoneXs(24, 3),
    shots: [
      { id: 'W-off', xM: -24 },
      { id: 'W-end', xM: -1.5 },
      { id: 'mid', xM: 34.5 },
      { id: 'E-end', xM: 70.5 },
      { id: 'E-off', xM: 94 },
    ],
  };
}

/** The main demo survey (Demo A): five shots into 24 geophones over a dipping refractor. */
export function demoLine(): Survey {
  return surveyFromModel(
    demoLineModel(),
    'Demo A, pump-station terrace (invented site, synthetic picks)',
    'Synthetic: exact first arrivals from a planar-refractor model, rounded to 0.1 ms, no noise',
  );
}

/**
 * The simple demo's model. Invented scenario: "Demo B", a level tank platform: 6 m of
 * compacted fill and gravel (V1 = 550 m/s) over flat-lying mudstone (V2 = 2200 m/s).
 * 24 geophones at 2 m (x = 0 … 46 m), level ground at 50 m; end shots sit on the end
 * geophones (x = 0 and 46 m, time 0 there), off-end shots at −20 m and 66 m, and one at
 * mid-spread (23 m).
 */
export function flatLineModel(): DemoLineModel {
  return {
    refractor: { v1: 550, v2: 2200, refractorElevationAtZero: 44, dipDegrees: 0 },
    groundElevationM: () => 50,
    geophoneXsM: geophoneXs(24, 2),
    shots: [
      { id: 'W-off', xM: -20 },
      { id: 'W-end', xM: 0 },
      { id: 'mid', xM: 23 },
      { id: 'E-end', xM: 46 },
      { id: 'E-off', xM: 66 },
    ],
  };
}

/** The simple demo survey (Demo B): flat ground over a flat refractor. */
export function flatLine(): Survey {
  return surveyFromModel(
    flatLineModel(),
    'Demo B, tank platform (invented site, synthetic picks)',
    'Synthetic: exact first arrivals from a flat-refractor model, rounded to 0.1 ms, no noise',
  );
}
