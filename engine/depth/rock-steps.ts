/**
 * Steps in the second refractor (the rock) of a three-layer line, by a jump scan on the
 * middle layer's stripped delay with a threshold calibrated by a Monte Carlo test.
 *
 * Profile: the rock's own delay δ2'(G) = h2·cos θ23/V2 (sin θ23 = V2/V3; Kearey, Brooks &
 * Hill 2002, ch. 5), h2 the stripped thickness of the middle layer under each station
 * (second-refractor.ts). A rock step of Δh2 is a jump of Δh2·cos θ23/V2 in it, smeared by
 * plus-minus over about 2·h2·tan θ23; the jump scan of jump-scan.ts (V2, V3 in the place
 * of V1, V2) looks for it.
 *
 * Why not the scan's Bonferroni bound: that bound assumes independent errors from station
 * to station. The stripped delay's are not: a pair's reciprocal time and a phantom are
 * shared by runs of stations, and the first refractor's delay, subtracted at each station,
 * brings its own shared errors (measured: a false 4 m rock step on 1 of 10 noisy flat lines
 * with the bound). So the threshold comes from the line's own error process instead, by a
 * parametric bootstrap (Davison & Hinkley, Bootstrap Methods and their Application, 1997,
 * ch. 4, Monte Carlo tests; Dwass, Ann. Math. Statist. 28, 1957; Barnard, JRSS B 25,
 * 1963): each replicate adds seeded Gaussian noise at the pick uncertainty to every pick,
 * re-runs the delay computation and stripping with the branch assignment fixed
 * (mapSecondRefractor, stage 'thicknesses'), and takes the difference from the observed
 * profile, ε_r = δ2'(picks + noise) − δ2'(picks): to first order the profile's own error
 * (plus-minus and stripping are linear in the picks), with every shared reciprocal time,
 * phantom and first-refractor delay in it. The replicate's statistic is the scan's largest
 * (RSS_kink − RSS_step)/σ² over all centres and widths (maxJumpStatistic, σ by the same rule
 * as for the observed profile); a line added to a profile changes no window's statistic,
 * so ε_r stands for a step-free rock of any planar dip. A step is reported where the
 * observed statistic exceeds the ((R + 1)·(1 − α))-th smallest of R replicate maxima: a test
 * of exact level α for the line's largest statistic (the Monte Carlo test), and every
 * further detection above the same threshold is reported too.
 *
 * Sequential stopping (Besag & Clifford, Biometrika 78, 1991): once (R + 1)·α replicates
 * reach the observed maximum the test cannot reject, so the run stops there; on a line
 * without a step that is after a few replicates. Only a line whose test will reject runs
 * all R.
 *
 * Not modelled: errors of the branch assignment (replicates keep the observed one) and the
 * flat-layer approximation of stripping; noise is at options.pickUncertaintyMs (the picks'
 * stated uncertainty), so a line picked better than stated gets a conservative threshold.
 *
 * Cost: one stripping run (the two refractors' plus-minus, O(P·n) for P pairs over n
 * geophones) and one scan (O(n·F·log m) to screen, O(m) per trial fitted: on noise the
 * bound admits most trials) per replicate, at most R = 199. Measured for the full 199
 * (five shots): 0.29 s at 48, 0.29–0.42 s at 96, 0.44–0.53 s at 240 geophones, 0.95 s at
 * 240 with nine shots, against 9–41 ms for the interpretation itself; a line without a
 * step stops after 2–35 replicates (docs/developers/three-layer.md).
 * Deterministic: the noise seed is a hash of the line's geometry and picks.
 * Units: m, ms, m/s. Pure.
 */
import type { Survey } from '../survey/survey.js';
import type { ShotAnalysis } from '../output/interpretation.js';
import type { ResolvedOptions } from '../survey/options.js';
import { mapSecondRefractor, type SecondRefractorMap, type TwoLayerRecord } from './second-refractor.js';
import { maxJumpStatistic, scanForJumps } from '../structure/jump-scan.js';
import { delayTimeScanOptions, localDepth, medianSpacing, throwFromDelayJump, type DelayTimeStep } from '../structure/steps.js';
import { seededUniform, standardNormal } from '../forward/seeded-random.js';

/**
 * A step found in the rock: as a first-refractor delay-time step (centre of the ramp, throw =
 * change of the middle layer's thickness, positive where the rock is deeper on +x, jump of
 * the stripped delay h2·cos θ23/V2, the statistic and the Monte Carlo threshold it beat).
 */
export type RockStep = Omit<DelayTimeStep, 'rampWidthM'>;

/** What the test did, for the report and the docs' measurements. */
export interface RockStepTest {
  steps: RockStep[];
  /** The observed profile's largest statistic. */
  observedMax: number;
  /** Replicates run (fewer than R when the sequential test stopped early). */
  replicates: number;
  /** Threshold when all R replicates ran, else null (no step possible). */
  threshold: number | null;
  /** Monte Carlo p-value of observedMax (Besag & Clifford 1991: h/l when stopped early after l, else (h + 1)/(R + 1)). */
  pValue: number;
}

/** Replicates R and level α: (R + 1)·α = 2, so the threshold is the second-largest replicate maximum. */
export const ROCK_STEP_REPLICATES = 199;
export const ROCK_STEP_ALPHA = 0.01;
/** The fewest replicates that still make an exact test at α = 0.01: (R + 1)·α = 1, the threshold is the largest replicate maximum. */
export const ROCK_STEP_MIN_REPLICATES = 99;

/**
 * Work the test may do, in picks × replicates. Each replicate re-runs the stripping, which
 * costs about 2–6 µs per pick on the 2-core machine (measured: 2 ms per replicate at
 * 72 geophones × 5 shots, 60 ms at 480 × 24, where the full 199 took the interpretation to
 * 12.3 s, past the service's 10 s limit). 400,000 keeps the whole test within about 1–2 s,
 * room left for the layer choice's second candidate. Our choice.
 */
export const ROCK_STEP_WORK_BUDGET = 400_000;

/**
 * Replicates the test runs on a line of `picks` picks: ROCK_STEP_REPLICATES when the budget
 * allows, else ROCK_STEP_MIN_REPLICATES (less power, the same 1 % level), else 0: the line is
 * too large to test (interpret.ts then says so in a `rock-steps-not-sought` note). O(1).
 */
export function rockStepReplicates(picks: number): number {
  if (picks * ROCK_STEP_REPLICATES <= ROCK_STEP_WORK_BUDGET) return ROCK_STEP_REPLICATES;
  if (picks * ROCK_STEP_MIN_REPLICATES <= ROCK_STEP_WORK_BUDGET) return ROCK_STEP_MIN_REPLICATES;
  return 0;
}

/** Picks of the line (times given), the unit of the test's work. O(picks). */
export function pickCount(survey: Survey): number {
  let n = 0;
  for (const s of survey.shots) for (const t of s.times) if (t !== null) n++;
  return n;
}
/** Fewest stations with a rock thickness for a scan: two full sides of 8 points (steps.ts's default sidePoints). */
export const MIN_ROCK_STATIONS = 16;

const SIDE_POINTS = 8;
const MIN_SIDE_POINTS = 3;

/** 32-bit FNV-1a over the line's positions and picks (0.001 ms): the same line always draws the same noise. O(picks). */
function lineSeed(survey: Survey): number {
  let h = 0x811c9dc5;
  const mix = (v: number): void => {
    const k = Math.round(v * 1000) | 0;
    for (let b = 0; b < 4; b++) {
      h ^= (k >>> (8 * b)) & 0xff;
      h = Math.imul(h, 0x01000193);
    }
  };
  for (const g of survey.geophones) mix(g.x);
  for (const s of survey.shots) {
    mix(s.x);
    for (const t of s.times) mix(t ?? -1);
  }
  return h >>> 0;
}

/** The rock's stripped delay, ms, at the stations that have a middle-layer thickness. */
function rockDelayProfile(xs: readonly number[], thicknessM: readonly (number | null)[], v2: number, cos23: number): { x: number[]; y: number[]; h: number[]; index: number[] } {
  const out = { x: [] as number[], y: [] as number[], h: [] as number[], index: [] as number[] };
  thicknessM.forEach((h, i) => {
    if (h === null || !Number.isFinite(h)) return;
    out.x.push(xs[i]);
    out.y.push((1000 * h * cos23) / v2);
    out.h.push(h);
    out.index.push(i);
  });
  return out;
}

/**
 * Steps in the rock of a mapped three-layer line (see the file comment); null where the
 * line has fewer than MIN_ROCK_STATIONS rock thicknesses or no three velocities.
 */
export function rockSteps(survey: Survey, shots: ShotAnalysis[], twoLayer: TwoLayerRecord, options: ResolvedOptions, map: SecondRefractorMap, replicates = ROCK_STEP_REPLICATES, alpha = ROCK_STEP_ALPHA): RockStepTest | null {
  const [, v2, v3] = map.velocitiesMPerS;
  if (!map.mapped || v2 === null || v3 === null || !(v3 > v2)) return null;
  const xs = survey.geophones.map((g) => g.x);
  const sigmaMs = options.pickUncertaintyMs;
  const cos23 = Math.sqrt(1 - (v2 / v3) ** 2);
  const ic23 = Math.asin(v2 / v3);
  // The scan as the first refractor's delay-time steps run it (steps.ts), V2 and V3 in the place of V1 and V2.
  const scanOptions = (x: number[], y: number[], h: number[]) => delayTimeScanOptions(x, y, x, h, ic23, sigmaMs, SIDE_POINTS, MIN_SIDE_POINTS);
  const observed = rockDelayProfile(xs, map.normalThicknessM.map((t) => t[1]), v2, cos23);
  if (observed.x.length < MIN_ROCK_STATIONS) return null;
  const opts = scanOptions(observed.x, observed.y, observed.h);
  const observedMax = maxJumpStatistic(observed.x, observed.y, opts);
  // Replicates at or above the observed maximum that make rejection impossible.
  const limit = Math.max(1, Math.round((replicates + 1) * alpha));
  const uniform = seededUniform(lineSeed(survey));
  const maxima: number[] = [];
  let reached = 0;
  for (let r = 0; r < replicates; r++) {
    const noisy: Survey = { ...survey, shots: survey.shots.map((s) => ({ ...s, times: s.times.map((t) => (t === null ? null : t + sigmaMs * standardNormal(uniform))) })) };
    const replica = mapSecondRefractor(noisy, shots, twoLayer, options, 'thicknesses');
    const x: number[] = [];
    const e: number[] = [];
    const h: number[] = [];
    observed.index.forEach((i, k) => {
      const t = replica.normalThicknessM[i][1];
      if (t === null || !Number.isFinite(t)) return;
      x.push(observed.x[k]);
      e.push((1000 * t * cos23) / v2 - observed.y[k]);
      h.push(observed.h[k]);
    });
    const m = x.length >= MIN_ROCK_STATIONS ? maxJumpStatistic(x, e, scanOptions(x, e, h)) : 0;
    maxima.push(m);
    if (m >= observedMax) reached++;
    if (reached >= limit) {
      return { steps: [], observedMax, replicates: maxima.length, threshold: null, pValue: reached / maxima.length };
    }
  }
  maxima.sort((a, b) => a - b);
  // The ((R + 1)(1 − α))-th smallest: with R = 199, α = 0.01 the 198th, the second largest.
  const threshold = maxima[Math.min(maxima.length - 1, Math.max(0, Math.ceil((replicates + 1) * (1 - alpha)) - 1))];
  const pValue = (reached + 1) / (replicates + 1);
  const found = scanForJumps(observed.x, observed.y, { ...opts, falseAlarmProbability: alpha, threshold });
  // A step cannot be larger than the middle layer it cuts: rock rising by more than h2 on
  // its deep side would rise through the first refractor. Such a "step" is a misread map
  // (measured: a 240-geophone line with inner shots, V2 37 % high, gave a sawtooth rock
  // profile and a −48 m "step" under 12 m of middle layer), not rock relief.
  const spacing = medianSpacing(observed.x);
  const plausible = found.filter((f) => Math.abs(throwFromDelayJump(f.jump, v2, v3)) < localDepth(observed.x, observed.h, f.centreM, SIDE_POINTS * spacing));
  const steps = plausible.map((f) => ({
    x: f.centreM,
    throwM: throwFromDelayJump(f.jump, v2, v3),
    delayJumpMs: f.jump,
    standardErrorMs: f.standardError,
    statistic: f.statistic,
    threshold,
  }));
  return { steps, observedMax, replicates, threshold, pValue };
}
