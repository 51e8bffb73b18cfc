/**
 * The one options record: every interpretation option's default and allowed range,
 * declared once with its source, and `resolveOptions`, which turns the survey's optional
 * `options` into the record every stage of the engine receives. The validator and the
 * JSON Schema of the survey read their limits from here, so the engine and the service
 * agree on what is allowed.
 */
import type { BranchOverride, MethodName, SurveyOptions } from './survey.js';

/** A numeric option: its default and the closed-open range the service accepts. */
export interface NumericOption {
  /** Default when the option is absent, in the option's unit. */
  default: number;
  /** Smallest value refused below (exclusive), in the option's unit. */
  exclusiveMinimum: number;
  /** Largest value accepted (inclusive), in the option's unit. */
  maximum: number;
  /** Where the default and the limit come from. */
  source: string;
}

/** Numeric options of `SurveyOptions`, in ms. */
export const NUMERIC_OPTIONS = {
  pickUncertaintyMs: {
    default: 0.5,
    exclusiveMinimum: 0,
    maximum: 20,
    source:
      'Common practice: first breaks of a hammer or small-charge source on a clean record are read to about half a millisecond; 20 ms is far beyond any usable pick.',
  },
  reciprocalToleranceMs: {
    default: 3,
    exclusiveMinimum: 0,
    maximum: 100,
    source:
      'Common practice: reciprocal times of opposing shots should agree within a few milliseconds; above 100 ms the check says nothing.',
  },
} as const satisfies Record<string, NumericOption>;

/** Methods the contract names (api-v1.md). */
export const KNOWN_METHODS: readonly MethodName[] = ['plus-minus', 'grm', 'time-term'];
/** Methods the engine can run today; the others are refused with "method-not-available". */
export const AVAILABLE_METHODS: readonly MethodName[] = ['plus-minus', 'grm', 'time-term'];
/** Method used when `options.method` is absent (api-v1.md). */
export const DEFAULT_METHOD: MethodName = 'plus-minus';

/** Every option with its default applied: what each stage of the engine reads. */
export interface ResolvedOptions {
  /** Forced layer count, or null to let the picks decide. */
  layers: 2 | 3 | null;
  method: MethodName;
  /** Run the forward-model check of the interpretation (default true, api-v1.md). */
  residuals: boolean;
  /** Pick uncertainty σ assumed for every first break, ms. */
  pickUncertaintyMs: number;
  /** Opposing shots' reciprocal times must agree within this, ms. */
  reciprocalToleranceMs: number;
  branchOverrides: BranchOverride[];
}

/** A value within a numeric option's range, else its default (input is validated upstream). */
function numericOr(value: unknown, option: NumericOption): number {
  return typeof value === 'number' && Number.isFinite(value) && value > option.exclusiveMinimum && value <= option.maximum
    ? value
    : option.default;
}

/**
 * The survey's options with every default applied. Called once per interpretation;
 * stages never read `survey.options` themselves.
 *
 * @example
 * resolveOptions({ pickUncertaintyMs: 0.3 }).reciprocalToleranceMs // 3
 */
export function resolveOptions(options: SurveyOptions | undefined): ResolvedOptions {
  const o = options ?? {};
  return {
    layers: o.layers === 2 || o.layers === 3 ? o.layers : null,
    method: o.method && KNOWN_METHODS.includes(o.method) ? o.method : DEFAULT_METHOD,
    residuals: o.residuals !== false,
    pickUncertaintyMs: numericOr(o.pickUncertaintyMs, NUMERIC_OPTIONS.pickUncertaintyMs),
    reciprocalToleranceMs: numericOr(o.reciprocalToleranceMs, NUMERIC_OPTIONS.reciprocalToleranceMs),
    branchOverrides: o.branchOverrides ?? [],
  };
}
