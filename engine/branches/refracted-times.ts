/**
 * A shot's picks on one refracted branch, as arrays over the geophones: what plus-minus,
 * phantoming and the step search read of each shot.
 */
import type { Survey } from '../survey/survey.js';
import type { ShotAnalysis } from '../output/interpretation.js';
import type { RefractedBranch } from '../structure/structure-features.js';
import { isFiniteNumber } from '../shared/numbers.js';

/** Which refractor: 1 the first (branch 1 of the picks), 2 the second. */
export type RefractorIndex = 1 | 2;

/** Direction the arrivals travel from the shot. */
export type Side = 'left' | 'right';

/** Picks of `shot` on `side` that belong to refractor k (default the first), ms; null elsewhere. O(geophones). */
export function refractedTimes(survey: Survey, shot: ShotAnalysis, side: Side, k: RefractorIndex = 1): (number | null)[] {
  const times = survey.shots.find((s) => s.id === shot.id)?.times ?? [];
  return survey.geophones.map((g, i) => {
    const t = times[i];
    const onSide = side === 'right' ? g.x > shot.x : g.x < shot.x;
    return onSide && shot.branchOfPick[i] === k && isFiniteNumber(t) ? t : null;
  });
}

/** Every shot's own first-refractor picks, one entry per side that has any. */
export function refractedBranches(survey: Survey, shots: ShotAnalysis[]): RefractedBranch[] {
  const out: RefractedBranch[] = [];
  for (const shot of shots) {
    for (const side of ['left', 'right'] as const) {
      const timesMs = refractedTimes(survey, shot, side);
      if (timesMs.some((t) => t !== null)) out.push({ shot: shot.id, shotXM: shot.x, timesMs });
    }
  }
  return out;
}
