/**
 * Decimals kept in the output: 0.01 m, 0.01 ms, 1 m/s, 0.01°. The one table that decides
 * rounding; toInterpretation (to-interpretation.ts) and the QC steps that add to the output
 * (residuals.ts) round with these helpers and nothing else rounds.
 */
import { isFiniteNumber, roundTo } from '../shared/numbers.js';

export const OUTPUT_DECIMALS = { metres: 2, milliseconds: 2, velocity: 0, degrees: 2 } as const;

export const roundM = (v: number): number => roundTo(v, OUTPUT_DECIMALS.metres);
export const roundMs = (v: number): number => roundTo(v, OUTPUT_DECIMALS.milliseconds);
export const roundV = (v: number): number => roundTo(v, OUTPUT_DECIMALS.velocity);
export const roundDeg = (v: number): number => roundTo(v, OUTPUT_DECIMALS.degrees);

const orNull =
  (f: (v: number) => number) =>
  (v: number | null | undefined): number | null =>
    isFiniteNumber(v) ? f(v) : null;
export const roundMOrNull = orNull(roundM);
export const roundMsOrNull = orNull(roundMs);
export const roundVOrNull = orNull(roundV);
