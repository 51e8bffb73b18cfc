/**
 * The interpretation: what the engine says about a line. Plain JSON, shape fixed by
 * api-v1.md (fields may be added, never renamed). Units: m, ms, m/s, degrees.
 */
import type { MethodName } from '../survey/survey.js';

export interface Station {
  x: number;
  elevation: number;
  /** Delay time at the geophone for the first refractor, ms (T+/2 for plus-minus). */
  delayTime: number | null;
  /** Vertical depth from the ground at the geophone to the first refractor, m. */
  depth: number | null;
  /** elevation − depth, m. */
  refractorElevation: number | null;
  /** Vertical depth to each refractor, top first, m. */
  depths: (number | null)[];
  /** Local direct-wave (top layer) velocity, m/s. */
  v1: number | null;
  /** Local velocity of the first refractor, m/s. */
  refractorVelocity: number | null;
  /** One standard deviation of depth, m. */
  depthUncertainty?: number | null;
  /** Depth normal to the refractor (radius of the depth arc), m. */
  normalDepth?: number | null;
  /** Plus time T+ (ms) and minus time T− (ms) at the geophone. */
  plusTime?: number | null;
  minusTime?: number | null;
  /** How the station's plus time was found. */
  coverage?: 'pair' | 'phantom' | 'none';
  /** Number of opposing shot pairs that contributed. */
  pairCount?: number;
  /** Three-layer lines: how the delay time to each refractor was found, top first (null: none). */
  delaySources?: (DelaySource | null)[];
  /**
   * Where the hidden-layer warning is given: the deepest the first refractor could lie if a
   * layer too thin to arrive first sits above it, m (depth + the extra depth it allows).
   */
  hiddenLayerDepth?: number | null;
}

/** How a station's delay time to a refractor was found. */
export type DelaySource = 'pair' | 'phantom' | 'intercept' | 'interpolated';

/** A straight branch of a time–distance curve: t = interceptMs + 1000·|x − shotX| / velocity. */
export interface BranchLine {
  /**
   * Apparent velocity along the line, m/s; null when the branch's times do not change with
   * offset (a level branch: apparent velocity unbounded, e.g. picks clipped at one time).
   */
  velocity: number | null;
  /** Intercept time at the shot, ms. */
  interceptMs: number;
  /** Extent of the picks on the branch, m along the line. */
  fromX: number;
  toX: number;
  /** Picks used in the fit. */
  count: number;
  /** RMS misfit of the picks to the line, ms. */
  rmsMs: number;
}

export interface SideBranches {
  side: 'left' | 'right';
  direct: BranchLine | null;
  /** One line per refracted branch, shallowest refractor first. */
  refracted: BranchLine[];
  /** Offset at which the first refracted branch overtakes the direct wave, m; null when not seen. */
  crossoverDistance: number | null;
  /** True when options.branchOverrides fixed the split. */
  overridden: boolean;
  /**
   * True when a deeper refracted branch was seen on this side but not from the opposite
   * direction over a common stretch, so its picks were kept on the first refractor.
   */
  deeperBranchUnreversed?: boolean;
}

export interface ShotAnalysis {
  id: string;
  x: number;
  elevation: number;
  /** Where the shot lies: off an end, at an end, or inside the spread. */
  position: 'off-end-left' | 'end-left' | 'inside' | 'end-right' | 'off-end-right';
  left: SideBranches | null;
  right: SideBranches | null;
  /** Branch of each pick, per geophone: 0 direct, 1 first refractor, 2 second refractor, null no pick. */
  branchOfPick: (0 | 1 | 2 | null)[];
  /**
   * Arrivals phantomed onto this shot from an off-end shot on the same side (ms, per geophone,
   * null where not phantomed), with the constant shift that was applied.
   */
  phantom?: Phantom | null;
  /** First arrivals modelled through the interpreted section, ms per geophone (issue: residuals). */
  modelledMs?: (number | null)[];
  /** Pick minus modelled first arrival, ms per geophone (null where either is missing). */
  residualMs?: (number | null)[];
}

/** Arrivals phantomed onto a shot from off-end shots on the same side. */
export interface Phantom {
  /** The off-end shot whose shifted times are given in `times`. */
  fromShot: string;
  /** Constant shift applied to fromShot's times, ms. */
  shiftMs: number;
  /** Phantomed arrivals per geophone, ms; null where not phantomed. */
  times: (number | null)[];
  /** RMS misfit of the two branches where they overlap after the shift, ms. */
  parallelRmsMs: number;
  /** Every off-end shot whose times were used. */
  fromShots: string[];
  /** The parallelism check of every candidate off-end shot. */
  checks: PhantomCheck[];
}

export interface PhantomCheck {
  fromShot: string;
  shiftMs: number;
  parallelRmsMs: number;
  /** Geophones where both branches have refracted picks. */
  overlapCount: number;
  /** The branches are parallel within the pick uncertainty. */
  parallel: boolean;
  /** Its times went into the phantom. */
  used: boolean;
}

export interface ReciprocalCheck {
  shots: [string, string];
  /** Time shot A records at B's position, ms. */
  forwardMs: number;
  /** Time shot B records at A's position, ms. */
  reverseMs: number;
  differenceMs: number;
  ok: boolean;
  /** Whether each time was read at a geophone or extrapolated along the refracted branch. */
  forwardSource?: 'geophone' | 'extrapolated';
  reverseSource?: 'geophone' | 'extrapolated';
  /** Distance from each reading to the nearest pick it rests on, m (0 when read at a geophone). */
  forwardGapM?: number;
  reverseGapM?: number;
  /** Tolerance added to toleranceMs for readings extrapolated far beyond their picks, ms. */
  extrapolationAllowanceMs?: number;
  toleranceMs?: number;
  /**
   * 'direct' when the first arrival at the other shot is the direct wave both ways (shots
   * closer than the crossover distance): the direct-wave times are compared, and the pair
   * gives no head-wave reciprocal time to plus-minus. Absent: head-wave times.
   */
  wave?: 'direct';
}

export interface Warning {
  code: string;
  message: string;
  /** Where along the line, when the warning is about a place, m. */
  x?: number;
}

export interface Step {
  x: number;
  /** Positive where the refractor is deeper on the +x side, m. */
  throw: number;
  /** Jump of the delay time across the step, ms. */
  delayJumpMs?: number;
  /** Which evidence showed the step (e.g. delay times, branch offsets); always sent by the service. */
  seenIn?: string[];
  /** Offsets of the refracted branches of single shots near the step; always sent by the service. */
  branchJumps?: BranchJump[];
}

/** A step in the second refractor (features.lowerRefractor.steps). */
export interface RockStepOutput {
  x: number;
  /** Change of the middle layer's thickness across the step, m; positive where the rock is deeper on the +x side. */
  throw: number;
  /** Jump of the rock's stripped delay h2·cos θ23/V2, ms. */
  delayJumpMs: number;
  /** 'rock-delay-time': the stripped delay of the middle layer. */
  seenIn: string[];
  /** Scan statistic (RSS_kink − RSS_step)/σ² and the Monte Carlo threshold it beat. */
  statistic: number;
  threshold: number;
}

/** The Monte Carlo test behind features.lowerRefractor.steps. */
export interface RockStepTestOutput {
  /** The line's largest scan statistic. */
  statistic: number;
  /** The threshold from the replicates; null when the test stopped early (no step possible). */
  threshold: number | null;
  /** Replicates run (199, fewer when stopped early). */
  replicates: number;
  /** Monte Carlo p-value of the largest statistic. */
  pValue: number;
}

export interface BranchJump {
  shot: string;
  /** Where along the line the shot's branch jumps, m. */
  xSeen: number;
  /** Size of the jump, ms. */
  jumpMs: number;
}

/** A single planar dip of the first refractor (features.dip). */
export interface Dip {
  /** Positive where the refractor deepens toward +x, degrees. */
  degrees: number;
  /** A line through the refractor elevations, or the slope-intercept dip of the outermost opposing pair. */
  source: 'refractor-elevations' | 'slope-intercept';
  /** RMS of the refractor elevations about the line, m (source "refractor-elevations"). */
  rmsM?: number;
  /** Dip from the outermost opposing pair's slope-intercept analysis, degrees, and that pair's shots. */
  slopeInterceptDegrees?: number;
  slopeInterceptShots?: [string, string];
}

/** A straight line through the refractor elevations of one piece of the line between steps and velocity changes. */
export interface LocalDip {
  from: number;
  to: number;
  /** Positive where the refractor deepens toward +x, degrees. */
  degrees: number;
  /** RMS of the elevations about the line, m. */
  rmsM: number;
  /** Stations in the fit. */
  count: number;
}

/** qc.residuals: picks against first arrivals modelled through the interpreted section. */
export interface Residuals {
  /** RMS over every compared pick, ms. */
  rmsMs: number;
  perShot: { shot: string; rmsMs: number; count: number }[];
  /** Picks compared. */
  count: number;
  /** Grid cell of the forward model, m. */
  cellM: number;
  /** How the refractor was continued beyond the outermost depth. */
  refractorContinuation: 'planar-dip' | 'flat';
}

/** One candidate layer count compared by qc.layerChoice. */
export interface LayerCandidate {
  /** How it was made: the picks' own branch assignment ('auto') or a forced layer count. */
  label: 'auto' | 'two-layer' | 'three-layer';
  /** Layers the candidate's interpretation has. */
  layers: number;
  /** Residual RMS, ms, and picks compared. */
  rmsMs: number;
  count: number;
  /** Σ(residual/σ)² with σ the pick uncertainty. */
  chiSquare: number;
  /** Free parameters counted: one depth per station per refractor plus one velocity per layer. */
  parameters: number;
  /** χ² + parameters·ln(count) (Schwarz 1978). */
  bic: number;
}

/** qc.layerChoice: the layer count chosen by the picks' forward-model misfit (absent when not compared). */
export interface LayerChoice {
  criterion: 'bic';
  candidates: LayerCandidate[];
  /** Label of the candidate taken. */
  chosen: 'auto' | 'two-layer' | 'three-layer';
}

export interface VelocityChange {
  x: number;
  left: number;
  right: number;
}

export interface Interpretation {
  method: MethodName;
  name?: string;
  stations: Station[];
  layers: { velocity: number }[];
  refractorVelocity: { from: number; to: number; velocity: number }[];
  features: {
    steps: Step[];
    velocityChanges: VelocityChange[];
    dip: Dip | null;
    /** One straight line per piece between steps and velocity changes. */
    localDips: LocalDip[];
    /**
     * Three-layer lines: the dip of the second refractor, tested as that of the first
     * (structure/lower-refractor.ts), and steps in it (depth/rock-steps.ts) with the test
     * behind them; steps and stepTest are absent where the line has too few rock depths.
     */
    lowerRefractor?: { dip: Dip | null; localDips: LocalDip[]; steps?: RockStepOutput[]; stepTest?: RockStepTestOutput };
  };
  qc: {
    reciprocal: ReciprocalCheck[];
    warnings: Warning[];
    /** Absent with options.residuals = false, or when the check could not be made (a warning says why). */
    residuals?: Residuals;
    /** Present when the layer count was chosen by comparing candidates (engine/qc/layer-choice.ts). */
    layerChoice?: LayerChoice;
  };
  /** Per-shot branch analysis, for the time–distance plot and for checking. */
  shots: ShotAnalysis[];
  /** Slope-intercept velocity analysis of opposing shot pairs and the plus-minus V2. */
  velocityAnalysis: VelocityAnalysis;
  /** The cautions every section and page carries (DESIGN.md). */
  cautions: string[];
  /** method "grm" only: the functions at every XY tried and the optimum (engine/grm/). */
  grm?: GrmAnalysis;
  /** method "time-term" only: the inversion's fit, refractor velocities and shot terms (engine/time-term/). */
  timeTerm?: TimeTermAnalysis;
}

/** The time-term inversion's own results (Willmore & Bancroft 1960); the geophone terms are stations[].delayTime. */
export interface TimeTermAnalysis {
  /** Head-wave picks used (rows), and unknowns solved for. */
  picks: number;
  unknowns: number;
  /** RMS of pick − model over the picks, ms. */
  rmsMs: number;
  /** Noise the standard errors are scaled by: the larger of the pick uncertainty and the fit's own estimate, ms. */
  noiseMs: number;
  /** Refractor velocity per slowness segment, with one standard deviation, m/s. */
  segments: { from: number; to: number; velocity: number; standardError: number }[];
  /** Time term of each shot, with one standard deviation, ms (null where the shot has no head-wave pick). */
  shots: { shot: string; x: number; timeTerm: number | null; standardError: number | null }[];
}

/** The generalised reciprocal method's analysis (Palmer 1980): every XY, for the geophysicist to judge. */
export interface GrmAnalysis {
  /** XY taken, m. */
  optimumXy: number;
  /** Palmer's expectation 2·z·tan(ic) for a planar refractor, from the plus-minus mean delay time, m. */
  expectedOptimumXy: number | null;
  /** How the optimum was chosen, in words. */
  criterion: string;
  xyFunctions: GrmXyFunctions[];
}

export interface GrmXyFunctions {
  /** XY, m (geophone intervals × spacing). */
  xy: number;
  /** V' from this XY's velocity-analysis function, m/s. */
  refractorVelocity: number | null;
  /** RMS residual of the velocity-analysis function about a straight line per pair, ms (least at the optimum). */
  velocityRoughness: number | null;
  /** RMS second difference of the time-depth function, ms. */
  timeDepthDetail: number | null;
  /** One entry per station G, midway between X and Y. */
  stations: { x: number; velocityAnalysis: number | null; timeDepth: number | null }[];
}

export interface OpposingPairVelocities {
  shots: [string, string];
  /** Apparent velocities of the refracted branch shooting down-dip and up-dip, m/s. */
  downDipVelocity: number;
  upDipVelocity: number;
  /** True refractor velocity from the exact slope-intercept formula, m/s. */
  trueVelocity: number;
  /** Gentle-dip approximation 2·Vd·Vu·cosθ/(Vd+Vu), m/s. */
  trueVelocityGentleDip: number;
  /** Dip, degrees, positive where the refractor deepens toward +x. */
  dipDegrees: number;
  criticalAngleDegrees: number;
  /** Depth normal to the refractor under each shot, from its intercept time, m. */
  depthUnderShots: { shot: string; normalDepth: number; verticalDepth: number }[];
}

export interface VelocityAnalysis {
  /** Top-layer velocity from all direct branches, m/s. */
  v1: number | null;
  /** Direct-wave velocity per shot side, m/s. */
  directVelocities: { shot: string; side: 'left' | 'right'; velocity: number }[];
  pairs: OpposingPairVelocities[];
  /** V2 from the slope of T− against x (plus-minus), with its standard error, m/s. */
  minusTimeVelocity: MinusTimeVelocity | null;
}

export interface MinusTimeVelocity {
  velocity: number;
  standardError: number;
  /** Stations in the fit. */
  count: number;
  /** 'along-refractor': T− fitted against distance between the feet of the depth arcs; 'along-line': against x. */
  distance: 'along-line' | 'along-refractor';
  /** V2 from T− against x alone, m/s. */
  alongLineVelocity?: number;
  /** Where the refractor velocity changes along the line: one fit per segment. */
  segments?: MinusTimeVelocitySegment[];
}

export interface MinusTimeVelocitySegment {
  from: number;
  to: number;
  velocity: number;
  standardError: number;
  alongLineVelocity: number;
  count: number;
}
