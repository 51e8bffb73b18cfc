/**
 * The opposing pairs of the first refractor, ready for the plus-minus core
 * (refractor-plus-times.ts): each pair's head-wave times (own branch-1 picks, else the end
 * shot's phantoms), its reciprocal time from the reciprocal check and that time's variance.
 */
import type { Survey } from '../survey/survey.js';
import type { ReciprocalCheck, ShotAnalysis } from '../output/interpretation.js';
import { refractedTimes, type Side } from '../branches/refracted-times.js';
import { geophoneSpacingM } from '../branches/shot-geometry.js';
import type { EndShotPhantom } from './end-shot-phantoms.js';
import type { HeadWaveTimes, OpposingPairInput } from './refractor-plus-times.js';
import { reciprocalTimeOf } from './weighted-plus-times.js';

/**
 * One input per opposing pair whose reciprocal check could be made (reciprocal-checks.ts
 * has already said why the others could not). tAB is the mean of the check's two readings;
 * the pair is trusted when the check passed (the check already widens its tolerance for
 * long extrapolations). Cost: O(pairs · (checks + geophones)).
 */
export function firstRefractorPairs(
  survey: Survey,
  pairs: [ShotAnalysis, ShotAnalysis][],
  checks: ReciprocalCheck[],
  phantoms: EndShotPhantom[],
  pickSigmaMs: number,
): OpposingPairInput[] {
  const spacingM = geophoneSpacingM(survey.geophones);
  const out: OpposingPairInput[] = [];
  for (const [a, b] of pairs) {
    const check = reciprocalCheckOf(checks, a.id, b.id);
    if (!check) continue;
    out.push({
      left: a,
      right: b,
      leftTimes: headWaveTimes(survey, a, 'right', phantoms, pickSigmaMs),
      rightTimes: headWaveTimes(survey, b, 'left', phantoms, pickSigmaMs),
      reciprocalTimeMs: (check.forwardMs + check.reverseMs) / 2,
      reciprocalVarianceMs2: reciprocalVarianceMs2(check, pickSigmaMs, spacingM),
      trusted: check.ok,
    });
  }
  return out;
}

/** The reciprocal check of a pair, either way round; null when it could not be made. */
function reciprocalCheckOf(checks: ReciprocalCheck[], a: string, b: string): ReciprocalCheck | null {
  const c = checks.find((k) => (k.shots[0] === a && k.shots[1] === b) || (k.shots[0] === b && k.shots[1] === a));
  if (!c || !Number.isFinite(c.forwardMs) || !Number.isFinite(c.reverseMs)) return null;
  return c;
}

/**
 * Variance of a pair's reciprocal time tAB = (forward + reverse)/2, ms² (reciprocalTimeOf).
 * A reading without a recorded gap counts as at a geophone, or as two spacings out when
 * extrapolated.
 */
function reciprocalVarianceMs2(check: ReciprocalCheck, pickSigmaMs: number, spacingM: number): number {
  const gap = (gapM: number | undefined, source: ReciprocalCheck['forwardSource']): number =>
    gapM ?? (source === 'extrapolated' ? 2 * spacingM : 0);
  const readings = [
    { timeMs: check.forwardMs, gapM: gap(check.forwardGapM, check.forwardSource) },
    { timeMs: check.reverseMs, gapM: gap(check.reverseGapM, check.reverseSource) },
  ];
  return reciprocalTimeOf(readings, pickSigmaMs, spacingM)?.varianceMs2 ?? 0;
}

/** Head-wave times a shot contributes toward one side: its own refracted picks, else phantomed ones. */
function headWaveTimes(survey: Survey, shot: ShotAnalysis, side: Side, phantoms: EndShotPhantom[], pickSigmaMs: number): HeadWaveTimes {
  const own = refractedTimes(survey, shot, side);
  const w = phantoms.find((q) => q.shot.id === shot.id && q.side === side);
  const p = w?.result;
  const phantomed = own.map((t, i) => t === null && !!p && p.timesMs[i] !== null);
  return {
    timesMs: own.map((t, i) => (t !== null ? t : phantomed[i] ? p!.timesMs[i] : null)),
    phantomed,
    varianceMs2: own.map((t, i) => (t !== null ? pickSigmaMs * pickSigmaMs : phantomed[i] ? w!.varianceMs2[i] : null)),
  };
}
