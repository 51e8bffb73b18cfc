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
}

/** A straight branch of a time–distance curve: t = interceptMs + 1000·|x − shotX| / velocity. */
export interface BranchLine {
  /** Apparent velocity along the line, m/s. */
  velocity: number;
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
  phantom?: { fromShot: string; shiftMs: number; times: (number | null)[]; parallelRmsMs: number } | null;
  /** First arrivals modelled through the interpreted section, ms per geophone (issue: residuals). */
  modelledMs?: (number | null)[];
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
  delayJumpMs?: number;
  seenIn?: string[];
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
    dip: { degrees: number; [k: string]: unknown } | null;
  };
  qc: {
    reciprocal: ReciprocalCheck[];
    warnings: Warning[];
    residuals?: { rmsMs: number; perShot: { shot: string; rmsMs: number }[] };
  };
  /** Per-shot branch analysis, for the time–distance plot and for checking. */
  shots: ShotAnalysis[];
  /** Slope-intercept velocity analysis of opposing shot pairs and the plus-minus V2. */
  velocityAnalysis: VelocityAnalysis;
  /** The cautions every section and page carries (DESIGN.md). */
  cautions: string[];
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
  minusTimeVelocity: { velocity: number; standardError: number; count: number } | null;
}
