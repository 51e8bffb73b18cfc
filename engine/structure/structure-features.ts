/**
 * Structure under the line, for the plus-minus pipeline (engine/pipeline/interpret.ts): the glue
 * between the combined plus and minus times and the pure detectors of engine/structure/.
 *
 *  - steps: vertical jumps in the delay-time profile (findDelayTimeSteps) and in single
 *    shots' refracted branches (findBranchSteps), merged by combineStepEvidence;
 *  - lateral refractor velocity: hinges in the minus-time profile
 *    (findRefractorVelocityChanges) with T− masked around steps (a step puts a bump in T−);
 *  - local V2 per station from its segment, slowness-averaged next to a change;
 *  - refractor velocity per segment from the minus times of every pair (common slope,
 *    minus-time-velocity.ts), leaving out the zones next to changes and steps;
 *  - planar dip (χ² test) and local dips per segment.
 *
 * Physics and sources are in the detectors' own files (Hagedoorn 1959 for plus-minus;
 * Kearey, Brooks & Hill 2002 ch. 5 for delay times and steps). Units: x, z in m; times in
 * ms; velocities in m/s.
 */
import type { Step } from '../output/interpretation.js';
import type { NanNone } from '../shared/nan-none.js';
import {
  combineStepEvidence,
  findBranchSteps,
  findDelayTimeSteps,
  findRefractorVelocityChanges,
  localDips,
  planarDip,
  type BranchStep,
  type DelayTimeStep,
  type LocalDip,
  type PlanarDipFit,
} from './index.js';
import { minusTimeVelocity, type MinusTimeVelocityResult } from '../velocities/minus-time-velocity.js';
import { medianSpacing } from './steps.js';
import { zeros, type Doubles } from '../shared/zeros.js';

/** A refracted branch of one shot on one side of it (its own picks only, never phantomed). */
export interface RefractedBranch {
  shot: string;
  shotXM: number;
  /** Picks of the first-refractor branch on one side of the shot, ms; null elsewhere. */
  timesMs: (number | null)[];
}

export interface StepSearchInput {
  xM: number[];
  /** Combined delay time (T+/2) at each geophone, ms. */
  delayTimeMs: (number | null)[];
  /** Normal depth at each geophone from the current V1, V2, m. */
  normalDepthM: (number | null)[];
  /** Ground elevation at each geophone, m. */
  groundElevationM: number[];
  /** Line velocities the delay times are referred to, m/s (V2 > V1). */
  referenceV1MPerS: number;
  referenceV2MPerS: number;
  pickSigmaMs: number;
  branches: RefractedBranch[];
}

export interface FoundStep extends Step {
  /** Width of the transition in the delay-time profile, m (0 for a step seen in branches only). */
  rampWidthM: number;
  /** Where each shot's branch showed it, with the jump in that branch (ms, +x side minus −x side). */
  branchJumps: { shot: string; xSeen: number; jumpMs: number }[];
}

/**
 * Delay times referred to one datum and the line's reference velocities:
 *   δ_ref = (E_top − (e_G − z_G))·cos(ic_ref)/V1_ref,
 * e_G the ground elevation, z_G the normal depth, E_top the highest ground on the line.
 * The plain delay time δ = z·cos ic/V1 jumps where the ground does (a bank, a ditch) and
 * where V1 or V2 changes along the line, though the refractor does not; this form jumps
 * only where the refractor's elevation does. Over flat ground with one V1 and one V2 it
 * is the delay time itself.
 */
export function referredDelayTimesMs(
  input: Pick<StepSearchInput, 'normalDepthM' | 'referenceV1MPerS' | 'referenceV2MPerS' | 'delayTimeMs' | 'groundElevationM'>,
): (number | null)[] {
  const { referenceV1MPerS: v1, referenceV2MPerS: v2 } = input;
  const cosIc = Math.sqrt(1 - (v1 / v2) ** 2);
  const top = Math.max(...input.groundElevationM);
  return input.normalDepthM.map((z, i) =>
    z === null || input.delayTimeMs[i] === null ? null : (((top - (input.groundElevationM[i] - z)) * cosIc) / v1) * 1000,
  );
}

/**
 * Where a step lies, from the centre of its ramp in the delay-time profile.
 *
 * The ramp is lopsided. On the upthrown side it is only z_s·tan(ic) wide (the head wave
 * from the far shot climbs the step face in the fast rock and runs on along the upper
 * refractor). On the downthrown side, the wave from the near shot that reaches the upper
 * corner of the step goes straight from it to the geophone (a diffraction, time
 * √(u² + z_s²)/V1 for a geophone u past the step) and beats the head wave from the lower
 * refractor ((Δz + u)/V2 + z_d·cos(ic)/V1 after the corner) until u exceeds
 *   u* = [k·R + √(k²R² − (1 − k²)(z_s² − R²))]/(1 − k²),  k = sin ic = V1/V2,
 *   R = Δz·k + z_d·cos ic
 * (our derivation by Fermat's principle for a vertical step, Δz = z_d − z_s; head-wave
 * times from Kearey, Brooks & Hill 2002, ch. 5). The ramp runs from z_s·tan(ic) before the
 * step to u* past it, so the step lies (u* − z_s·tan ic)/2 from the ramp's centre, toward
 * the upthrown side. Returns the centre unchanged when the depths make no sense.
 */
export function stepFromRampCentreM(centreM: number, shallowDepthM: number, deepDepthM: number, v1: number, v2: number, downToPlusX: boolean): number {
  const k = v1 / v2;
  if (!(k > 0 && k < 1) || !(shallowDepthM >= 0) || !(deepDepthM > shallowDepthM)) return centreM;
  const cosIc = Math.sqrt(1 - k * k);
  const r = (deepDepthM - shallowDepthM) * k + deepDepthM * cosIc;
  const disc = k * k * r * r - (1 - k * k) * (shallowDepthM * shallowDepthM - r * r);
  if (!(disc >= 0)) return centreM;
  const uStar = (k * r + Math.sqrt(disc)) / (1 - k * k);
  const shift = (uStar - (shallowDepthM * k) / cosIc) / 2;
  if (!(shift > 0) || !Number.isFinite(shift)) return centreM;
  return downToPlusX ? centreM - shift : centreM + shift;
}

/** Median of the depths on one side of a ramp, beyond it, m; null with none. */
function sideDepthM(xM: number[], depthM: (number | null)[], from: number, to: number): number | null {
  const v = depthM.filter((d, i): d is number => d !== null && xM[i] >= from && xM[i] <= to).sort((a, b) => a - b);
  return v.length ? v[v.length >> 1] : null;
}

/**
 * Steps from the delay-time profile and from every refracted branch. Positions from the
 * delay-time profile (centred, both directions); branch detections confirm them (seenIn)
 * or, when at least two shots agree and the delay-time profile missed it, make a step.
 * A delay-time detection that no shot's branch confirms is dropped.
 */
export function findSteps(input: StepSearchInput): FoundStep[] {
  const { xM, referenceV1MPerS: v1, referenceV2MPerS: v2, pickSigmaMs } = input;
  if (!(v2 > v1) || xM.length < 6) return [];
  const referred = referredDelayTimesMs(input);
  // Remove the part of each geophone's delay that comes from lateral velocity changes, so a
  // branch only jumps where the refractor does: t − δ + δ_ref (zero change on a uniform line).
  const correction = input.delayTimeMs.map((d, i) => (d === null || referred[i] === null ? null : (referred[i] as number) - d));
  const needsCorrection = correction.some((c) => c !== null && Math.abs(c) > 1e-9);
  const branchSteps: BranchStep[] = [];
  for (const b of input.branches) {
    const times = b.timesMs.map((t, i) => {
      if (t === null || (xM[i] - b.shotXM) === 0) return null;
      if (!needsCorrection) return t;
      return correction[i] === null ? null : t + (correction[i] as number);
    });
    if (times.filter((t) => t !== null).length < 8) continue;
    branchSteps.push(
      ...findBranchSteps(xM, times, { pickSigmaMs, v1MPerS: v1, v2MPerS: v2, depthM: input.normalDepthM, shotXM: b.shotXM, shot: b.shot }),
    );
  }
  // Only a step some shot's branch shows is reported (below): with no branch detection the
  // delay-time scan cannot change the answer, and on most lines it is the dearer scan.
  if (branchSteps.length === 0) return [];
  const present = referred.filter((d) => d !== null).length;
  const spacing = medianSpacing(xM, 1);
  const delaySteps: DelayTimeStep[] = (
    present >= 6 ? findDelayTimeSteps(xM, referred, { pickSigmaMs, v1MPerS: v1, v2MPerS: v2, depthM: input.normalDepthM }) : []
  ).map((d) => {
    // Depths on each side, beyond the ramp (vertical below ground: the step is in them).
    const reach = d.rampWidthM / 2 + 8 * spacing;
    const left = sideDepthM(xM, input.normalDepthM, d.x - reach, d.x - d.rampWidthM / 2);
    const right = sideDepthM(xM, input.normalDepthM, d.x + d.rampWidthM / 2, d.x + reach);
    if (left === null || right === null) return d;
    const down = d.delayJumpMs > 0;
    return { ...d, x: stepFromRampCentreM(d.x, Math.min(left, right), Math.max(left, right), v1, v2, down) };
  });

  const deepest = Math.max(0, ...input.normalDepthM.filter((z): z is number => z !== null));
  const merged = combineStepEvidence(delaySteps, branchSteps, { matchDistanceM: Math.max(3 * spacing, deepest) });
  // A step moves every refracted arrival beyond it (common practice: a vertical jump in a
  // branch points to a step). A delay-time ramp that no branch confirms is a bend of the
  // refractor (two changes of dip close together can look like a smeared step), not a step.
  return merged.filter((s) => (s.seenIn ?? []).some((k) => k !== 'delay-time')).map((s) => {
    const fromDelay = delaySteps.find((d) => d.x === s.x);
    const near = branchSteps.filter((b) => b.shot !== undefined && s.seenIn?.includes(b.shot) && Math.abs(b.x - s.x) <= Math.max(3 * spacing, deepest));
    return {
      ...s,
      rampWidthM: fromDelay ? fromDelay.rampWidthM : 0,
      branchJumps: near.map((b) => ({ shot: b.shot as string, xSeen: b.xSeen, jumpMs: b.jumpMs })),
    };
  });
}

/**
 * The stretch around each step where T− is not a straight function of x: the forward and
 * reverse rays cross the step at different geophones, a bump about the ramp's width, widened
 * by z·tan(ic) on each side (the rays leave the refractor that far from the geophone).
 */
export function stepZones(steps: FoundStep[], xM: number[], normalDepthM: (number | null)[], v1: number, v2: number): { from: number; to: number }[] {
  const tanIc = Math.tan(Math.asin(Math.min(0.999, v1 / v2)));
  const spacing = medianSpacing(xM, 1);
  return steps.map((s) => {
    const z = Math.max(0, ...normalDepthM.filter((d, i): d is number => d !== null && Math.abs(xM[i] - s.x) <= 3 * spacing + 10));
    const half = Math.max(s.rampWidthM, 2 * z * tanIc, spacing) / 2 + z * tanIc + spacing;
    return { from: s.x - half, to: s.x + half };
  });
}

/** Change of local dip that marks a bend of the refractor, degrees. Our choice (see bendZones). */
export const BEND_DEGREES = 3;

/** Stations each side whose refractor elevations give the local dip on that side. */
const DIP_WINDOW_POINTS = 4;

/**
 * Bends of the refractor, where T− is not a straight function of x even over a uniform
 * refractor. T− = t_AG − t_BG assumes the refractor is planar between the points where the
 * forward and reverse head waves leave it, z·tan(ic) either side of G (Hagedoorn 1959);
 * across a bend the two legs climb through different dips and T− gains a jump-like
 * distortion of the order of z·Δ(sin θ)/V1 (0.5–1.5 ms at a 10° bend 8 m down, measured on
 * eikonal lines). A bend is where the dip of a straight line through DIP_WINDOW_POINTS
 * refractor elevations on one side differs from the other side's by more than BEND_DEGREES
 * and by more than three standard errors (elevationSigmaM: one elevation's noise, m);
 * the zone is the bend ± (z·tan ic + one spacing).
 */
export function bendZones(
  xM: number[],
  refractorElevationM: (number | null)[],
  normalDepthM: (number | null)[],
  v1: number,
  v2: number,
  elevationSigmaM: number,
): { from: number; to: number }[] {
  const tanIc = Math.tan(Math.asin(Math.min(0.999, v1 / v2)));
  const spacing = medianSpacing(xM, 1);
  const idx = xM.map((_, i) => i).filter((i) => refractorElevationM[i] !== null);
  const slopeOf = (points: number[]): { b: number; sxx: number } | null => {
    if (points.length < 2) return null;
    const xs = points.map((i) => xM[i]);
    const es = points.map((i) => refractorElevationM[i] as number);
    const mx = xs.reduce((a, b) => a + b, 0) / xs.length;
    const me = es.reduce((a, b) => a + b, 0) / es.length;
    const sxx = xs.reduce((a, x) => a + (x - mx) ** 2, 0);
    if (!(sxx > 0)) return null;
    const b = xs.reduce((a, x, k) => a + (x - mx) * (es[k] - me), 0) / sxx;
    return { b, sxx };
  };
  const zones: { from: number; to: number }[] = [];
  for (let k = DIP_WINDOW_POINTS; k + DIP_WINDOW_POINTS <= idx.length; k++) {
    const left = slopeOf(idx.slice(k - DIP_WINDOW_POINTS, k + 1));
    const right = slopeOf(idx.slice(k, k + DIP_WINDOW_POINTS + 1));
    if (left === null || right === null) continue;
    // Noisy depths make noisy dips: the change must also exceed three standard errors.
    const noise = 3 * elevationSigmaM * Math.sqrt(1 / left.sxx + 1 / right.sxx);
    const change = Math.abs(Math.atan(left.b) - Math.atan(right.b));
    if (change <= Math.max((BEND_DEGREES * Math.PI) / 180, noise)) continue;
    const i = idx[k];
    const half = (normalDepthM[i] ?? 0) * tanIc + spacing;
    const last = zones[zones.length - 1];
    if (last && xM[i] - half <= last.to) last.to = Math.max(last.to, xM[i] + half);
    else zones.push({ from: xM[i] - half, to: xM[i] + half });
  }
  return zones;
}

/**
 * T− with the masked zones left out and the pieces between them joined: each piece after
 * the first is shifted so that the straight lines through the last points before the gap
 * and the first points after it meet at the gap's centre. Across a step or a bend T− may
 * jump as well as bend; the joined profile keeps only its change of slope (a velocity
 * change inside a masked zone then shows as a hinge at the zone's centre).
 */
export function joinMaskedMinusTimes(xM: number[], minusTimeMs: (number | null)[], masked: { from: number; to: number }[]): (number | null)[] {
  const inMask = (x: number): boolean => masked.some((z) => x >= z.from && x <= z.to);
  const kept = minusTimeMs.map((t, i) => (t !== null && !inMask(xM[i]) ? t : null));
  // Pieces: runs of kept values not separated by a masked zone.
  const pieces: number[][] = [];
  let current: number[] = [];
  xM.forEach((x, i) => {
    if (inMask(x)) {
      if (current.length) pieces.push(current);
      current = [];
      return;
    }
    if (kept[i] !== null) current.push(i);
  });
  if (current.length) pieces.push(current);
  const endLine = (piece: number[], atStart: boolean): { at: (x: number) => number } | null => {
    const pts = (atStart ? piece.slice(0, 6) : piece.slice(-6)).map((i) => [xM[i], kept[i] as number]);
    if (pts.length < 2) return null;
    const mx = pts.reduce((a, p) => a + p[0], 0) / pts.length;
    const mt = pts.reduce((a, p) => a + p[1], 0) / pts.length;
    const sxx = pts.reduce((a, p) => a + (p[0] - mx) ** 2, 0);
    const b = sxx > 0 ? pts.reduce((a, p) => a + (p[0] - mx) * (p[1] - mt), 0) / sxx : 0;
    return { at: (x: number) => mt + b * (x - mx) };
  };
  // In order: each piece is compared with the previous one as already shifted.
  for (let k = 1; k < pieces.length; k++) {
    const before = endLine(pieces[k - 1], false);
    const after = endLine(pieces[k], true);
    if (!before || !after) continue;
    const centre = (xM[pieces[k - 1][pieces[k - 1].length - 1]] + xM[pieces[k][0]]) / 2;
    const shift = after.at(centre) - before.at(centre);
    for (const i of pieces[k]) kept[i] = (kept[i] as number) - shift;
  }
  return kept;
}

export interface RefractorVelocitySegment {
  from: number;
  to: number;
  velocity: number;
  standardError: number;
}

export interface LateralVelocityResult {
  segments: RefractorVelocitySegment[];
  changes: { x: number; left: number; right: number }[];
  noiseSigmaMs: number;
}

/**
 * Lateral changes of V2 from the combined minus-time profile with the step zones masked.
 * pickSigmaMs is the noise of one combined T− value over √2 (the detector multiplies by √2
 * and raises it to the robust estimate when the data are noisier).
 */
export function lateralRefractorVelocity(
  xM: number[],
  minusTimeMs: (number | null)[],
  masked: { from: number; to: number }[],
  pickSigmaMs: number,
): LateralVelocityResult {
  const kept = joinMaskedMinusTimes(xM, minusTimeMs, masked);
  if (kept.filter((t) => t !== null).length < 4) return { segments: [], changes: [], noiseSigmaMs: pickSigmaMs };
  const vc = findRefractorVelocityChanges(xM, kept, { pickSigmaMs });
  return {
    segments: vc.segments.map(({ from, to, velocity, standardError }) => ({ from, to, velocity, standardError })),
    changes: vc.changes.map(({ x, left, right }) => ({ x, left, right })),
    noiseSigmaMs: vc.noiseSigmaMs,
  };
}

/**
 * V2 of one segment from the minus times of every pair (common slope, one constant per
 * pair), against the abscissa given (x, or distance along the refractor), using only the
 * geophones flagged in `use`.
 */
export function segmentMinusVelocity(
  pairMinusTimesMs: readonly NanNone[],
  abscissaM: (number | null)[],
  use: boolean[],
): MinusTimeVelocityResult {
  // The used points of every pair, counted and then copied into arrays of doubles sized
  // by shared/zeros.ts (boxed number arrays, K of them per segment and pass, were garbage
  // the collector copied). O(K·N).
  const series: { xM: Doubles; minusTimeMs: Doubles }[] = [];
  for (const t of pairMinusTimesMs) {
    let count = 0;
    for (let i = 0; i < t.length; i++) if (use[i] && t[i] === t[i] && abscissaM[i] !== null) count++;
    const xM = zeros(count);
    const minusTimeMs = zeros(count);
    let at = 0;
    for (let i = 0; i < t.length; i++) {
      const ti = t[i];
      const xi = abscissaM[i];
      if (use[i] && ti === ti && xi !== null) { // ti NaN: none (shared/nan-none.ts)
        xM[at] = xi;
        minusTimeMs[at] = ti;
        at++;
      }
    }
    series.push({ xM, minusTimeMs });
  }
  return minusTimeVelocity(series);
}

/**
 * Refractor velocity under each station: its segment's velocity; within z·tan(ic) of a
 * change (the head waves of that station sample both sides) the slowness average
 * 2/(1/V_left + 1/V_right), which is what the delay time there integrates.
 */
export function localRefractorVelocities(
  xM: number[],
  segments: RefractorVelocitySegment[],
  normalDepthM: (number | null)[],
  v1MPerS: (number | null)[],
): (number | null)[] {
  if (segments.length === 0) return xM.map(() => null);
  return xM.map((x, i) => {
    const k = segmentIndexAt(segments, x);
    const v = segments[k].velocity;
    const z = normalDepthM[i];
    const v1 = v1MPerS[i];
    if (z === null || v1 === null) return v;
    for (const j of [k - 1, k + 1]) {
      if (j < 0 || j >= segments.length) continue;
      const boundary = j < k ? segments[k].from : segments[k].to;
      const other = segments[j].velocity;
      const reach = z * Math.tan(Math.asin(Math.min(0.999, v1 / Math.min(v, other))));
      if (Math.abs(x - boundary) <= reach) return 2 / (1 / v + 1 / other);
    }
    return v;
  });
}

/** Index of the segment holding x (the nearest one outside them all). */
export function segmentIndexAt(segments: { from: number; to: number }[], x: number): number {
  for (let k = 0; k < segments.length; k++) if (x < segments[k].to || k === segments.length - 1) return x < segments[k].from && k > 0 ? k - 1 : k;
  return segments.length - 1;
}

export interface DipResult {
  /** The plane through every refractor elevation, when it fits within the noise. */
  planar: PlanarDipFit | null;
  /** One fitted line per piece of refractor between steps and velocity changes. */
  local: LocalDip[];
}

/**
 * Planar dip when one plane fits the refractor elevations within their noise (χ² test,
 * structure/planar-dip.ts), and local dips per piece between steps and velocity changes.
 */
export function refractorDips(
  xM: number[],
  refractorElevationM: (number | null)[],
  sigmaM: number,
  breaksM: number[],
): DipResult {
  const present = refractorElevationM.filter((e) => e !== null).length;
  if (present < 2 || !(sigmaM > 0)) return { planar: null, local: [] };
  const fit = planarDip(xM, refractorElevationM, sigmaM);
  const covered = xM.filter((_, i) => refractorElevationM[i] !== null);
  const edges = [covered[0], ...breaksM.filter((b) => b > covered[0] && b < covered[covered.length - 1]).sort((a, b) => a - b), covered[covered.length - 1]];
  const pieces: { from: number; to: number }[] = [];
  for (let k = 0; k + 1 < edges.length; k++) pieces.push({ from: edges[k], to: edges[k + 1] });
  const local = localDips(xM, refractorElevationM, pieces, sigmaM).filter((d): d is LocalDip => d !== null);
  return { planar: fit && fit.fits ? fit : null, local };
}

/** Overlapping zones merged, in x order. */
export function mergeZones(zones: { from: number; to: number }[]): { from: number; to: number }[] {
  const out: { from: number; to: number }[] = [];
  for (const z of [...zones].sort((a, b) => a.from - b.from)) {
    const last = out[out.length - 1];
    if (last && z.from <= last.to) last.to = Math.max(last.to, z.to);
    else out.push({ ...z });
  }
  return out;
}

