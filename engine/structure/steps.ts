/**
 * Step faults in the refractor: detection in the delay-time profile and in single
 * refracted branches, and the merge of both into the interpretation's Step list.
 *
 * Physics (DESIGN.md; Kearey, Brooks & Hill 2002 ch. 5): the delay time of a geophone over
 * a refractor at depth z is δ = z·cos(ic)/V1, ic = asin(V1/V2), so a step of throw Δz
 * changes the delay time and every refracted arrival past it by
 *   Δt = Δz·cos(ic)/V1   ⇒   Δz = Δt·V1/cos(ic)      (Δt in s; ×1000 for ms).
 * Sign (api-v1.md): throw > 0 where the refractor is deeper on the +x side; a jump is
 * always measured as value on the +x side minus value on the −x side, so a deeper +x side
 * gives a positive jump in delay time and in either shot's branch. (Along its own
 * shooting direction the reverse shot sees that jump with the opposite sign.)
 *
 * Smearing: a plus-minus delay time at G combines the forward ray, which left the
 * refractor about z·tan(ic) behind G, and the reverse ray, which left it about z·tan(ic)
 * ahead, so a step shows in the delay-time profile as a ramp about 2·z·tan(ic) wide
 * centred on the step; a single shot's branch changes over about z·tan(ic) past the step
 * in its shooting direction (the head wave leaves the refractor toward the geophone at the
 * critical angle), so the jump is seen displaced by about z·tan(ic) (DESIGN.md).
 * The detectors therefore leave that zone out and compare straight lines fitted beyond it
 * on each side (jump-scan.ts: likelihood-ratio test of a level jump with common slope,
 * Bonferroni threshold over all candidate positions, slope-agreement and kink checks).
 *
 * Units: x, z in m; times in ms; velocities in m/s.
 */
import type { Step } from '../output/interpretation.js';
import { scanForJumps, type JumpScanOptions } from './jump-scan.js';
import { robustNoiseSigma } from './noise-level.js';
import { checkPositions, checkPositive, checkValues, presentPoints, StructureInputError } from './structure-input.js';

export interface StepDetectorOptions {
  /** Standard deviation of one first-break pick, ms. */
  pickSigmaMs: number;
  /** Top-layer velocity, m/s. */
  v1MPerS: number;
  /** Refractor velocity, m/s (> v1MPerS). */
  v2MPerS: number;
  /** Depth to the refractor under each position, m (null where unknown). */
  depthM?: (number | null)[];
  /** Points fitted on each side beyond the transition zone (default 8). */
  sidePoints?: number;
  /** Fewest points on each side (default 3). */
  minSidePoints?: number;
  /** False-alarm probability per profile (default 0.01). */
  falseAlarmProbability?: number;
}

export interface DelayTimeStep {
  /** Step position: centre of the ramp, m. */
  x: number;
  /** Δz, m, positive where deeper on +x. */
  throwM: number;
  /** Delay time on the +x side minus on the −x side, ms. */
  delayJumpMs: number;
  standardErrorMs: number;
  /** Likelihood-ratio statistic and the threshold it beat. */
  statistic: number;
  threshold: number;
  /** Width of the best-fitting ramp, m. */
  rampWidthM: number;
}

export interface BranchStep {
  /** Shot that saw the step, when the caller named it. */
  shot?: string;
  /** +1: the shot lies on the −x side and shoots toward +x; −1: the reverse. */
  direction: 1 | -1;
  /** Where the new parallel segment of the branch begins, as read off the time–distance plot, m. */
  xSeen: number;
  /** xSeen moved back by z·tan(ic) against the shooting direction (correctStepPosition), m. */
  x: number;
  /** Arrival time on the +x side minus on the −x side, ms. */
  jumpMs: number;
  standardErrorMs: number;
  throwM: number;
  /** Width and centre of the best-fitting ramp, m. */
  rampWidthM: number;
  centreM: number;
}

export interface BranchStepOptions extends StepDetectorOptions {
  /** Position of the shot, m; every pick given must lie on one side of it. */
  shotXM: number;
  shot?: string;
}

function criticalAngle(v1: number, v2: number, field: string): number {
  if (!(v2 > v1)) throw new StructureInputError(field, `refractor velocity ${v2} m/s must exceed the top-layer velocity ${v1} m/s`);
  return Math.asin(v1 / v2);
}

function checkOptions(opts: StepDetectorOptions, length: number): { ic: number; sidePoints: number; minSidePoints: number; alpha: number } {
  if (!opts || typeof opts !== 'object') throw new StructureInputError('opts', 'must be an object');
  checkPositive(opts.pickSigmaMs, 'opts.pickSigmaMs');
  checkPositive(opts.v1MPerS, 'opts.v1MPerS');
  checkPositive(opts.v2MPerS, 'opts.v2MPerS');
  const ic = criticalAngle(opts.v1MPerS, opts.v2MPerS, 'opts.v2MPerS');
  if (opts.depthM !== undefined) checkValues(opts.depthM, length, 'opts.depthM');
  const sidePoints = opts.sidePoints ?? 8;
  const minSidePoints = opts.minSidePoints ?? 3;
  if (!Number.isInteger(minSidePoints) || minSidePoints < 2) throw new StructureInputError('opts.minSidePoints', `must be an integer ≥ 2, got ${String(minSidePoints)}`);
  if (!Number.isInteger(sidePoints) || sidePoints < minSidePoints) throw new StructureInputError('opts.sidePoints', `must be an integer ≥ minSidePoints, got ${String(sidePoints)}`);
  const alpha = opts.falseAlarmProbability ?? 0.01;
  if (!(alpha > 0 && alpha < 1)) throw new StructureInputError('opts.falseAlarmProbability', `must lie in (0, 1), got ${String(alpha)}`);
  return { ic, sidePoints, minSidePoints, alpha };
}

/**
 * Largest depth known within `radius` of c, from a per-position depth list (positions
 * increasing, as checkPositions requires). xM[i] − c is monotone in i, so the positions with
 * |xM[i] − c| ≤ radius are one run, found by bisection with the same comparison: O(log n + w)
 * for w positions in the run (it was a scan of all n per call, O(n²) per profile since the
 * jump scan asks at every centre).
 */
export function localDepth(xM: readonly number[], depth: readonly (number | null)[], c: number, radius: number): number {
  let lo = 0;
  let hi = xM.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (xM[mid] - c >= -radius) hi = mid;
    else lo = mid + 1;
  }
  let best = 0;
  for (let i = lo; i < xM.length && xM[i] - c <= radius; i++) {
    const d = depth[i];
    if (d !== null && d > best) best = d;
  }
  return best;
}

/**
 * The spacing of sorted positions, m: the upper median of the gaps (a missing geophone's
 * double gap does not move it); `whenNone` for fewer than two positions. O(n log n).
 */
export function medianSpacing(x: readonly number[], whenNone = 0): number {
  const d = x.slice(1).map((v, i) => v - x[i]).sort((a, b) => a - b);
  return d.length ? d[d.length >> 1] : whenNone;
}

/** Throw Δz = Δt·V1/cos(ic), m, from a delay jump in ms. */
export function throwFromDelayJump(delayJumpMs: number, v1MPerS: number, v2MPerS: number): number {
  const ic = criticalAngle(v1MPerS, v2MPerS, 'v2MPerS');
  return (delayJumpMs / 1000) * v1MPerS / Math.cos(ic);
}

/**
 * The jump scan's options for a delay-time profile (present points x, y, ms) of a refractor
 * with critical angle ic under the layer above it: σ the delay's pick noise σ_pick/√2
 * (T+ = t_AG + t_BG − t_AB), raised to the profile's robust noise when that is larger; the
 * ramp width 2·z·tan(ic), z the deepest of depthM (at positions depthXM) within sidePoints
 * spacings (the deep side smears more), never narrower than one spacing. Shared by the
 * first refractor's steps (findDelayTimeSteps) and the rock's (depth/rock-steps.ts).
 */
export function delayTimeScanOptions(
  x: readonly number[],
  y: readonly number[],
  depthXM: readonly number[],
  depthM: readonly (number | null)[],
  ic: number,
  pickSigmaMs: number,
  sidePoints: number,
  minSidePoints: number,
): Omit<JumpScanOptions, 'falseAlarmProbability'> {
  const spacing = medianSpacing(x);
  const tanIc = Math.tan(ic);
  return {
    sigma: Math.max(pickSigmaMs / Math.SQRT2, robustNoiseSigma(x, y) ?? 0),
    rampWidthAt: (c) => Math.max(2 * localDepth(depthXM, depthM, c, sidePoints * spacing) * tanIc, spacing),
    sidePoints,
    minSidePoints,
  };
}

/**
 * Vertical jumps in the delay-time profile (delay time = T+/2, ms). The delay-time noise is
 * pickSigmaMs/√2 (T+ = t_AG + t_BG − t_AB; t_AB is common to all geophones and cannot
 * make a jump), raised to the robust data estimate when the profile is noisier.
 * Without depthM, depth is taken from the delay time itself, z = δ·V1/cos(ic).
 */
export function findDelayTimeSteps(xM: number[], delayTimeMs: (number | null)[], opts: StepDetectorOptions): DelayTimeStep[] {
  checkPositions(xM);
  checkValues(delayTimeMs, xM.length, 'delayTimeMs');
  const { ic, sidePoints, minSidePoints, alpha } = checkOptions(opts, xM.length);
  const { x, y } = presentPoints(xM, delayTimeMs);
  const depth = opts.depthM ?? delayTimeMs.map((d) => (d === null ? null : Math.max(0, (d / 1000) * opts.v1MPerS / Math.cos(ic))));
  const scan = delayTimeScanOptions(x, y, xM, depth, ic, opts.pickSigmaMs, sidePoints, minSidePoints);
  const found = scanForJumps(x, y, { ...scan, falseAlarmProbability: alpha });
  return found.map((f) => ({
    x: f.centreM,
    throwM: throwFromDelayJump(f.jump, opts.v1MPerS, opts.v2MPerS),
    delayJumpMs: f.jump,
    standardErrorMs: f.standardError,
    statistic: f.statistic,
    threshold: f.threshold,
    rampWidthM: f.rampWidthM,
  }));
}

/**
 * Position of a step seen in one shot's branch, moved back to the refractor:
 * x = xSeen − direction·z·tan(ic), direction +1 when the shot shoots toward +x.
 */
export function correctStepPosition(xSeen: number, depthM: number, v1MPerS: number, v2MPerS: number, direction: 1 | -1): number {
  if (!Number.isFinite(xSeen)) throw new StructureInputError('xSeen', `must be a finite number, got ${String(xSeen)}`);
  if (!(depthM >= 0) || !Number.isFinite(depthM)) throw new StructureInputError('depthM', `must be a finite depth ≥ 0, got ${String(depthM)}`);
  checkPositive(v1MPerS, 'v1MPerS');
  checkPositive(v2MPerS, 'v2MPerS');
  if (direction !== 1 && direction !== -1) throw new StructureInputError('direction', `must be 1 or -1, got ${String(direction)}`);
  const ic = criticalAngle(v1MPerS, v2MPerS, 'v2MPerS');
  return xSeen - direction * depthM * Math.tan(ic);
}

/**
 * Vertical jumps (offset, parallel segments) in one shot's refracted branch. Pass only the
 * picks of the refracted branch (null elsewhere). Without depthM the transition zone is
 * taken as one geophone spacing and the position is not corrected (x = xSeen).
 */
export function findBranchSteps(xM: number[], timesMs: (number | null)[], opts: BranchStepOptions): BranchStep[] {
  checkPositions(xM);
  checkValues(timesMs, xM.length, 'timesMs');
  const { ic, sidePoints, minSidePoints, alpha } = checkOptions(opts, xM.length);
  if (typeof opts.shotXM !== 'number' || !Number.isFinite(opts.shotXM)) throw new StructureInputError('opts.shotXM', `must be a finite position, got ${String(opts.shotXM)}`);
  const { x, y } = presentPoints(xM, timesMs);
  if (!x.length) return [];
  const sides = new Set(x.map((xi) => Math.sign(xi - opts.shotXM)));
  if (sides.size !== 1 || sides.has(0)) {
    throw new StructureInputError('timesMs', `picks must all lie on one side of the shot at ${opts.shotXM} m; pass each side of a shot separately`);
  }
  const direction = (x[0] > opts.shotXM ? 1 : -1) as 1 | -1;
  const sigma = Math.max(opts.pickSigmaMs, robustNoiseSigma(x, y) ?? 0);
  const spacing = medianSpacing(x);
  const tanIc = Math.tan(ic);
  const depthAt = (c: number): number | null => (opts.depthM ? localDepth(xM, opts.depthM, c, sidePoints * spacing) : null);
  const rampWidthAt = (c: number): number => {
    const z = depthAt(c);
    return z === null ? spacing : Math.max(z * tanIc, spacing);
  };
  const found = scanForJumps(x, y, { sigma, rampWidthAt, sidePoints, minSidePoints, falseAlarmProbability: alpha });
  return found.map((f) => {
    const z = depthAt(f.centreM);
    // The transition runs from the step to z·tan(ic) beyond it in the shooting direction;
    // the new parallel segment starts at its far end.
    const xSeen = z === null ? f.centreM : f.centreM + direction * 0.5 * z * tanIc;
    const xTrue = z === null ? xSeen : correctStepPosition(xSeen, z, opts.v1MPerS, opts.v2MPerS, direction);
    return {
      ...(opts.shot !== undefined ? { shot: opts.shot } : {}),
      direction,
      xSeen,
      x: xTrue,
      jumpMs: f.jump,
      standardErrorMs: f.standardError,
      throwM: throwFromDelayJump(f.jump, opts.v1MPerS, opts.v2MPerS),
      rampWidthM: f.rampWidthM,
      centreM: f.centreM,
    };
  });
}

export interface CombineStepOptions {
  /** Detections closer than this are the same step, m (e.g. 2 spacings + z·tan(ic)). */
  matchDistanceM: number;
  /** Shots needed to report a step that the delay-time profile did not show (default 2). */
  minShots?: number;
}

/**
 * Merges delay-time and branch detections into the interpretation's Step list.
 * A delay-time step is the primary evidence (it uses both directions and is centred on
 * the step): its x, throw and delay jump are kept and every branch detection of the same
 * sign within matchDistanceM (after position correction) is listed in seenIn. Branch
 * detections that match no delay-time step become a step only when at least minShots
 * shots agree in sign and position; x is then their mean corrected position and the throw
 * their inverse-variance weighted mean. seenIn holds 'delay-time' and shot ids.
 */
export function combineStepEvidence(delaySteps: DelayTimeStep[], branchSteps: BranchStep[], opts: CombineStepOptions): Step[] {
  if (!Array.isArray(delaySteps)) throw new StructureInputError('delaySteps', 'must be an array');
  if (!Array.isArray(branchSteps)) throw new StructureInputError('branchSteps', 'must be an array');
  checkPositive(opts?.matchDistanceM, 'opts.matchDistanceM');
  const minShots = opts.minShots ?? 2;
  const label = (b: BranchStep, i: number): string => b.shot ?? `branch ${i + 1}`;
  const used = new Set<number>();
  const steps: Step[] = [];
  for (const d of delaySteps) {
    const seenIn = ['delay-time'];
    branchSteps.forEach((b, i) => {
      if (used.has(i)) return;
      if (Math.sign(b.jumpMs) === Math.sign(d.delayJumpMs) && Math.abs(b.x - d.x) <= opts.matchDistanceM) {
        used.add(i);
        seenIn.push(label(b, i));
      }
    });
    steps.push({ x: d.x, throw: d.throwM, delayJumpMs: d.delayJumpMs, seenIn });
  }
  const rest = branchSteps.map((b, i) => ({ b, i })).filter(({ i }) => !used.has(i)).sort((p, q) => p.b.x - q.b.x);
  while (rest.length) {
    const seed = rest.shift()!;
    const group = [seed, ...rest.filter(({ b }) => Math.sign(b.jumpMs) === Math.sign(seed.b.jumpMs) && Math.abs(b.x - seed.b.x) <= opts.matchDistanceM)];
    for (const g of group.slice(1)) rest.splice(rest.indexOf(g), 1);
    const shots = new Set(group.map(({ b, i }) => label(b, i)));
    if (shots.size < minShots) continue;
    const w = group.map(({ b }) => 1 / Math.max(b.standardErrorMs, 1e-9) ** 2);
    const wSum = w.reduce((s, v) => s + v, 0);
    const throwM = group.reduce((s, { b }, k) => s + w[k] * b.throwM, 0) / wSum;
    const jumpMs = group.reduce((s, { b }, k) => s + w[k] * b.jumpMs, 0) / wSum;
    const x = group.reduce((s, { b }) => s + b.x, 0) / group.length;
    steps.push({ x, throw: throwM, delayJumpMs: jumpMs, seenIn: [...shots] });
  }
  return steps.sort((a, b) => a.x - b.x);
}
