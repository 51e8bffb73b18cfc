/**
 * Branch assignment of first arrivals: for every shot and each side of it, which picks are
 * direct waves (branch 0), head waves from the first refractor (1) or from the second (2),
 * with a straight line t_ms = interceptMs + 1000·offset/velocity fitted to each branch
 * (Kearey, Brooks & Hill, An Introduction to Geophysical Exploration, 3rd ed., 2002, ch. 5).
 *
 * Offsets are horizontal distances along the line, |x − shot x|; elevation differences are
 * ignored here and handled by the plus-minus step.
 *
 * Two passes:
 *  1. every side is fitted with 1, 2 and (unless two layers are forced) 3 straight
 *     segments (segmented-fit.ts). Sides whose best fit by BIC has two or more segments,
 *     and whose first segment starts near zero time, give a provisional V1 (median).
 *  2. each fit's first segment is classed as direct when its apparent velocity is at most
 *     DIRECT_VELOCITY_FACTOR·V1, else refracted (an off-end side with no direct picks);
 *     the fit with the lowest BIC whose branches fit the layer count is kept. When three
 *     layers are forced, the fit that reaches the second refractor is preferred wherever
 *     a side has picks enough for it.
 *     Every BIC here takes the noise σ as no smaller than the pick uncertainty
 *     (options.pickUncertaintyMs, options.ts; segmented-fit.ts bicScore): a bend
 *     smaller than the picks can resolve is not evidence of another branch.
 *  3. (layer count not forced) a second refractor found on a side must also pass two
 *     tests before it is kept, because topography and lateral velocity changes also bend
 *     a time–distance curve:
 *       - its apparent velocity is at least SECOND_REFRACTOR_MIN_CONTRAST × that of the
 *         first refracted branch on the same side;
 *       - shots shooting the same way see its break at about the same offset (a flat or
 *         gently dipping refractor gives one crossover distance), not at the same x (a
 *         kink fixed in x is a lateral change or topography under the line). Where the
 *         breaks of such shots line up in x rather than in offset, the second refractor
 *         is dropped on every side facing that way.
 *     The reversal test counts a far off-end side as the deeper refractor's reversal when
 *     its one line runs parallel to its own direction's branch 2 and matches the opposite
 *     direction's (withFarOffEndSides, forReversal).
 *  4. the line read jointly: a side whose middle of three segments never arrives before
 *     both neighbouring lines by more than TRANSITION_UNDERCUT_SIGMAS·σ is read with two
 *     branches (withoutTransitionSegment: the corner of the direct wave and the first
 *     refractor is not a layer); a side read with no direct wave keeps the picks nearest
 *     the shot that lie on the line's direct wave as direct (withDirectNearShot); then
 *     (unless two layers are forced) a far off-end side
 *     that is all refracted with one line, on a line where other sides show both refracted
 *     branches, is split at their median 1→2 break offset when its velocity is nearer
 *     their branch-2 velocity (withFarOffEndSides); last, a side read as one branch-1 line
 *     that runs past its direction's median crossover offset is split there when a far
 *     line parallel to the line's branch 2 fits its far picks better by a χ² test
 *     (withLineCrossover).
 * options.branchOverrides replace the automatic split exactly (overridden: true).
 */
import { median } from 'simple-statistics';
import type { BranchOverride, Survey } from '../survey/survey.js';
import { resolveOptions, type ResolvedOptions } from '../survey/options.js';
import type { BranchLine, ShotAnalysis, SideBranches } from '../output/interpretation.js';
import { fitLine, robustSegmentedFit, type SegmentedFit, type SegmentLine } from './segmented-fit.js';
import { sidePicks, AT_SHOT_TOLERANCE_M, type Side, type SidePick } from './side-picks.js';
import { apparentVelocity, branchLineFromSegment, crossoverDistanceM, timeOnBranchMs } from './branch-line.js';
import { geophoneSpacingM, shotElevationM, shotPosition } from './shot-geometry.js';

/**
 * A single-line side (or the first segment of a side) is refracted when its apparent
 * velocity exceeds this multiple of V1. Our choice: layer contrasts worth mapping are
 * well above 1.5, while V1 scatters by far less than that between shots.
 */
export const DIRECT_VELOCITY_FACTOR = 1.5;
/**
 * With no V1 anywhere on the line, a single-line side is refracted when its intercept
 * time exceeds this many ms plus three times its RMS misfit (a direct wave starts near 0;
 * trigger delays and shot depth rarely exceed a couple of ms). Our choice.
 */
export const DIRECT_INTERCEPT_LIMIT_MS = 3;

/**
 * Without a forced layer count, a fit that shows a second refractor is kept only when its
 * BIC is lower than the best fit without one by at least this much: "very strong"
 * evidence on the scale of Kass & Raftery (JASA 90, 1995). Plain BIC let noise of 0.2 ms
 * invent a third layer on a few sides in a hundred.
 */
export const THIRD_LAYER_BIC_MARGIN = 10;

/**
 * Unforced, a second refracted branch must be at least this much faster (apparent
 * velocity ratio) than the first refracted branch on the same side. Common practice:
 * contrasts under about 25 % are within the lateral velocity variation of one refractor
 * and within the bending that topography gives the apparent velocity, and layers that
 * close in velocity are poorly resolved by refraction anyway (the critical angle is steep).
 */
export const SECOND_REFRACTOR_MIN_CONTRAST = 1.25;


/**
 * Shots closer together than this many geophone spacings cannot tell a break fixed in
 * offset from one fixed in x, so their pair is not used in the consistency test. Our choice.
 */
export const CONSISTENCY_MIN_SHOT_SEPARATION_SPACINGS = 2;

type BranchIndex = 0 | 1 | 2;

interface SideChoice {
  /** Branch of each side pick, in the order of the picks. */
  branchOfSidePick: BranchIndex[];
  direct: BranchLine | null;
  refracted: BranchLine[];
  overridden: boolean;
  /** Where the second refracted branch starts. */
  breakPoint?: Omit<BreakPoint, 'shotX'>;
}

/** Where a side's second refracted branch starts: x along the line and offset from the shot, m. */
interface BreakPoint {
  shotX: number;
  breakX: number;
  breakOffsetM: number;
}

interface Candidate {
  fit: SegmentedFit;
  /** Branch index of the first segment (0 direct, 1 refracted). */
  firstBranch: 0 | 1;
}

/** The options branch assignment reads (options.ts). */
export type BranchOptions = Pick<ResolvedOptions, 'layers' | 'pickUncertaintyMs' | 'branchOverrides'>;

/** Branches of every shot's picks (see the file comment); `options` default to the survey's own, resolved. */
export function assignBranches(survey: Survey, options: BranchOptions = resolveOptions(survey.options)): ShotAnalysis[] {
  const forcedLayers = options.layers ?? undefined;
  const maxSegments: 2 | 3 = forcedLayers === 2 ? 2 : 3;
  const overrides = options.branchOverrides;
  const noiseFloorMs = options.pickUncertaintyMs;

  // Pass 1: fit every side that is not overridden.
  const sides = survey.shots.map((_, s) =>
    (['left', 'right'] as const).map((side) => {
      const picks = sidePicks(survey, s, side);
      const override = findOverride(overrides, survey.shots[s].id, side);
      const fits: SegmentedFit[] = [];
      if (!override) {
        const points = picks.map((p) => ({ offsetM: p.offsetM, timeMs: p.timeMs }));
        for (let m = 1; m <= maxSegments; m++) {
          const f = robustSegmentedFit(points, m as 1 | 2 | 3, noiseFloorMs);
          if (f) fits.push(f);
        }
      }
      return { side, picks, override, fits };
    }),
  );

  const v1Provisional = provisionalV1(sides.flat());

  // Pass 2: each side on its own.
  const choose = (work: (typeof sides)[number][number], allowSecond: boolean): SideChoice | null => {
    if (work.picks.length === 0) return null;
    return work.override
      ? overriddenSide(work.picks, work.override)
      : chooseSide(work.picks, work.fits, v1Provisional, forcedLayers, allowSecond);
  };
  // Sides whose middle segment is only the corner of two branches, read with two (O(picks)).
  const withoutTransitions = (cs: (SideChoice | null)[][]): (SideChoice | null)[][] =>
    cs.map((pair, s) => pair.map((c, k) => c && withoutTransitionSegment(c, sides[s][k].picks, noiseFloorMs)));
  const choices = sides.map((pair) => pair.map((work) => choose(work, true)));

  // Pass 3: unforced, a second refractor must break at a consistent offset across shots.
  if (forcedLayers === undefined) {
    const spacingM = geophoneSpacingM(survey.geophones);
    // k: 0 = sides shooting toward −x, 1 = toward +x.
    for (const k of [0, 1] as const) {
      const breaks: { s: number; at: BreakPoint }[] = [];
      choices.forEach((pair, s) => {
        const c = pair[k];
        if (c && !c.overridden && c.breakPoint) breaks.push({ s, at: { ...c.breakPoint, shotX: survey.shots[s].x } });
      });
      if (!breaksFixedInX(breaks.map((b) => b.at), spacingM)) continue;
      for (const b of breaks) choices[b.s][k] = choose(sides[b.s][k], false);
    }
  }


  // Pass 4: unforced, a second refractor must be reversed: shot from both directions over
  // a common stretch of the line. Undulations of one refractor bend a branch one way from
  // one end and elsewhere from the other; a deeper layer is seen from both.
  const suppressed = new Set<string>();
  if (forcedLayers === undefined && !secondRefractorReversed(withFarOffEndSides(withoutTransitions(choices), (s, k) => sides[s][k].picks, true), sides)) {
    choices.forEach((pair, s) =>
      pair.forEach((c, k) => {
        if (!c || c.overridden || !c.branchOfSidePick.includes(2)) return;
        suppressed.add(`${s}:${k}`);
        pair[k] = choose(sides[s][k], false);
      }),
    );
  }
  // Only now, with the deeper refractor confirmed, may a far off-end side be read as
  // wholly or mostly beyond the crossover on every line that shows both refracted branches.
  // Last, every side is read against the line (after the unforced tests, which keep
  // seeing each side's own best fit, so that two-layer lines read as before).
  const joint = withoutTransitions(choices);
  const crossoverM = lineCrossoverDistanceM(joint);
  joint.forEach((pair, s) => pair.forEach((c, k) => (choices[s][k] = c && withDirectNearShot(c, sides[s][k].picks, v1Provisional, crossoverM, noiseFloorMs))));
  if (forcedLayers !== 2) {
    const relabelled = withFarOffEndSides(choices, (s, k) => sides[s][k].picks, false);
    relabelled.forEach((pair, s) => pair.forEach((c, k) => (choices[s][k] = c)));
    const crossed = withLineCrossover(choices, (s, k) => sides[s][k].picks, noiseFloorMs);
    crossed.forEach((pair, s) => pair.forEach((c, k) => (choices[s][k] = c)));
  }

  return survey.shots.map((shot, s) => {
    const branchOfPick: (BranchIndex | null)[] = survey.geophones.map(() => null);
    survey.geophones.forEach((g, i) => {
      const t = shot.times[i];
      if (t !== null && t !== undefined && Math.abs(g.x - shot.x) <= AT_SHOT_TOLERANCE_M) branchOfPick[i] = 0;
    });
    const [left, right] = sides[s].map((work, k) => {
      const choice = choices[s][k];
      if (!choice) return null;
      choice.branchOfSidePick.forEach((b, j) => (branchOfPick[work.picks[j].geophone] = b));
      const result: SideBranches = {
        side: work.side,
        direct: choice.direct,
        refracted: choice.refracted,
        crossoverDistance: crossoverDistanceM(choice.direct, choice.refracted[0]),
        overridden: choice.overridden,
        ...(suppressed.has(`${s}:${k}`) ? { deeperBranchUnreversed: true } : {}),
      };
      return result;
    });
    return {
      id: shot.id,
      x: shot.x,
      elevation: shotElevationM(shot, survey.geophones),
      position: shotPosition(shot.x, survey.geophones),
      left,
      right,
      branchOfPick,
    };
  });
}

/** Fewest geophones that branch-2 picks of both shooting directions must share. Our choice. */
export const MIN_REVERSED_GEOPHONES = 3;

/**
 * True when no side holds a second-refractor branch, or when branch-2 picks of sides
 * shooting toward +x and of sides shooting toward −x fall on at least
 * MIN_REVERSED_GEOPHONES common geophones: a reversed profile of the deeper refractor,
 * which the plus-minus method needs (Hagedoorn 1959) and without which its dip and
 * velocity cannot be told apart (Kearey, Brooks & Hill 2002, ch. 5).
 */
function secondRefractorReversed(
  choices: (SideChoice | null)[][],
  sides: { picks: { geophone: number }[] }[][],
): boolean {
  const seen: [Set<number>, Set<number>] = [new Set(), new Set()];
  choices.forEach((pair, s) =>
    pair.forEach((c, k) => c?.branchOfSidePick.forEach((b, j) => b === 2 && seen[k].add(sides[s][k].picks[j].geophone))),
  );
  if (seen[0].size === 0 && seen[1].size === 0) return true;
  let common = 0;
  for (const g of seen[0]) if (seen[1].has(g)) common++;
  return common >= MIN_REVERSED_GEOPHONES;
}

/**
 * A side with one refracted line and no direct wave (a far off-end shot) is branch 1 by
 * default; on a three-layer line its picks may come, wholly or mostly, from the second
 * refractor. When other sides show both refracted branches and its line's apparent
 * velocity is nearer (in ratio) to their median branch-2 velocity than to their median
 * branch-1 velocity, its picks are split at the median 1→2 break offset of those sides
 * (flat layers give every shot the same crossover offset: Kearey, Brooks & Hill 2002,
 * ch. 5): nearer picks branch 1, farther ones branch 2. Lines are refitted on each group;
 * with fewer than 2 picks on branch 1 the side lists no line, since `refracted` runs from
 * the first refractor down and cannot say that the first is absent.
 *
 * `forReversal`: the split is proposed only for the reversal test (secondRefractorReversed),
 * and only where the side's velocity also lies within SECOND_REFRACTOR_MIN_CONTRAST (in
 * ratio) of the median branch-2 velocity of the nearer sides shooting its own way and of
 * those shooting the other way. A refractor is one surface: a far shot's branch runs
 * parallel to the nearer shots' branch on it (the parallelism phantoming relies on,
 * Hagedoorn 1959), and, shot the other way, the same refractor gives the other branch 2.
 * The far shot then reverses the deeper refractor where the nearer shots of its own
 * direction do not reach. (Requiring its own direction's branch 2 keeps a two-layer line
 * whose one side bends at a lateral V1 change, golden reference-structure-step-velocity-09,
 * two-layer.) Returns a new array of choices; the input is not changed. O(sides + picks).
 */
function withFarOffEndSides(
  choices: (SideChoice | null)[][],
  picksOf: (s: number, k: number) => SidePick[],
  forReversal: boolean,
): (SideChoice | null)[][] {
  const first: number[] = [];
  const second: number[] = [];
  const secondByDirection: [number[], number[]] = [[], []];
  const breakOffsets: number[] = [];
  choices.forEach((pair) =>
    pair.forEach((c, k) => {
      if (c && !c.overridden && c.refracted.length >= 2) {
        first.push(apparentVelocity(c.refracted[0]));
        second.push(apparentVelocity(c.refracted[1]));
        secondByDirection[k].push(apparentVelocity(c.refracted[1]));
        if (c.breakPoint) breakOffsets.push(c.breakPoint.breakOffsetM);
      }
    }),
  );
  if (first.length === 0) return choices;
  const m1 = median(first);
  const m2 = median(second);
  const breakOffsetM = breakOffsets.length > 0 ? median(breakOffsets) : 0;
  const nearerSecond = (v: number): boolean => Math.abs(Math.log(v / m2)) < Math.abs(Math.log(v / m1));
  return choices.map((pair, s) =>
    pair.map((c, k) => {
      // A side read as two refracted branches that are both nearer the line's branch 2
      // than its branch 1 has seen the deeper refractor only, bent or offset (a step in it
      // kinks the branch): all its refracted picks are branch 2, its direct wave (if any)
      // stays. Forced three-layer reading prefers two refracted segments, so this is where
      // such a side would otherwise give the first refractor a rock velocity. A far
      // off-end shot has no direct wave; an end shot over a rock step does (its few
      // middle-layer picks, too few for a line, go with the rock).
      if (!forReversal && c && !c.overridden && c.refracted.length === 2 && c.refracted.every((l) => nearerSecond(apparentVelocity(l)))) {
        const { breakPoint: _notABreak, ...rest } = c;
        return { ...rest, branchOfSidePick: c.branchOfSidePick.map((b): BranchIndex => (b === 0 ? 0 : 2)), refracted: [] };
      }
      if (!c || c.overridden || c.direct || c.refracted.length !== 1 || !c.branchOfSidePick.every((b) => b === 1)) return c;
      const v = apparentVelocity(c.refracted[0]);
      if (!(Math.abs(Math.log(v / m2)) < Math.abs(Math.log(v / m1)))) return c;
      if (forReversal && !secondByDirection.every((vs) => vs.length > 0 && Math.abs(Math.log(v / median(vs))) < Math.log(SECOND_REFRACTOR_MIN_CONTRAST))) return c;
      const picks = picksOf(s, k);
      const near = lineOf(picks.filter((p) => p.offsetM < breakOffsetM));
      const far = lineOf(picks.filter((p) => p.offsetM >= breakOffsetM));
      return {
        ...c,
        branchOfSidePick: picks.map((p) => (p.offsetM < breakOffsetM ? 1 : 2)),
        refracted: near && far ? [near, far] : [],
      };
    }),
  );
}

/**
 * A pick on the direct-wave line within this many pick uncertainties is a direct arrival
 * (withDirectNearShot). Our choice: a 3σ band of the picks.
 */
export const DIRECT_MATCH_SIGMAS = 3;

/**
 * A side read with no direct wave whose picks nearest the shot lie on the line's direct
 * wave, t = offset/V1 (no more than DIRECT_MATCH_SIGMAS·σ late, σ early), and arrive before its first refracted
 * line by more than 2σ: those picks are direct. The robust segmented fit trims up to a
 * fifth of a side's picks as outliers, so an end shot with only two or three direct picks
 * before the crossover (thin soil, 4 m crossover at 1.5 m spacing) could be read as
 * refracted from the shot with its direct picks "trimmed", which put them on branch 1 and
 * biased its delays (a 412/1937/4426 m/s line with 1.7 m of soil: RMS 1.0 ms on exact
 * picks). First arrivals nearest the shot are the direct wave wherever V1 predicts them
 * (Kearey, Brooks & Hill 2002, ch. 5). Only picks nearer the shot than the line's
 * crossover distance (the median of the sides that show both branches) are tried: near
 * the crossover the two waves arrive within the picks' scatter of each other, and a head
 * wave taken for direct there would pull V1 up. Picks are walked outward from the shot and
 * the run stops at the first that fails; the refracted line is refitted without them.
 * O(picks).
 */
function withDirectNearShot(c: SideChoice, picks: SidePick[], v1: number | null, crossoverM: number | null, sigmaMs: number): SideChoice {
  if (v1 === null || crossoverM === null || c.overridden || c.direct || c.refracted.length === 0 || c.branchOfSidePick.length !== picks.length) return c;
  const first = c.refracted[0];
  let run = 0;
  while (run < picks.length && c.branchOfSidePick[run] === 1 && picks[run].offsetM < crossoverM) {
    const p = picks[run];
    // Late by up to 3σ, early by at most σ: past the crossover the head wave arrives before
    // the direct wave would, so a pick well before offset/V1 is more likely a head wave.
    const lateMs = p.timeMs - (1000 * p.offsetM) / v1;
    const onDirect = lateMs <= DIRECT_MATCH_SIGMAS * sigmaMs && lateMs >= -sigmaMs;
    const beforeRefracted = p.timeMs < timeOnBranchMs(first, p.offsetM) - 2 * sigmaMs;
    if (!onDirect || !beforeRefracted) break;
    run++;
  }
  // A direct wave is a run with the line's V1 (within SECOND_REFRACTOR_MIN_CONTRAST): one
  // pick near the crossover, or two that run at a head wave's speed, stay refracted.
  const direct = run >= 2 ? lineOf(picks.slice(0, run)) : null;
  if (!direct || Math.abs(Math.log(apparentVelocity(direct) / v1)) > Math.log(SECOND_REFRACTOR_MIN_CONTRAST)) return c;
  const branchOfSidePick = c.branchOfSidePick.map((b, j): BranchIndex => (j < run ? 0 : b));
  const refitted = lineOf(picks.filter((_, j) => branchOfSidePick[j] === 1));
  if (!refitted) return c;
  return { ...c, branchOfSidePick, direct, refracted: [refitted, ...c.refracted.slice(1)] };
}

/**
 * The line's crossover distance from the direct wave to the first refractor: the median
 * over sides that show both (crossoverDistanceM); null when none does. O(sides log sides).
 */
function lineCrossoverDistanceM(choices: (SideChoice | null)[][]): number | null {
  const xs: number[] = [];
  for (const pair of choices) {
    for (const c of pair) {
      const x = c && !c.overridden ? crossoverDistanceM(c.direct, c.refracted[0]) : null;
      if (x !== null) xs.push(x);
    }
  }
  return xs.length > 0 ? median(xs) : null;
}

/**
 * χ² with one degree of freedom at the 99 % level (6.63; any χ² table, e.g. Abramowitz &
 * Stegun 1964, table 26.8): the misfit a side's own line must lose before its far picks
 * are read as the deeper refractor the rest of the line found (withLineCrossover).
 */
export const LINE_CROSSOVER_CHI2_99 = 6.635;
/** Fewest picks beyond the line's crossover offset for withLineCrossover to read them. */
export const LINE_CROSSOVER_MIN_FAR_PICKS = 3;

/**
 * A side read as one refracted line (branch 1) whose picks run past the crossover offset
 * at which the other sides shooting its way break onto the second refractor: with noisy
 * picks a side's own fit may miss a short branch 2 that the line as a whole has shown
 * (48 geophones at 1.5 m, 0.3 ms noise: the mid shot's last 7 picks, 9 m of branch 2,
 * BIC margin 4 against the 10 an unforced side needs on its own). Read jointly: flat
 * layers give every shot the same crossover offset, and the second refractor's branches
 * are parallel (Kearey, Brooks & Hill 2002, ch. 5; Hagedoorn 1959), so the far picks are
 * tried on a line with the line's branch-2 apparent velocity for that direction (median
 * of the sides that show it; only the intercept is fitted) and the near picks on a line
 * of their own. The split is kept when it lowers the misfit by more than
 * LINE_CROSSOVER_CHI2_99 (χ² on one extra parameter, σ the pick uncertainty) and the far
 * picks arrive on average before the near line's extrapolation (first arrivals are the
 * earliest branch; a late outlier cannot pass). Two-layer lines have no side with two
 * refracted branches and are returned as they are. Returns new choices. O(sides + picks).
 */
function withLineCrossover(
  choices: (SideChoice | null)[][],
  picksOf: (s: number, k: number) => SidePick[],
  sigmaMs: number,
): (SideChoice | null)[][] {
  const breaks: [number[], number[]] = [[], []];
  const slowness2: [number[], number[]] = [[], []];
  choices.forEach((pair) =>
    pair.forEach((c, k) => {
      if (!c || c.overridden || c.refracted.length < 2 || !c.breakPoint) return;
      breaks[k].push(c.breakPoint.breakOffsetM);
      slowness2[k].push(1000 / apparentVelocity(c.refracted[1]));
    }),
  );
  return choices.map((pair, s) =>
    pair.map((c, k) => {
      if (!c || c.overridden || c.refracted.length !== 1 || breaks[k].length === 0) return c;
      if (!c.branchOfSidePick.some((b) => b === 1) || c.branchOfSidePick.some((b) => b === 2)) return c;
      const picks = picksOf(s, k);
      const breakOffsetM = median(breaks[k]);
      const p2 = median(slowness2[k]);
      const refracted = picks.filter((_, j) => c.branchOfSidePick[j] === 1);
      const near = refracted.filter((p) => p.offsetM < breakOffsetM);
      const far = refracted.filter((p) => p.offsetM >= breakOffsetM);
      if (far.length < LINE_CROSSOVER_MIN_FAR_PICKS || near.length < 2) return c;
      const points = (g: SidePick[]) => g.map((p) => ({ offsetM: p.offsetM, timeMs: p.timeMs }));
      const all = fitLine(points(refracted), refracted.map((_, j) => j));
      const nearLine = fitLine(points(near), near.map((_, j) => j));
      if (!all || !nearLine || !(nearLine.slownessMsPerM > p2)) return c;
      // Far line with the line's branch-2 slowness: least-squares intercept is the mean of t − p2·x.
      const a2 = far.reduce((sum, p) => sum + p.timeMs - p2 * p.offsetM, 0) / far.length;
      const sseFar = far.reduce((sum, p) => sum + (p.timeMs - a2 - p2 * p.offsetM) ** 2, 0);
      const sseSplit = nearLine.rmsMs ** 2 * near.length + sseFar;
      const sseOne = all.rmsMs ** 2 * refracted.length;
      const earlier = far.reduce((sum, p) => sum + p.timeMs - (nearLine.interceptMs + nearLine.slownessMsPerM * p.offsetM), 0) < 0;
      if (!earlier || (sseOne - sseSplit) / (sigmaMs * sigmaMs) <= LINE_CROSSOVER_CHI2_99) return c;
      const nearBranch = lineOf(near);
      const farBranch = lineOf(far);
      if (!nearBranch || !farBranch) return c;
      const firstFar = far[0];
      const lastNear = near[near.length - 1];
      return {
        ...c,
        branchOfSidePick: c.branchOfSidePick.map((b, j): BranchIndex => (b === 1 && picks[j].offsetM >= breakOffsetM ? 2 : b)),
        refracted: [nearBranch, farBranch],
        breakPoint: { breakX: (lastNear.x + firstFar.x) / 2, breakOffsetM: (lastNear.offsetM + firstFar.offsetM) / 2 },
      };
    }),
  );
}

/**
 * Twice the pick uncertainty: a middle segment whose picks never arrive earlier than both
 * neighbouring lines by more than this brings no arrival of its own. Our choice (a 2σ
 * band of the picks).
 */
export const TRANSITION_UNDERCUT_SIGMAS = 2;

/**
 * A side fitted with three segments may owe its middle one to the corner where two
 * branches meet (picks of both, an apparent velocity between theirs), not to a layer:
 * on the issue line the mid shot's 1020 m/s segment between the 400 m/s direct wave and
 * the 1600 m/s refractor. First arrivals are the earliest of the branch lines (Kearey,
 * Brooks & Hill 2002, ch. 5), so the middle segment is a layer only where it arrives
 * before both its neighbours' lines extrapolated; when no pick of it does so by more than
 * TRANSITION_UNDERCUT_SIGMAS·σ (σ the pick uncertainty), its picks go to whichever
 * neighbour line is earlier at their offset, the two lines are refitted and the branches
 * renumbered outward (the far neighbour takes the middle one's index). Cost O(picks).
 */
function withoutTransitionSegment(c: SideChoice, picks: SidePick[], sigmaMs: number): SideChoice {
  const direct = c.direct;
  if (c.overridden || !direct || c.refracted.length !== 2 || c.branchOfSidePick.length !== picks.length) return c;
  const far = c.refracted[1];
  const earlier = (p: SidePick): 0 | 1 => (timeOnBranchMs(direct, p.offsetM) <= timeOnBranchMs(far, p.offsetM) ? 0 : 1);
  let undercutMs = Number.NEGATIVE_INFINITY;
  picks.forEach((p, j) => {
    if (c.branchOfSidePick[j] !== 1) return;
    undercutMs = Math.max(undercutMs, Math.min(timeOnBranchMs(direct, p.offsetM), timeOnBranchMs(far, p.offsetM)) - p.timeMs);
  });
  if (!(undercutMs <= TRANSITION_UNDERCUT_SIGMAS * sigmaMs)) return c;
  const branchOfSidePick = picks.map((p, j): BranchIndex => {
    const b = c.branchOfSidePick[j];
    return b === 0 ? 0 : b === 2 ? 1 : earlier(p);
  });
  const directLine = lineOf(picks.filter((_, j) => branchOfSidePick[j] === 0));
  const refractedLine = lineOf(picks.filter((_, j) => branchOfSidePick[j] === 1));
  if (!directLine || !refractedLine) return c;
  return { branchOfSidePick, direct: directLine, refracted: [refractedLine], overridden: false };
}

/**
 * True when the second-refractor breaks of sides shooting the same way line up in x
 * rather than in offset: over the pairs of shots at least
 * CONSISTENCY_MIN_SHOT_SEPARATION_SPACINGS spacings apart, more pairs have
 * |Δ break x| < |Δ break offset| than not. Under flat layers the crossover offset of a
 * refractor is the same from every shot (Kearey, Brooks & Hill 2002, ch. 5), so the break
 * moves with the shot; a break that stays put is a feature of the ground at that x.
 */
export function breaksFixedInX(breaks: BreakPoint[], spacingM: number): boolean {
  let fixedInX = 0;
  let fixedInOffset = 0;
  for (let a = 0; a < breaks.length; a++) {
    for (let b = a + 1; b < breaks.length; b++) {
      const p = breaks[a];
      const q = breaks[b];
      if (Math.abs(p.shotX - q.shotX) < CONSISTENCY_MIN_SHOT_SEPARATION_SPACINGS * spacingM) continue;
      if (Math.abs(p.breakX - q.breakX) < Math.abs(p.breakOffsetM - q.breakOffsetM)) fixedInX++;
      else fixedInOffset++;
    }
  }
  return fixedInX > fixedInOffset;
}

function findOverride(overrides: BranchOverride[], shotId: string, side: Side): BranchOverride | undefined {
  // The last override for a side wins, as a later edit would.
  return overrides.filter((o) => o.shot === shotId && o.side === side).pop();
}

function segmentVelocity(seg: SegmentLine): number {
  return 1000 / seg.slownessMsPerM;
}

function bestByBic(fits: SegmentedFit[]): SegmentedFit | undefined {
  return fits.reduce<SegmentedFit | undefined>((best, f) => (!best || f.bic < best.bic ? f : best), undefined);
}

/**
 * Provisional V1, m/s: median first-segment velocity of sides whose best fit has at least
 * two segments and whose first segment starts well below the second (|a0| < a1/2), so that
 * an off-end side showing two refracted branches does not count. Overridden sides add
 * their direct line.
 */
function provisionalV1(sides: { picks: SidePick[]; override?: BranchOverride; fits: SegmentedFit[] }[]): number | null {
  const velocities: number[] = [];
  for (const work of sides) {
    if (work.override) {
      const k = Math.min(Math.max(0, Math.floor(work.override.directPicks)), work.picks.length);
      const line = lineOf(work.picks.slice(0, k));
      if (line) velocities.push(apparentVelocity(line));
      continue;
    }
    const best = bestByBic(work.fits);
    if (!best || best.segments.length < 2) continue;
    const [a, b] = best.segments;
    if (Math.abs(a.interceptMs) < b.interceptMs / 2) velocities.push(segmentVelocity(a));
  }
  return velocities.length ? median(velocities) : null;
}

function firstSegmentIsDirect(fit: SegmentedFit, v1: number | null): boolean {
  const first = fit.segments[0];
  if (v1 !== null) return segmentVelocity(first) <= DIRECT_VELOCITY_FACTOR * v1;
  if (fit.segments.length >= 2) return true;
  return first.interceptMs <= DIRECT_INTERCEPT_LIMIT_MS + 3 * first.rmsMs;
}

function reachesSecondRefractor(c: Candidate): boolean {
  return c.firstBranch + c.fit.segments.length >= 3;
}

/**
 * Every segment taken as refracted must itself be faster than DIRECT_VELOCITY_FACTOR·V1:
 * a "refracted" branch as slow as the direct wave is noise splitting the direct branch.
 */
function refractedAreFast(c: Candidate, v1: number | null): boolean {
  if (v1 === null) return true;
  return c.fit.segments.every((seg, j) => c.firstBranch + j === 0 || segmentVelocity(seg) > DIRECT_VELOCITY_FACTOR * v1);
}

/**
 * Unforced, the branch-2 segment must be SECOND_REFRACTOR_MIN_CONTRAST times faster than
 * the branch-1 segment before it.
 */
function clearContrast(c: Candidate): boolean {
  const j2 = 2 - c.firstBranch;
  const j1 = j2 - 1;
  if (j1 < 0 || j2 >= c.fit.segments.length) return true;
  return c.fit.segments[j1].slownessMsPerM / c.fit.segments[j2].slownessMsPerM >= SECOND_REFRACTOR_MIN_CONTRAST;
}

function chooseSide(
  picks: SidePick[],
  fits: SegmentedFit[],
  v1: number | null,
  forcedLayers: 2 | 3 | undefined,
  allowSecond: boolean,
): SideChoice {
  const maxLayers = allowSecond ? (forcedLayers ?? 3) : 2;
  const candidates: Candidate[] = fits
    .map((fit) => ({ fit, firstBranch: (firstSegmentIsDirect(fit, v1) ? 0 : 1) as 0 | 1 }))
    .filter((c) => c.firstBranch + c.fit.segments.length <= maxLayers && refractedAreFast(c, v1))
    .filter((c) => forcedLayers !== undefined || !reachesSecondRefractor(c) || clearContrast(c));
  let pool = candidates;
  if (forcedLayers === 3) {
    const reaching = candidates.filter((c) => c.firstBranch + c.fit.segments.length === 3);
    if (reaching.length) pool = reaching;
  }
  const lowest = (cs: Candidate[]): Candidate | undefined =>
    cs.reduce<Candidate | undefined>((best, c) => (!best || c.fit.bic < best.fit.bic ? c : best), undefined);
  let chosen = lowest(pool);
  if (forcedLayers === undefined && chosen && reachesSecondRefractor(chosen)) {
    // Found, not forced: a second refractor must win by "very strong" evidence.
    const without = lowest(pool.filter((c) => !reachesSecondRefractor(c)));
    if (without && without.fit.bic - chosen.fit.bic < THIRD_LAYER_BIC_MARGIN) chosen = without;
  }
  if (!chosen) return unfittedSide(picks, v1);

  const branchOfSidePick: BranchIndex[] = picks.map(() => 0);
  let breakPoint: Omit<BreakPoint, 'shotX'> | undefined;
  const lines = chosen.fit.segments.map((seg, j) => {
    for (let i = seg.start; i < seg.end; i++) branchOfSidePick[i] = (chosen.firstBranch + j) as BranchIndex;
    if (chosen.firstBranch + j === 2 && seg.start > 0) {
      // Halfway between the last branch-1 pick and the first branch-2 pick.
      const before = picks[seg.start - 1];
      const after = picks[seg.start];
      breakPoint = { breakX: (before.x + after.x) / 2, breakOffsetM: (before.offsetM + after.offsetM) / 2 };
    }
    return branchLineFromSegment(seg, picks);
  });
  return {
    branchOfSidePick,
    direct: chosen.firstBranch === 0 ? lines[0] : null,
    refracted: chosen.firstBranch === 0 ? lines.slice(1) : lines,
    overridden: false,
    ...(breakPoint ? { breakPoint } : {}),
  };
}

/**
 * A side too short (or too irregular) for any line: each pick is direct unless its
 * average velocity offset/time exceeds DIRECT_VELOCITY_FACTOR·V1. No lines are drawn.
 */
function unfittedSide(picks: SidePick[], v1: number | null): SideChoice {
  const branchOfSidePick = picks.map((p): BranchIndex => {
    if (v1 === null || !(p.timeMs > 0)) return 0;
    return (1000 * p.offsetM) / p.timeMs > DIRECT_VELOCITY_FACTOR * v1 ? 1 : 0;
  });
  return { branchOfSidePick, direct: null, refracted: [], overridden: false };
}

/** Line through a group of picks (robust single-segment fit); null below 2 picks or for a non-positive slope. */
function lineOf(group: SidePick[]): BranchLine | null {
  if (group.length < 2) return null;
  const robust = robustSegmentedFit(group.map((p) => ({ offsetM: p.offsetM, timeMs: p.timeMs })), 1);
  return robust ? branchLineFromSegment(robust.segments[0], group) : null;
}

/**
 * The user's split, taken exactly: the first `directPicks` picks outward from the shot are
 * direct, the picks up to `firstRefractorPicks` (counted outward from the shot, so it
 * includes the direct ones; absent = all the rest) are on the first refractor, the rest
 * on the second. Counts are clamped to the picks present.
 */
function overriddenSide(picks: SidePick[], o: BranchOverride): SideChoice {
  const n = picks.length;
  const k = Math.min(Math.max(0, Math.floor(o.directPicks)), n);
  const f = o.firstRefractorPicks === undefined ? n : Math.min(Math.max(k, Math.floor(o.firstRefractorPicks)), n);
  const branchOfSidePick = picks.map((_, i): BranchIndex => (i < k ? 0 : i < f ? 1 : 2));
  const refracted: BranchLine[] = [];
  const first = lineOf(picks.slice(k, f));
  if (first) {
    refracted.push(first);
    const second = lineOf(picks.slice(f));
    if (second) refracted.push(second);
  }
  return { branchOfSidePick, direct: lineOf(picks.slice(0, k)), refracted, overridden: true };
}
