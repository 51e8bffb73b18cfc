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
import { fromNullable } from '../shared/nan-none.js';

/**
 * One input per opposing pair whose head-wave reciprocal check could be made
 * (reciprocal-checks.ts has already said why the others could not). tAB is the mean of the check's two readings;
 * the pair is trusted when the check passed (the check already widens its tolerance for
 * long extrapolations). Cost: O(checks + shots · geophones + pairs): the checks looked up
 * by their two shot ids in one map, each shot side's head-wave times built once and
 * shared by every pair it belongs to (they are read, never changed, downstream).
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
  const checkOf = reciprocalCheckIndex(checks);
  const timesByShotSide = new Map<string, HeadWaveTimes>();
  const timesOf = (shot: ShotAnalysis, side: Side): HeadWaveTimes => {
    const key = `${side}\u0000${shot.id}`;
    let t = timesByShotSide.get(key);
    if (!t) {
      t = headWaveTimes(survey, shot, side, phantoms, pickSigmaMs);
      timesByShotSide.set(key, t);
    }
    return t;
  };
  for (const [a, b] of pairs) {
    const check = checkOf(a.id, b.id);
    if (!check) continue;
    out.push({
      left: a,
      right: b,
      leftTimes: timesOf(a, 'right'),
      rightTimes: timesOf(b, 'left'),
      reciprocalTimeMs: (check.forwardMs + check.reverseMs) / 2,
      reciprocalVarianceMs2: reciprocalVarianceMs2(check, pickSigmaMs, spacingM),
      trusted: check.ok,
    });
  }
  return out;
}

/**
 * The reciprocal check of a pair, either way round (the first in the list, as a search
 * would find it); null when it could not be made or compared direct-wave times (their
 * mean is not the head-wave reciprocal time T+ = tA + tB − tAB needs). Building O(checks), each look-up O(1).
 */
function reciprocalCheckIndex(checks: ReciprocalCheck[]): (a: string, b: string) => ReciprocalCheck | null {
  const byKey = new Map<string, ReciprocalCheck>();
  const key = (a: string, b: string): string => `${a.length}:${a}\u0000${b}`;
  for (const k of checks) {
    for (const id of [key(k.shots[0], k.shots[1]), key(k.shots[1], k.shots[0])]) if (!byKey.has(id)) byKey.set(id, k);
  }
  return (a, b) => {
    const c = byKey.get(key(a, b));
    if (!c || c.wave === 'direct' || !Number.isFinite(c.forwardMs) || !Number.isFinite(c.reverseMs)) return null;
    return c;
  };
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
  // Per-pair form (shared/nan-none.ts): NaN where the shot has no time. O(N).
  return {
    timesMs: fromNullable(own.map((t, i) => (t !== null ? t : phantomed[i] ? p!.timesMs[i] : null))),
    phantomed,
    varianceMs2: fromNullable(own.map((t, i) => (t !== null ? pickSigmaMs * pickSigmaMs : phantomed[i] ? w!.varianceMs2[i] : null))),
  };
}
