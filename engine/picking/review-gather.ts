/**
 * A stored gather for pick review: its traces decimated for display and, beside them, the
 * automatic picker's own picks with their confidence (gather-picks.ts), from one reading of
 * the file. The page shows a pick's confidence only where the line's pick is still the
 * picker's (a pick someone moved is theirs, not the picker's). Pure.
 * O(file length + traces × columns + the picker's O(samples × period)).
 */
import { decimatedGatherFromSeg2, type DecimatedGatherResult } from '../seg2/decimate.js';
import { gatherPicksFromSeg2 } from './gather-picks.js';
import type { GatherOverrides } from '../seg2/gather.js';
import type { TraceStatus } from './pick-gather.js';

/** The picker's answer for each trace, in the order of the decimated traces (by geophone x). */
export interface AutomaticPicks {
  times: (number | null)[];
  confidence: number[];
  status: TraceStatus[];
}

export type ReviewGatherResult =
  | { ok: true; gather: Extract<DecimatedGatherResult, { ok: true }>['gather'] & { automatic: AutomaticPicks } }
  | Extract<DecimatedGatherResult, { ok: false }>;

export function reviewGatherFromSeg2(
  bytes: Uint8Array,
  overrides: GatherOverrides,
  request: { columns?: number; fromMs?: number; toMs?: number },
): ReviewGatherResult {
  const decimated = decimatedGatherFromSeg2(bytes, overrides, request);
  if (!decimated.ok) return decimated;
  // The file read again by the picker: reading is a small share of picking (README, benchmark).
  const picked = gatherPicksFromSeg2(bytes, overrides);
  if (!picked.ok) return picked;
  const { times, confidence, traces } = picked.picks;
  return { ok: true, gather: { ...decimated.gather, automatic: { times, confidence, status: traces.map((t) => t.status) } } };
}
