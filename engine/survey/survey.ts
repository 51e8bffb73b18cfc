/**
 * The survey document: one refraction line as it comes from the field.
 * Shape fixed by api-v1.md. Units: metres, milliseconds, metres per second.
 */

export interface Geophone {
  /** Distance along the line, m. Strictly increasing across the spread. */
  x: number;
  /** Ground elevation at the geophone, m. Absent: flat datum 0. */
  elevation?: number;
}

export interface Shot {
  /** Unique name of the shot within the line, e.g. "W-off". */
  id: string;
  /** Shot position along the line, m. May lie off either end or inside the spread. */
  x: number;
  /** Ground elevation at the shot, m. Absent: interpolated from the geophones (or 0). */
  elevation?: number;
  /** First-break time at geophones[i], ms after the shot; null = no pick. */
  times: (number | null)[];
}

/** Which arrivals a shot side holds, fixed by the user instead of the automatic split. */
export interface BranchOverride {
  shot: string;
  side: 'left' | 'right';
  /**
   * Number of picks, counted outward from the shot, that belong to the direct wave.
   * 0 = every pick on this side is refracted.
   */
  directPicks: number;
  /** For three-layer lines: picks counted outward from the shot that precede the second refractor's branch. */
  firstRefractorPicks?: number;
}

export type MethodName = 'plus-minus' | 'grm' | 'time-term';

export interface SurveyOptions {
  /** Force the number of layers (2 or 3). Absent: found from the data. */
  layers?: 2 | 3;
  /** Reciprocal times of opposing shots must agree within this many ms (default 3 ms, common practice). */
  reciprocalToleranceMs?: number;
  method?: MethodName;
  /** Forward-model check of the interpretation (default true). */
  residuals?: boolean;
  /** Manual branch assignment per shot side. */
  branchOverrides?: BranchOverride[];
  /** Pick uncertainty the interpreter assumes, ms (default 0.5 ms). */
  pickUncertaintyMs?: number;
}

export interface Survey {
  name?: string;
  /** Free text: site, date of shooting, crew. Shown on the section's title block. */
  date?: string;
  geophones: Geophone[];
  shots: Shot[];
  options?: SurveyOptions;
}

/** Size limits that keep any input from exhausting memory or time. */
export const SURVEY_LIMITS = {
  maxGeophones: 1024,
  maxShots: 64,
  maxNameLength: 200,
  maxShotIdLength: 40,
  /** Longest free-text date, characters. */
  maxDateLength: 200,
  /** Largest sensible first-break time, ms (a 10 s record is already absurd for engineering lines). */
  maxTimeMs: 10_000,
  /** Largest coordinate magnitude, m. */
  maxCoordinateM: 1_000_000,
} as const;
