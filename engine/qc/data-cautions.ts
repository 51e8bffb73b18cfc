/**
 * Cautions read from the data of one interpreted line: what its first arrivals cannot
 * show or do not show well enough. Each is a warning with a code and a sentence; none
 * throws, none gives NaN. General references for all of them: ASTM D5777 (Standard Guide
 * for Using the Seismic Refraction Method for Subsurface Investigation) and USACE
 * EM 1110-1-1802 (Geophysical Exploration for Engineering and Environmental
 * Investigations), which list hidden layers, velocity inversions and thin coverage among
 * the limits of the method.
 *
 *  - hidden-layer: a layer too thin to appear as first arrivals (blind zone) could lie
 *    above the first refractor; the thickness that could hide on this spread comes from
 *    engine/structure/hidden-layer.ts (Soske 1959; Kearey, Brooks & Hill 2002, ch. 5).
 *  - velocity-inversion: a layer velocity not above the one over it, or a shot side whose
 *    later branch is slower than the branch before it (possible only through a manual
 *    branch override): a slower layer gives no head wave, so it is unseen.
 *  - few-refracted-picks-side: a shot side with refracted arrivals on a branch, but fewer
 *    than MIN_PICKS_PER_BRANCH of them; few-refracted-picks: too few refracted picks on the
 *    whole line for a plus-minus interpretation.
 *  - deeper-refractor-unreversed: branch assignment saw a faster, deeper branch from one
 *    direction only and kept its picks on the first refractor.
 *  - v2-not-above-v1: velocities/line-refractor-velocity.ts already says it when the minus times give V2 ≤ V1; here
 *    only a station whose own refractor velocity is not above its own V1 adds it, and only
 *    when the line has no such warning yet.
 * A warning whose code interpret (or another step) has already given for the same place is
 * not repeated.
 */
import type { Survey } from '../survey/survey.js';
import type { Interpretation, ShotAnalysis, Warning } from '../output/interpretation.js';
import { median } from 'simple-statistics';
import { hiddenLayerAllowances, hiddenLayerWarningFor, velocityInversion } from '../structure/hidden-layer.js';
import { roundM } from '../output/output-decimals.js';
import { isFiniteNumber as isNum } from '../shared/numbers.js';
import { positionText, velocityWords } from './wording.js';

/** Fewest picks that show a straight branch (two fix a line, a third tests it). Common practice. */
export const MIN_PICKS_PER_BRANCH = 3;

/**
 * Fewest refracted picks on the whole line: an opposing pair with MIN_PICKS_PER_BRANCH
 * picks each way. Fewer give neither T+ nor a V2 worth the name. Common practice.
 */
export const MIN_REFRACTED_PICKS_LINE = 2 * MIN_PICKS_PER_BRANCH;

/** Picks of a shot on one side, by branch. */
function sideBranchCounts(survey: Survey, shot: ShotAnalysis, side: 'left' | 'right'): [number, number, number] {
  const counts: [number, number, number] = [0, 0, 0];
  survey.geophones.forEach((g, i) => {
    const onSide = side === 'right' ? g.x > shot.x : g.x < shot.x;
    const b = shot.branchOfPick[i];
    if (onSide && b !== null && b !== undefined) counts[b]++;
  });
  return counts;
}

/** Offsets of the picks on each shot side, m, one array per side that has any (the spreads a hidden layer must hide on). O(S·G). */
function shotSideSpreads(survey: Survey): number[][] {
  const spreads: number[][] = [];
  for (const shot of survey.shots) {
    const left: number[] = [];
    const right: number[] = [];
    survey.geophones.forEach((g, i) => {
      if (!isNum(shot.times[i])) return;
      const offset = g.x - shot.x;
      if (offset > 0) right.push(offset);
      else if (offset < 0) left.push(-offset);
    });
    for (const side of [left, right]) if (side.length > 0) spreads.push(side);
  }
  return spreads;
}

/** Depths at which the hidden-layer allowance is computed across a section, to be interpolated between. Our choice. */
const ALLOWANCE_SAMPLES = 9;

/** The hidden-layer caution and, per station, the deepest the first refractor could lie under it. */
interface HiddenLayerFinding {
  warning: Warning;
  /** Depth + the extra depth a hidden layer allows, per station (null where no depth), m. */
  deepestM: (number | null)[];
}

/**
 * Hidden layer above the first refractor, from the interpreted V1, V2 and depths. The
 * layer must stay hidden on every shot side of the line (hiddenLayerAllowance), so an
 * off-end shot far from the spread does not widen the blind zone that the end shots'
 * near offsets close. The warning is worded at the median depth; the range under each
 * station is the allowance at ALLOWANCE_SAMPLES depths spanning the section, interpolated
 * linearly in depth (the allowance grows almost in proportion to depth: the crossover
 * distances do). Cost: O(S·G log G) to sort the spreads, O(B·S) for their limit table (B distinct
 * offsets), then O(ALLOWANCE_SAMPLES · 58 · log B).
 */
function hiddenLayerCaution(survey: Survey, interp: Interpretation): HiddenLayerFinding | null {
  const v1 = interp.layers[0]?.velocity;
  const v2 = interp.layers[1]?.velocity;
  const depths = interp.stations.map((s) => s.depth).filter((d): d is number => isNum(d) && d > 0);
  if (!isNum(v1) || !isNum(v2) || !(v2 > v1) || depths.length === 0) return null;
  const spreadsM = shotSideSpreads(survey);
  if (spreadsM.length === 0) return null;
  try {
    const input = { v1MPerS: v1, refractorVelocityMPerS: v2, depthM: median(depths), spreadsM };
    const lo = Math.min(...depths);
    const hi = Math.max(...depths);
    const samples = Array.from({ length: hi > lo ? ALLOWANCE_SAMPLES : 1 }, (_, k) => lo + ((hi - lo) * k) / Math.max(1, ALLOWANCE_SAMPLES - 1));
    // The median depth and the samples in one call: the spreads are checked and sorted once.
    const [atMedian, ...atSamples] = hiddenLayerAllowances(input, [input.depthM, ...samples]);
    if (atMedian === null) return null;
    const w = hiddenLayerWarningFor(input, atMedian);
    const extra = atSamples.map((a) => a?.extraDepthM ?? 0);
    const extraAt = (d: number): number => {
      if (samples.length === 1 || d <= lo) return extra[0];
      if (d >= hi) return extra[extra.length - 1];
      const t = ((d - lo) / (hi - lo)) * (samples.length - 1);
      const k = Math.min(samples.length - 2, Math.floor(t));
      return extra[k] + (extra[k + 1] - extra[k]) * (t - k);
    };
    return {
      warning: { ...w, message: `${w.message} The section shows that deeper limit as a dash-dot line. (Blind zone: such a layer would never arrive first at these offsets; ASTM D5777; USACE EM 1110-1-1802.)` },
      deepestM: interp.stations.map((s) => (isNum(s.depth) && s.depth > 0 ? roundM(s.depth + extraAt(s.depth)) : null)),
    };
  } catch {
    return null; // inputs outside the bound's domain: no caution can be worded
  }
}

/** Branch velocity inversions on single shot sides (each later branch must be faster). */
function sideInversions(interp: Interpretation): Warning[] {
  const warnings: Warning[] = [];
  for (const shot of interp.shots) {
    for (const side of [shot.left, shot.right]) {
      if (!side) continue;
      const lines = [...(side.direct ? [{ name: 'direct wave', v: side.direct.velocity }] : []), ...side.refracted.map((l, k) => ({ name: `refracted branch ${k + 1}`, v: l.velocity }))];
      for (let k = 1; k < lines.length; k++) {
        const v = lines[k].v;
        const before = lines[k - 1].v;
        if (isNum(v) && isNum(before) && !(v > before)) {
          warnings.push({
            code: 'velocity-inversion',
            message: `On the ${side.side} side of ${shot.id} the ${lines[k].name} (${velocityWords(v)}) is not faster than the ${lines[k - 1].name} before it (${velocityWords(before)}). First arrivals speed up with offset over layers that get faster with depth; a slower branch means a wrong branch split or a velocity inversion, which refraction first arrivals cannot resolve (ASTM D5777; USACE EM 1110-1-1802).`,
            x: shot.x,
          });
        }
      }
    }
  }
  return warnings;
}

function fewPickCautions(survey: Survey, interp: Interpretation): Warning[] {
  const warnings: Warning[] = [];
  let refractedTotal = 0;
  for (const shot of interp.shots) {
    for (const side of ['left', 'right'] as const) {
      const [, b1, b2] = sideBranchCounts(survey, shot, side);
      refractedTotal += b1 + b2;
      const short: string[] = [];
      if (b1 > 0 && b1 < MIN_PICKS_PER_BRANCH) short.push(`${b1} on the first refractor`);
      if (b2 > 0 && b2 < MIN_PICKS_PER_BRANCH) short.push(`${b2} on the second refractor`);
      if (short.length > 0) {
        warnings.push({
          code: 'few-refracted-picks-side',
          message: `The ${side} side of ${shot.id} has only ${short.join(' and ')} (fewer than ${MIN_PICKS_PER_BRANCH}, common practice for a straight branch): its branch velocity and intercept, and the reciprocal time read from it, are poorly fixed.`,
          x: shot.x,
        });
      }
    }
  }
  if (refractedTotal < MIN_REFRACTED_PICKS_LINE) {
    warnings.push({
      code: 'few-refracted-picks',
      message: `The whole line has ${refractedTotal} refracted pick(s), fewer than the ${MIN_REFRACTED_PICKS_LINE} an opposing pair of shots needs (${MIN_PICKS_PER_BRANCH} each way, common practice): refractor velocity and depths cannot be trusted, if given at all. Lengthen the spread or add off-end shots.`,
    });
  }
  return warnings;
}

/** A station whose refractor velocity is not above its own V1 (lateral velocities). */
function stationV2NotAboveV1(interp: Interpretation): Warning | null {
  const xs = interp.stations.filter((s) => isNum(s.v1) && isNum(s.refractorVelocity) && !((s.refractorVelocity as number) > (s.v1 as number))).map((s) => s.x);
  if (xs.length === 0) return null;
  return {
    code: 'v2-not-above-v1',
    message: `At x = ${xs.slice(0, 6).map(positionText).join(', ')}${xs.length > 6 ? ', …' : ''} m the refractor velocity is not above the top-layer velocity: no head wave could come from such a layer, so the depths there are not meaningful. Check the branch assignment.`,
    x: xs[0],
  };
}

/** A deeper refracted branch seen from one direction only, kept on the first refractor. */
function unreversedDeeperBranch(interp: Interpretation): Warning | null {
  const sides = interp.shots.flatMap((shot) =>
    [shot.left, shot.right].filter((side) => side?.deeperBranchUnreversed).map((side) => `${shot.id} (${side!.side})`),
  );
  if (sides.length === 0) return null;
  return {
    code: 'deeper-refractor-unreversed',
    message: `A bend toward a faster branch on ${sides.join(', ')} is not seen from the opposite direction over a common stretch of the line, so it was read as the first refractor bending (an undulating or laterally varying refractor) rather than as a deeper layer. If boreholes or the geology point to a deeper, faster layer, set the layer count to 3 and add longer off-end shots to reverse it.`,
  };
}

/** The cautions this line's data call for (not yet present in `interp`). */
export function dataCautions(survey: Survey, interp: Interpretation): Warning[] {
  return cautionsWith(survey, interp, hiddenLayerCaution(survey, interp));
}

/** dataCautions with the hidden-layer finding already made (it is the costly one). */
function cautionsWith(survey: Survey, interp: Interpretation, hidden: HiddenLayerFinding | null): Warning[] {
  const existing = interp.qc.warnings;
  const has = (code: string, x?: number): boolean => existing.some((w) => w.code === code && (x === undefined || w.x === x));
  const out: Warning[] = [];
  const add = (w: Warning | null, unlessCodeAnywhere = false): void => {
    if (!w) return;
    if (unlessCodeAnywhere ? has(w.code) : has(w.code, w.x)) return;
    if (out.some((o) => o.code === w.code && o.message === w.message)) return;
    out.push(w);
  };
  add(hidden?.warning ?? null, true);
  const velocities = interp.layers.map((l) => l.velocity).filter((v) => isNum(v) && v > 0);
  if (velocities.length === interp.layers.length) {
    for (const w of velocityInversion(velocities)) add({ ...w, message: `${w.message} (ASTM D5777; USACE EM 1110-1-1802.)` }, true);
  }
  for (const w of sideInversions(interp)) add(w);
  for (const w of fewPickCautions(survey, interp)) add(w, w.code === 'few-refracted-picks');
  add(stationV2NotAboveV1(interp), true);
  add(unreversedDeeperBranch(interp), true);
  return out;
}

/**
 * The interpretation with dataCautions appended to its warnings and, where the hidden-layer
 * caution is given, each station's hiddenLayerDepth (the deepest the first refractor could
 * lie under a layer hidden from first arrivals).
 */
export function withDataCautions(survey: Survey, interp: Interpretation): Interpretation {
  const finding = hiddenLayerCaution(survey, interp);
  const extra = cautionsWith(survey, interp, finding);
  if (extra.length === 0) return interp;
  const hidden = extra.some((w) => w.code === 'hidden-layer') ? finding : null;
  const stations = hidden ? interp.stations.map((s, i) => ({ ...s, hiddenLayerDepth: hidden.deepestM[i] })) : interp.stations;
  return { ...interp, stations, qc: { ...interp.qc, warnings: [...interp.qc.warnings, ...extra] } };
}
