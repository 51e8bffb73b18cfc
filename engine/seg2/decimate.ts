/**
 * Traces decimated for display: each trace cut into `columns` equal time columns over a
 * window, and each column drawn as the smallest and largest sample in it (the min/max
 * envelope a screen draws one pixel column from: every peak survives, however many samples
 * a column holds; common practice in waveform displays). A column that holds no sample
 * (more columns than samples) takes the trace linearly interpolated at its centre, as both
 * min and max. Values are given as fractions of the trace's largest absolute sample in the
 * window (`peak`, in the file's units), rounded to 0.001, so a gather's JSON stays small;
 * a dead trace (peak 0) is all zeros.
 */
import { tryGatherFromSeg2, type GatherOverrides, type GatherTrace } from './gather.js';
import { roundTo } from '../shared/numbers.js';

export interface DecimatedTrace {
  channel: number;
  x: number;
  /** Largest absolute sample in the window, file units (0 for a dead trace). */
  peak: number;
  min: number[];
  max: number[];
}

export interface DecimatedGather {
  /** Start of the first column, ms after the shot. */
  fromMs: number;
  toMs: number;
  columns: number;
  columnMs: number;
  traces: DecimatedTrace[];
}

/** Time of the last sample of a trace, ms after the shot. */
function endMs(t: GatherTrace): number {
  return t.delayMs + (t.samples.length - 1) * t.sampleIntervalMs;
}

/** The whole record: from the earliest first sample to the latest last sample of any trace. */
export function recordWindowMs(traces: readonly GatherTrace[]): { fromMs: number; toMs: number } {
  let fromMs = Infinity;
  let toMs = -Infinity;
  for (const t of traces) {
    fromMs = Math.min(fromMs, t.delayMs);
    toMs = Math.max(toMs, endMs(t));
  }
  return { fromMs, toMs };
}

/** O(samples in the window + columns) per trace. Requires toMs > fromMs and columns >= 1. */
export function decimateTraces(traces: readonly GatherTrace[], columns: number, fromMs: number, toMs: number): DecimatedGather {
  const columnMs = (toMs - fromMs) / columns;
  const out = traces.map((trace): DecimatedTrace => {
    const { samples, delayMs, sampleIntervalMs: dt } = trace;
    const lo = new Float64Array(columns).fill(Infinity);
    const hi = new Float64Array(columns).fill(-Infinity);
    // Only the samples inside the window are visited.
    const first = Math.max(0, Math.ceil((fromMs - delayMs) / dt - 1e-9));
    const last = Math.min(samples.length - 1, Math.floor((toMs - delayMs) / dt + 1e-9));
    let peak = 0;
    for (let k = first; k <= last; k++) {
      const c = Math.min(columns - 1, Math.floor((delayMs + k * dt - fromMs) / columnMs));
      const v = samples[k];
      if (v < lo[c]) lo[c] = v;
      if (v > hi[c]) hi[c] = v;
      if (Math.abs(v) > peak) peak = Math.abs(v);
    }
    const min: number[] = new Array<number>(columns);
    const max: number[] = new Array<number>(columns);
    for (let c = 0; c < columns; c++) {
      let a = lo[c];
      let b = hi[c];
      if (a === Infinity) {
        // Empty column: the trace at the column's centre (0 outside the record).
        const pos = (fromMs + (c + 0.5) * columnMs - delayMs) / dt;
        const k = Math.floor(pos);
        const v = k < 0 || k >= samples.length - 1 ? 0 : samples[k] + (samples[k + 1] - samples[k]) * (pos - k);
        a = v;
        b = v;
      }
      min[c] = peak === 0 ? 0 : roundTo(a / peak, 3);
      max[c] = peak === 0 ? 0 : roundTo(b / peak, 3);
    }
    return { channel: trace.channel, x: trace.x, peak, min, max };
  });
  return { fromMs, toMs, columns, columnMs, traces: out };
}

/**
 * Most values (traces × columns) one answer carries, per envelope: 48 traces × 2,000
 * columns, about 1 MB of JSON for min and max together. Our choice; wider requests get
 * fewer columns, and the answer says how many.
 */
export const MAX_DECIMATED_VALUES = 96_000;
export const MAX_COLUMNS = 2000;
export const DEFAULT_COLUMNS = 600;

export type DecimatedGatherResult =
  | { ok: true; gather: DecimatedGather & { shot: { x: number; elevation: number }; sampleIntervalMs: number; delayMs: number } }
  | { ok: false; error: { code: string; message: string; byteOffset: number } };

/**
 * Reads the file (with the geometry the upload supplied) and decimates it: the whole record
 * unless a window is given (clipped to the record). O(file length + traces × columns).
 */
export function decimatedGatherFromSeg2(
  bytes: Uint8Array,
  overrides: GatherOverrides,
  request: { columns?: number; fromMs?: number; toMs?: number },
): DecimatedGatherResult {
  const read = tryGatherFromSeg2(bytes, overrides);
  if (!read.ok) return read;
  const gather = read.gather;
  const record = recordWindowMs(gather.traces);
  const fromMs = Math.max(record.fromMs, request.fromMs ?? record.fromMs);
  const toMs = Math.min(record.toMs, request.toMs ?? record.toMs);
  if (!(toMs > fromMs)) {
    return { ok: false, error: { code: 'empty-window', message: `The window ${fromMs}–${toMs} ms holds no part of the record (${record.fromMs}–${record.toMs} ms).`, byteOffset: 0 } };
  }
  const columns = Math.max(1, Math.min(request.columns ?? DEFAULT_COLUMNS, MAX_COLUMNS, Math.floor(MAX_DECIMATED_VALUES / gather.traces.length)));
  const first = gather.traces[0];
  return { ok: true, gather: { shot: gather.shot, sampleIntervalMs: first.sampleIntervalMs, delayMs: first.delayMs, ...decimateTraces(gather.traces, columns, fromMs, toMs) } };
}
