/**
 * One SEG-2 gather in, its automatic first breaks out, in the shape the contract fixes for
 * POST /api/v1/gathers/picks (api-v1.md): {shot, geophones, sampleIntervalMs, times,
 * confidence}, plus added fields (delayMs, traces, warnings, dominantPeriodMs, acquisition).
 * A file that cannot be read comes back as {error} with the byte offset, not thrown, so it
 * crosses the worker boundary intact.
 */
import { tryGatherFromSeg2, type GatherOverrides } from '../seg2/gather.js';
import { pickGather, type TraceStatus } from './pick-gather.js';
import { roundTo } from '../shared/numbers.js';

export interface GatherPicksResponse {
  shot: { x: number; elevation: number };
  geophones: { x: number; elevation: number }[];
  sampleIntervalMs: number;
  times: (number | null)[];
  confidence: number[];
  /** Time of the first sample after the shot, ms (the first trace's; DELAY). */
  delayMs: number;
  traces: { channel: number; status: TraceStatus; reversed: boolean }[];
  dominantPeriodMs: number | null;
  acquisition: { date: string | null; time: string | null };
  warnings: { code: string; message: string; byteOffset: number }[];
}

export type GatherPicksResult = { ok: true; picks: GatherPicksResponse } | { ok: false; error: { code: string; message: string; byteOffset: number } };

/** Times to 0.01 ms (the service's output precision), confidence to 0.01. */
export function gatherPicksFromSeg2(bytes: Uint8Array, overrides: GatherOverrides = {}): GatherPicksResult {
  const read = tryGatherFromSeg2(bytes, overrides);
  if (!read.ok) return read;
  const gather = read.gather;
  const picks = pickGather(gather.traces);
  const warnings = [...gather.warnings];
  picks.reversed.forEach((r, i) => {
    if (r) warnings.push({ code: 'reversed-polarity', message: `The trace of channel ${gather.traces[i].channel} (x = ${gather.traces[i].x} m) has reversed polarity: check the geophone's wiring.`, byteOffset: 0 });
  });
  return {
    ok: true,
    picks: {
      shot: gather.shot,
      geophones: gather.traces.map((t) => ({ x: t.x, elevation: t.elevation })),
      sampleIntervalMs: gather.traces[0].sampleIntervalMs,
      times: picks.times.map((t) => (t === null ? null : roundTo(t, 2))),
      confidence: picks.confidence.map((c) => roundTo(c, 2)),
      delayMs: gather.traces[0].delayMs,
      traces: gather.traces.map((t, i) => ({ channel: t.channel, status: picks.status[i], reversed: picks.reversed[i] })),
      dominantPeriodMs: picks.dominantPeriodMs === null ? null : roundTo(picks.dominantPeriodMs, 2),
      acquisition: gather.acquisition,
      warnings,
    },
  };
}
