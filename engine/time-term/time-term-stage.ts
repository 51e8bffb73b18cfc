/**
 * The time-term method as a stage of the pipeline (Scheidegger & Willmore, Geophysics 22,
 * 1957; Willmore & Bancroft, Geophysical Journal 3, 1960): every first-refractor pick of
 * every shot (the branch assignment of branches/assign-branches.ts) is one row of
 * invertTimeTerms (time-terms.ts). The geophone time terms take the place of the plus-minus
 * delay times, so the rest of the engine turns them into depths exactly as it turns delay
 * times into depths: z = a·V1·V2/√(V2² − V1²) with the local V1 and V2
 * (plus-minus/plus-minus.ts normalDepthFromDelayM), then the same arcs, steps and dips.
 *
 * The refractor slowness is one per segment between the plus-minus section's velocity
 * changes (found from the minus times, which do not depend on the delay times); where a
 * segment's picks do not fix it, one slowness for the line (our choice: a constant slowness
 * is the time-term method's usual form, Willmore & Bancroft 1960).
 * The terms are taken at the refraction points (refraction-point-offset.ts): a first solve
 * at the stations gives the offset, a second the terms.
 * Cost O(shots · geophones) to gather the rows, then two solves' (time-terms.ts).
 */
import type { Survey } from '../survey/survey.js';
import type { ShotAnalysis } from '../output/interpretation.js';
import type { RefractorPlusTimes } from '../plus-minus/refractor-plus-times.js';
import { refractedTimes } from '../branches/refracted-times.js';
import { geophoneSpacingM } from '../branches/shot-geometry.js';
import { invertTimeTerms, type TimeTermFailure, type TimeTermInput, type TimeTermObservation, type TimeTermSolution } from './time-terms.js';
import { atRefractionPoints, refractionPointOffsetM } from './refraction-point-offset.js';

export interface TimeTermStageInput {
  survey: Survey;
  shots: readonly ShotAnalysis[];
  /** Where the refractor velocity changes along the line (the plus-minus section's), m. */
  velocityChangeXsM: readonly number[];
  pickSigmaMs: number;
  /** The line's V1 and V2, m/s, for the refraction points' offset; a null one: terms at the stations. */
  v1MPerS: number | null;
  v2MPerS: number | null;
}

/**
 * The solution with the shots' ids, the breaks actually used, and whether each geophone has
 * head-wave picks from shots on both sides (reversed) — one-way terms are drawn as one-way.
 */
export type TimeTermResult = (TimeTermSolution & { shotIds: string[]; breaksM: number[]; reversed: boolean[] }) | TimeTermFailure;

/** Whether each geophone has picks from a shot on its left and one on its right. O(picks + geophones). */
function reversedGeophones(geophoneXsM: readonly number[], shotXsM: readonly number[], observations: readonly TimeTermObservation[]): boolean[] {
  const fromLeft = geophoneXsM.map(() => false);
  const fromRight = geophoneXsM.map(() => false);
  for (const o of observations) {
    if (shotXsM[o.shot] < geophoneXsM[o.geophone]) fromLeft[o.geophone] = true;
    else fromRight[o.geophone] = true;
  }
  return geophoneXsM.map((_, j) => fromLeft[j] && fromRight[j]);
}

/** Every first-refractor pick of every shot, both sides, as time-term rows. O(shots · geophones). */
export function headWaveObservations(survey: Survey, shots: readonly ShotAnalysis[]): TimeTermObservation[] {
  const out: TimeTermObservation[] = [];
  shots.forEach((shot, i) => {
    for (const side of ['left', 'right'] as const) {
      refractedTimes(survey, shot, side, 1).forEach((t, j) => {
        if (t !== null) out.push({ shot: i, geophone: j, timeMs: t });
      });
    }
  });
  return out;
}

const mean = (values: readonly number[]): number => values.reduce((s, v) => s + v, 0) / values.length;

/**
 * Time terms at the refraction points (refraction-point-offset.ts): the stations' solution
 * gives the offset h = z̄·tan(ic), rounded to whole geophone intervals; a second solve takes
 * each pick's terms there. A station no refraction point reaches keeps its station term. A shot's reported term is the mean of its two legs' (σ: the mean
 * of theirs, an upper bound on the σ of the mean). The stations' solution stands where h
 * rounds to no interval or the second solve fails. Two solves.
 */
function solveAtRefractionPoints(input: TimeTermInput, v1: number | null, v2: number | null, spacingM: number): TimeTermSolution | TimeTermFailure {
  const atStations = invertTimeTerms(input);
  if (!atStations.ok || v1 === null || v2 === null || !(spacingM > 0)) return atStations;
  const steps = Math.round(refractionPointOffsetM(atStations.geophoneTermMs, v1, v2) / spacingM);
  if (steps === 0) return atStations;
  const moved = atRefractionPoints(input.geophoneXsM, input.shotXsM, input.observations, steps * spacingM);
  const solution = invertTimeTerms({ ...input, geophoneXsM: moved.geophoneXsM, shotXsM: moved.shotXsM, observations: moved.observations });
  if (!solution.ok) return atStations;
  const stations = input.geophoneXsM.length;
  return {
    ...solution,
    // A station no pick's refraction point reaches (the far end of one-sided coverage) keeps its term at the station.
    geophoneTermMs: solution.geophoneTermMs.slice(0, stations).map((a, j) => a ?? atStations.geophoneTermMs[j]),
    geophoneTermSigmaMs: solution.geophoneTermSigmaMs.slice(0, stations).map((s, j) => (solution.geophoneTermMs[j] === null ? atStations.geophoneTermSigmaMs[j] : s)),
    shotTermMs: moved.legsOfShot.map((legs) => mean(legs.map((k) => solution.shotTermMs[k]))),
    shotTermSigmaMs: moved.legsOfShot.map((legs) => mean(legs.map((k) => solution.shotTermSigmaMs[k]))),
  };
}

/** The time terms of the line's first refractor (see the file comment). */
export function timeTermStage(input: TimeTermStageInput): TimeTermResult {
  const { survey, shots, pickSigmaMs } = input;
  const geophoneXsM = survey.geophones.map((g) => g.x);
  const shotXsM = shots.map((s) => s.x);
  const observations = headWaveObservations(survey, shots);
  const spacingM = geophoneSpacingM(survey.geophones);
  const breaks = [...input.velocityChangeXsM].sort((a, b) => a - b);
  const tries = breaks.length > 0 ? [breaks, []] : [[]];
  let last: TimeTermFailure = { ok: false, reason: 'no head-wave picks to invert' };
  for (const breaksM of tries) {
    const solution = solveAtRefractionPoints({ geophoneXsM, shotXsM, observations, slownessBreaksM: breaksM, pickSigmaMs }, input.v1MPerS, input.v2MPerS, spacingM);
    // A segment slowness ≤ 0 is not a refractor: retry with one slowness for the line.
    if (solution.ok && solution.segments.every((s) => s.velocityMPerS > 0 && Number.isFinite(s.velocityMPerS))) {
      return { ...solution, shotIds: shots.map((s) => s.id), breaksM, reversed: reversedGeophones(geophoneXsM, shotXsM, observations) };
    }
    if (!solution.ok) last = solution;
    else last = { ok: false, reason: 'the fitted refractor slowness is not positive' };
  }
  return last;
}

/**
 * The plus-minus stage's record with the geophone time terms as delay times, T+ = 2·a and
 * σ(T+) = 2·σ(a). Pairs and their flags stay the plus-minus ones (coverage warnings speak of
 * the picks). Coverage is the time terms' own: 'pair' where head waves reach the geophone
 * from both sides, 'phantom' (drawn as phantomed or one-way) where from one side only. O(N).
 */
export function withTimeTerms(plus: RefractorPlusTimes, solution: TimeTermSolution & { reversed: readonly boolean[] }): RefractorPlusTimes {
  const a = solution.geophoneTermMs;
  return {
    ...plus,
    delayTimeMs: a.slice(),
    delaySource: a.map((t, i) => (t === null ? null : solution.reversed[i] ? 'pair' : 'phantom')),
    combined: {
      ...plus.combined,
      plusTimeMs: a.map((t) => (t === null ? null : 2 * t)),
      plusSigmaMs: solution.geophoneTermSigmaMs.map((s) => (s === null ? null : 2 * s)),
    },
  };
}
