/**
 * Reciprocal-time check. By reciprocity the time from a shot at A to a geophone at B equals
 * the time from a shot at B to a geophone at A (Kearey, Brooks & Hill 2002, ch. 5; the
 * plus-minus method of Hagedoorn, Geophysical Prospecting 7, 1959, rests on it). Opposing
 * shots that disagree point to a bad pick, a trigger error or a mislabelled shot.
 *
 * Pairs checked: every A left of B where A has picks on its right side and B on its left
 * side (each shoots toward the other). Each time is read from A's (B's) pick at a geophone
 * within a quarter of the geophone spacing of the other shot ('geophone'); failing that it
 * is extrapolated toward the other shot ('extrapolated') by a straight line fitted to the
 * shot's refracted picks nearest that position, all of the branch of the nearest one. The window is local because a refracted
 * branch over an uneven refractor or ground is curved: a line through the whole branch
 * misses a reciprocal time 1 m beyond the last geophone by several ms. It widens with the
 * distance to extrapolate (picks within 2·d + 3 spacings of the target, d the gap to the
 * nearest pick; at least 4 picks) so that a long extrapolation rests on a long baseline.
 * With fewer than 3 refracted picks the fitted branch line(s) are used. Offsets are
 * horizontal distances.
 */
import type { Survey } from '../survey/survey.js';
import type { ReciprocalCheck, ShotAnalysis, Warning } from '../output/interpretation.js';
import { geophoneSpacingM } from '../branches/shot-geometry.js';
import { timeOnBranchMs } from '../branches/branch-line.js';
import type { ResolvedOptions } from '../survey/options.js';

/** A geophone counts as "at" a shot when within this fraction of the spacing. */
const AT_SHOT_FRACTION_OF_SPACING = 0.25;

/** A time read at another shot's position; gapM is how far it lies from the nearest pick used. */
type Reading = { timeMs: number; source: 'geophone' | 'extrapolated'; gapM: number };

/**
 * Time that shot `from` records at position `atX`, or null when it cannot be read.
 * `spacingM` is geophoneSpacingM(survey.geophones), computed once by the caller (a sort of
 * the gaps, O(G log G), was repeated twice per pair of shots).
 */
function readTimeAt(survey: Survey, from: ShotAnalysis, atX: number, spacingM: number): Reading | null {
  const shot = survey.shots.find((s) => s.id === from.id);
  if (!shot) return null;
  const limit = AT_SHOT_FRACTION_OF_SPACING * spacingM;
  let nearest = -1;
  survey.geophones.forEach((g, i) => {
    if (nearest < 0 || Math.abs(g.x - atX) < Math.abs(survey.geophones[nearest].x - atX)) nearest = i;
  });
  if (nearest >= 0 && Math.abs(survey.geophones[nearest].x - atX) <= limit) {
    const t = shot.times[nearest];
    if (t !== null && t !== undefined && Number.isFinite(t)) return { timeMs: t, source: 'geophone', gapM: 0 };
  }
  const local = localExtrapolationMs(survey, shot.times, from, atX, spacingM);
  if (local !== null) return { timeMs: local.timeMs, source: 'extrapolated', gapM: local.gapM };
  const side = atX > from.x ? from.right : from.left;
  const lines = side?.refracted ?? [];
  if (lines.length === 0) return null;
  const offsetM = Math.abs(atX - from.x);
  const timeMs = Math.min(...lines.map((l) => timeOnBranchMs(l, offsetM)));
  const gapM = Math.min(...lines.map((l) => Math.min(Math.abs(l.fromX - atX), Math.abs(l.toX - atX))));
  return Number.isFinite(timeMs) ? { timeMs, source: 'extrapolated', gapM } : null;
}

/** Least picks for a local fit, and the window's extra width in geophone spacings. */
const LOCAL_MIN_PICKS = 4;
const LOCAL_WINDOW_SPACINGS = 3;

/**
 * Time at `atX` from a least-squares line through the refracted picks of `from` nearest
 * to `atX` on the side facing it; null with fewer than 3 such picks.
 */
function localExtrapolationMs(
  survey: Survey,
  times: (number | null)[],
  from: ShotAnalysis,
  atX: number,
  spacingM: number,
): { timeMs: number; gapM: number } | null {
  const facingRight = atX > from.x;
  const picks: { x: number; t: number; branch: number }[] = [];
  survey.geophones.forEach((g, i) => {
    const t = times[i];
    const branch = from.branchOfPick[i];
    if (t === null || t === undefined || branch === null || branch === undefined || branch < 1) return;
    if (facingRight ? g.x > from.x : g.x < from.x) picks.push({ x: g.x, t, branch });
  });
  picks.sort((p, q) => Math.abs(p.x - atX) - Math.abs(q.x - atX));
  // Only the branch that arrives nearest the target: on a three-layer line mixing the
  // branches of two refractors would bend the local line.
  const branchPicks = picks.filter((p) => p.branch === picks[0]?.branch);
  if (branchPicks.length < 3) return null;
  const gapM = Math.abs(branchPicks[0].x - atX);
  const reachM = 2 * gapM + LOCAL_WINDOW_SPACINGS * spacingM;
  const window = branchPicks.filter((p, k) => k < LOCAL_MIN_PICKS || Math.abs(p.x - atX) <= reachM);
  const n = window.length;
  const meanX = window.reduce((a, p) => a + p.x, 0) / n;
  const meanT = window.reduce((a, p) => a + p.t, 0) / n;
  let sxx = 0;
  let sxt = 0;
  for (const p of window) {
    sxx += (p.x - meanX) ** 2;
    sxt += (p.x - meanX) * (p.t - meanT);
  }
  if (!(sxx > 0)) return null;
  const timeMs = meanT + (sxt / sxx) * (atX - meanX);
  return Number.isFinite(timeMs) ? { timeMs, gapM } : null;
}

/**
 * Readings within this many geophone spacings of the picks they rest on count as measured;
 * farther ones are extrapolations whose own error widens the tolerance. Our choice.
 */
export const VERIFIABLE_GAP_SPACINGS = 2;

/**
 * Extra tolerance for readings extrapolated far beyond their picks: two standard errors of
 * a line extrapolated a distance gap, taken as σ·gap/(2d) per long reading (d the geophone
 * spacing; the shape of the error of a line extrapolated beyond its data). Readings within
 * VERIFIABLE_GAP_SPACINGS spacings add nothing. Our choice.
 */
export function extrapolationAllowanceMs(forwardGapM: number, reverseGapM: number, spacingM: number, pickSigmaMs: number): number {
  const limit = VERIFIABLE_GAP_SPACINGS * spacingM;
  const one = (gap: number): number => (gap > limit ? (2 * pickSigmaMs * gap) / (2 * spacingM) : 0);
  return one(forwardGapM) + one(reverseGapM);
}

const ms = (v: number): string => v.toFixed(1);

/** A sentence for a misfit that rests on a long extrapolation (which can add to it). */
function longReadingNote(aId: string, bId: string, forwardGapM: number, reverseGapM: number, spacingM: number): string {
  const limit = VERIFIABLE_GAP_SPACINGS * spacingM;
  if (forwardGapM <= limit && reverseGapM <= limit) return '';
  const [who, where, gap] = forwardGapM > reverseGapM ? [aId, bId, forwardGapM] : [bId, aId, reverseGapM];
  return ` The time of ${who} at ${where}'s position is extrapolated ${ms(gap)} m beyond its picks, which can add to such a difference where the branch bends (a step or an undulating refractor); the pair is used only where no agreeing pair reaches.`;
}

/**
 * Every opposing pair's reciprocal check, with the tolerance and pick uncertainty of the
 * resolved options (options.ts). Cost: O(shots² · geophones log geophones).
 */
export function reciprocalChecks(
  survey: Survey,
  shots: ShotAnalysis[],
  options: Pick<ResolvedOptions, 'reciprocalToleranceMs' | 'pickUncertaintyMs'>,
): { checks: ReciprocalCheck[]; warnings: Warning[] } {
  const tolerance = options.reciprocalToleranceMs;
  const byX = [...shots].sort((a, b) => a.x - b.x);
  const spacingM = geophoneSpacingM(survey.geophones);
  const pickSigmaMs = options.pickUncertaintyMs;
  const checks: ReciprocalCheck[] = [];
  const warnings: Warning[] = [];
  for (let i = 0; i < byX.length; i++) {
    const a = byX[i];
    if (!a.right) continue;
    for (let j = i + 1; j < byX.length; j++) {
      const b = byX[j];
      if (!b.left || !(a.x < b.x)) continue;
      const forward = readTimeAt(survey, a, b.x, spacingM);
      const reverse = readTimeAt(survey, b, a.x, spacingM);
      if (!forward || !reverse) {
        const missing = !forward ? `${a.id} at ${b.id}'s position` : `${b.id} at ${a.id}'s position`;
        warnings.push({
          code: 'reciprocal-unavailable',
          message: `Reciprocal time of shots ${a.id} and ${b.id} not checked: no pick and no refracted branch gives the time of ${missing}.`,
        });
        continue;
      }
      const differenceMs = Math.abs(forward.timeMs - reverse.timeMs);
      const allowanceMs = extrapolationAllowanceMs(forward.gapM, reverse.gapM, spacingM, pickSigmaMs);
      const ok = differenceMs <= tolerance + allowanceMs;
      checks.push({
        shots: [a.id, b.id],
        forwardMs: forward.timeMs,
        reverseMs: reverse.timeMs,
        differenceMs,
        ok,
        forwardSource: forward.source,
        reverseSource: reverse.source,
        forwardGapM: forward.gapM,
        reverseGapM: reverse.gapM,
        ...(allowanceMs > 0 ? { extrapolationAllowanceMs: allowanceMs } : {}),
        toleranceMs: tolerance,
      });
      if (!ok) {
        warnings.push({
          code: 'reciprocal-misfit',
          message:
            `Reciprocal times of shots ${a.id} and ${b.id} differ by ${ms(differenceMs)} ms ` +
            `(${a.id}→${b.id} ${ms(forward.timeMs)} ms, ${b.id}→${a.id} ${ms(reverse.timeMs)} ms; ` +
            `tolerance ${ms(tolerance + allowanceMs)} ms): check the picks near both shots and their trigger times.` +
            longReadingNote(a.id, b.id, forward.gapM, reverse.gapM, spacingM),
        });
      }
    }
  }
  return { checks, warnings };
}
