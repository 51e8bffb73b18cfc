/**
 * Reciprocal-time check. By reciprocity the time from a shot at A to a geophone at B equals
 * the time from a shot at B to a geophone at A (Kearey, Brooks & Hill 2002, ch. 5; the
 * plus-minus method of Hagedoorn, Geophysical Prospecting 7, 1959, rests on it). Opposing
 * shots that disagree point to a bad pick, a trigger error or a mislabelled shot.
 *
 * Pairs checked: every A left of B where A has picks on its right side and B on its left
 * side (each shoots toward the other). Each head-wave time is read from A's (B's) refracted pick at a geophone
 * within a quarter of the geophone spacing of the other shot ('geophone'); failing that it
 * is extrapolated toward the other shot ('extrapolated') by a straight line fitted to the
 * shot's refracted picks nearest that position, all of the branch of the nearest one. The window is local because a refracted
 * branch over an uneven refractor or ground is curved: a line through the whole branch
 * misses a reciprocal time 1 m beyond the last geophone by several ms. It widens with the
 * distance to extrapolate (picks within 2·d + 3 spacings of the target, d the gap to the
 * nearest pick; at least 4 picks) so that a long extrapolation rests on a long baseline.
 * With fewer than 3 refracted picks the fitted branch line(s) are used. Offsets are
 * horizontal distances.
 *
 * Only like is compared with like. The wave that arrives first at the other shot is the
 * branch of the shot's pick nearest that position on the side facing it (arrivalWaveAt: nearer
 * than the side's crossover distance, the direct wave; by reciprocity it is the same wave
 * both ways, since the faster of the direct and the head wave between two points does not
 * depend on which end fires). Head wave both ways: the head-wave times above are
 * compared; they are the reciprocal time tAB of the plus-minus method. Direct wave both ways
 * (shots closer than the crossover distance): the direct-wave times are compared, read from
 * a local line through the nearest direct picks, and the check is marked wave 'direct' (a
 * check of the picks and trigger times, but not a head-wave reciprocal time, so plus-minus
 * does not use it). When the two sides disagree (near the crossover distance, or a side that
 * saw one wave only) the head wave is compared if both sides can read it, else the direct
 * wave; a direct-wave time is read no farther than VERIFIABLE_GAP_SPACINGS spacings from
 * its picks. A pair with no wave readable both ways is not compared; every such pair is
 * named in one 'reciprocal-unavailable' warning.
 */
import type { Survey } from '../survey/survey.js';
import type { ReciprocalCheck, ShotAnalysis, Warning } from '../output/interpretation.js';
import { geophoneSpacingM } from '../branches/shot-geometry.js';
import { timeOnBranchMs } from '../branches/branch-line.js';
import type { ResolvedOptions } from '../survey/options.js';
import { lengthText, timeText } from '../qc/wording.js';

/** A geophone counts as "at" a shot when within this fraction of the spacing. */
const AT_SHOT_FRACTION_OF_SPACING = 0.25;

/** A time read at another shot's position; gapM is how far it lies from the nearest pick used. */
type Reading = { timeMs: number; source: 'geophone' | 'extrapolated'; gapM: number };

/** The wave that arrives first at a position: the direct wave or a head wave (any refractor). */
export type ArrivalWave = 'direct' | 'head';

/**
 * The wave that arrives first from `from` at `atX`, by the branches fitted on the side of
 * `from` facing `atX`: the direct wave nearer than that side's crossover distance, a head
 * wave beyond it; the only wave seen when the side has one kind of branch line; the branch
 * of the nearest pick when the two lines do not cross ahead of the shot or the side has no
 * line (a far off-end shot kept for phantoming). Null when the side has no classified pick.
 * O(1), or O(geophones) for the nearest pick.
 */
export function arrivalWaveAt(survey: Survey, from: ShotAnalysis, atX: number): ArrivalWave | null {
  const side = atX > from.x ? from.right : from.left;
  const hasHead = (side?.refracted.length ?? 0) > 0;
  const hasDirect = !!side?.direct;
  if (hasHead && !hasDirect) return 'head';
  if (hasDirect && !hasHead) return 'direct';
  if (hasHead && hasDirect && side?.crossoverDistance !== null && side?.crossoverDistance !== undefined) {
    return Math.abs(atX - from.x) < side.crossoverDistance ? 'direct' : 'head';
  }
  return nearestPickWave(survey, from, atX);
}

/** The wave of `from`'s pick nearest `atX` on the side facing it; null without one. O(geophones). */
function nearestPickWave(survey: Survey, from: ShotAnalysis, atX: number): ArrivalWave | null {
  const facingRight = atX > from.x;
  let bestD = Infinity;
  let bestBranch: number | null = null;
  survey.geophones.forEach((g, i) => {
    const branch = from.branchOfPick[i];
    if (branch === null || branch === undefined) return;
    if (facingRight ? !(g.x > from.x) : !(g.x < from.x)) return;
    const d = Math.abs(g.x - atX);
    if (d < bestD) {
      bestD = d;
      bestBranch = branch;
    }
  });
  return bestBranch === null ? null : bestBranch === 0 ? 'direct' : 'head';
}

/** A direct pick is read as it stands only at a geophone this close to the other shot (a rounding margin). */
const EXACTLY_AT_FRACTION_OF_SPACING = 1e-6;

/** Least direct picks for a local line (two fix a straight direct branch). */
const DIRECT_MIN_PICKS = 2;

/**
 * Direct-wave time that shot `from` records at `atX`: a least-squares line through its
 * direct picks nearest `atX` on the side facing it (the window of localExtrapolationMs),
 * evaluated at `atX` itself — a geophone a fraction of a spacing from the shot would be
 * off by that fraction over V1, four times more than on a head-wave branch at V2 = 4·V1.
 * With fewer than 2 direct picks, the side's fitted direct line. Null farther than
 * VERIFIABLE_GAP_SPACINGS spacings from the direct picks: beyond them a head wave may
 * arrive first, and a direct time read there checks nothing a geophysicist picked.
 * O(geophones log geophones).
 */
function readDirectTimeAt(survey: Survey, from: ShotAnalysis, atX: number, spacingM: number): Reading | null {
  const shot = survey.shots.find((s) => s.id === from.id);
  if (!shot) return null;
  const exact = survey.geophones.findIndex((g, i) => Math.abs(g.x - atX) <= EXACTLY_AT_FRACTION_OF_SPACING * spacingM && from.branchOfPick[i] === 0);
  const picked = exact >= 0 ? shot.times[exact] : null;
  if (picked !== null && picked !== undefined && Number.isFinite(picked)) return { timeMs: picked, source: 'geophone', gapM: 0 };
  const local = localLineMs(survey, shot.times, from, atX, spacingM, 'direct');
  const reachM = VERIFIABLE_GAP_SPACINGS * spacingM;
  if (local !== null) return local.gapM <= reachM ? { timeMs: local.timeMs, source: 'extrapolated', gapM: local.gapM } : null;
  const line = (atX > from.x ? from.right : from.left)?.direct;
  if (!line) return null;
  const timeMs = timeOnBranchMs(line, Math.abs(atX - from.x));
  const gapM = Math.min(Math.abs(line.fromX - atX), Math.abs(line.toX - atX));
  return Number.isFinite(timeMs) && gapM <= reachM ? { timeMs, source: 'extrapolated', gapM } : null;
}

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
    const branch = from.branchOfPick[nearest];
    // A direct pick there is not a head-wave time (the false misfit of issue 11).
    const head = branch !== 0;
    if (head && t !== null && t !== undefined && Number.isFinite(t)) return { timeMs: t, source: 'geophone', gapM: 0 };
  }
  const local = localLineMs(survey, shot.times, from, atX, spacingM, 'head');
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
 * Time at `atX` from a least-squares line through the picks of `from` of one wave nearest
 * to `atX` on the side facing it: the refracted picks ('head'; null with fewer than 3) or
 * the direct picks ('direct'; null with fewer than 2).
 */
function localLineMs(
  survey: Survey,
  times: (number | null)[],
  from: ShotAnalysis,
  atX: number,
  spacingM: number,
  wave: ArrivalWave,
): { timeMs: number; gapM: number } | null {
  const facingRight = atX > from.x;
  const picks: { x: number; t: number; branch: number }[] = [];
  survey.geophones.forEach((g, i) => {
    const t = times[i];
    const branch = from.branchOfPick[i];
    if (t === null || t === undefined || branch === null || branch === undefined) return;
    if (wave === 'head' ? branch < 1 : branch !== 0) return;
    if (facingRight ? g.x > from.x : g.x < from.x) picks.push({ x: g.x, t, branch });
  });
  picks.sort((p, q) => Math.abs(p.x - atX) - Math.abs(q.x - atX));
  // Only the branch that arrives nearest the target: on a three-layer line mixing the
  // branches of two refractors would bend the local line.
  const branchPicks = picks.filter((p) => p.branch === picks[0]?.branch);
  if (branchPicks.length < (wave === 'head' ? 3 : DIRECT_MIN_PICKS)) return null;
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

/** Times (and the extrapolated distance) in a warning, as the page shows them (0.1 ms, 0.1 m). */
const ms = (v: number): string => timeText(v);
const metres = (v: number): string => lengthText(v);

/** A sentence for a misfit that rests on a long extrapolation (which can add to it). */
function longReadingNote(aId: string, bId: string, forwardGapM: number, reverseGapM: number, spacingM: number): string {
  const limit = VERIFIABLE_GAP_SPACINGS * spacingM;
  if (forwardGapM <= limit && reverseGapM <= limit) return '';
  const [who, where, gap] = forwardGapM > reverseGapM ? [aId, bId, forwardGapM] : [bId, aId, reverseGapM];
  return ` The time of ${who} at ${where}'s position is extrapolated ${metres(gap)} m beyond its picks, which can add to such a difference where the branch bends (a step or an undulating refractor); the pair is used only where no agreeing pair reaches.`;
}

/**
 * The two readings of one pair, of the same wave both ways: the wave both sides say arrives
 * first at the other shot; when they disagree (near the crossover distance, or a side
 * that saw only one wave), the head wave if both sides can read it, else the direct wave.
 * Null when no wave can be read both ways.
 */
function sameWaveReadings(
  survey: Survey,
  a: ShotAnalysis,
  b: ShotAnalysis,
  forwardWave: ArrivalWave | null,
  reverseWave: ArrivalWave | null,
  spacingM: number,
): { forward: Reading; reverse: Reading; wave: ArrivalWave } | null {
  const candidates: ArrivalWave[] = forwardWave === reverseWave ? (forwardWave ? [forwardWave] : []) : ['head', 'direct'];
  for (const wave of candidates) {
    const read = wave === 'direct' ? readDirectTimeAt : readTimeAt;
    const forward = read(survey, a, b.x, spacingM);
    const reverse = forward ? read(survey, b, a.x, spacingM) : null;
    if (forward && reverse) return { forward, reverse, wave };
  }
  return null;
}

/** "S1 with S2, S3; S2 with S3": pairs grouped by their first shot, in line order. O(pairs). */
function namePairs(pairs: [string, string][]): string {
  const groups = new Map<string, string[]>();
  for (const [a, b] of pairs) {
    const g = groups.get(a);
    if (g) g.push(b);
    else groups.set(a, [b]);
  }
  return [...groups].map(([a, bs]) => `${a} with ${bs.join(', ')}`).join('; ');
}

/**
 * One warning naming every pair not compared, instead of one warning per pair (a 40-shot
 * line had 80). Null when every pair was compared.
 */
export function notComparedWarning(pairs: [string, string][]): Warning | null {
  if (pairs.length === 0) return null;
  const count = pairs.length === 1 ? 'one shot pair' : `${pairs.length} shot pairs`;
  return {
    code: 'reciprocal-unavailable',
    message:
      `Reciprocal times of ${count} not checked: one shot of the pair has no pick and no fitted branch of the same wave ` +
      `(direct or head wave) at the other's position — ${namePairs(pairs)}. ` +
      'These pairs give no reciprocal time to the section; every other pair is checked.',
  };
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
  const notCompared: [string, string][] = [];
  for (let i = 0; i < byX.length; i++) {
    const a = byX[i];
    if (!a.right) continue;
    for (let j = i + 1; j < byX.length; j++) {
      const b = byX[j];
      if (!b.left || !(a.x < b.x)) continue;
      const forwardWave = arrivalWaveAt(survey, a, b.x);
      const reverseWave = arrivalWaveAt(survey, b, a.x);
      const read = sameWaveReadings(survey, a, b, forwardWave, reverseWave, spacingM);
      if (!read) {
        notCompared.push([a.id, b.id]);
        continue;
      }
      const { forward, reverse } = read;
      const direct = read.wave === 'direct';
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
        ...(direct ? { wave: 'direct' as const } : {}),
      });
      if (!ok) {
        const what = direct ? 'Direct-wave times' : 'Reciprocal times';
        const why = direct ? ' The shots are closer than the crossover distance, so these are direct-wave picks, not a head-wave reciprocal time.' : '';
        warnings.push({
          code: 'reciprocal-misfit',
          message:
            `${what} of shots ${a.id} and ${b.id} differ by ${ms(differenceMs)} ms ` +
            `(${a.id}→${b.id} ${ms(forward.timeMs)} ms, ${b.id}→${a.id} ${ms(reverse.timeMs)} ms; ` +
            `tolerance ${ms(tolerance + allowanceMs)} ms): check the picks near both shots and their trigger times.` +
            why +
            longReadingNote(a.id, b.id, forward.gapM, reverse.gapM, spacingM),
        });
      }
    }
  }
  const summary = notComparedWarning(notCompared);
  return { checks, warnings: summary ? [summary, ...warnings] : warnings };
}
