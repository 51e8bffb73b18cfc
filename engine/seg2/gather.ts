/**
 * A shot gather from a SEG-2 file: the geometry and timing the picker and the API need,
 * taken from the standard's keyword strings (Pullan, Geophysics 55, 1990), with values a
 * request supplies (GatherOverrides) taking precedence. Keywords read:
 *  - SAMPLE_INTERVAL (trace; seconds), DELAY (trace; seconds from the shot to the first
 *    sample, negative when samples were recorded before the shot), RECEIVER_LOCATION and
 *    SOURCE_LOCATION (trace; "x [y [z]]" in the file's UNITS), UNITS (file; METERS or
 *    FEET), CHANNEL_NUMBER (trace), ACQUISITION_DATE / ACQUISITION_TIME (file).
 *    Units of seconds and the coordinate order are our reading of the standard, from memory.
 *  - We take the first coordinate as x along the line and the third, when given, as the
 *    elevation (our choice; the standard does not tie z to elevation in our reading).
 * Everything else stays in `fileStrings` / each trace's `strings` as metadata.
 */
import { readSeg2 } from './read.js';
import { Seg2Error, stringValue, type Seg2String, type Seg2Warning } from './types.js';

/** What a request may supply for what the file lacks or gets wrong (m, ms). */
export interface GatherOverrides {
  shotX?: number;
  shotElevation?: number;
  /** x of the first trace's geophone; with geophoneSpacing, places every geophone (trace order). */
  geophoneX0?: number;
  geophoneSpacing?: number;
  /** One elevation for every geophone. */
  geophoneElevation?: number;
  sampleIntervalMs?: number;
  delayMs?: number;
}

export interface GatherTrace {
  channel: number;
  x: number;
  elevation: number;
  sampleIntervalMs: number;
  /** Time of the first sample after the shot, ms. */
  delayMs: number;
  samples: Float64Array;
  strings: Seg2String[];
}

export interface Gather {
  shot: { x: number; elevation: number };
  /** Traces in order of geophone x. */
  traces: GatherTrace[];
  acquisition: { date: string | null; time: string | null };
  fileStrings: Seg2String[];
  warnings: Seg2Warning[];
}

/** Common seismograph sample intervals, µs (our list: 1/48, 1/40, 1/32, 1/24 kHz and the binary fractions of a millisecond). */
const NOMINAL_INTERVALS_US = [1000 / 48, 25, 31.25, 1000 / 24, 50, 62.5, 100, 125, 200, 250, 500, 1000, 2000, 4000];
/** A written interval this close (relative) to a nominal one is taken as that one, rounded in the writing. Our choice. */
const SNAP_TOLERANCE = 0.005;

/** Metres per unit of the UNITS keyword (international foot, exactly 0.3048 m). */
const UNIT_METRES: Record<string, number> = { METERS: 1, METRES: 1, METER: 1, METRE: 1, M: 1, FEET: 0.3048, FOOT: 0.3048, FT: 0.3048 };

function parseNumbers(text: string): number[] | null {
  const parts = text.trim().split(/[\s,]+/).filter((p) => p !== '');
  const values = parts.map(Number);
  return values.length > 0 && values.every(Number.isFinite) ? values : null;
}

/** The sample interval in ms, a rounded writing of a common interval taken as that interval. */
export function snapSampleIntervalMs(writtenMs: number): { ms: number; snapped: boolean } {
  const us = writtenMs * 1000;
  for (const nominal of NOMINAL_INTERVALS_US) {
    const relative = Math.abs(us - nominal) / nominal;
    if (relative < SNAP_TOLERANCE) return { ms: nominal / 1000, snapped: relative > 1e-9 };
  }
  return { ms: writtenMs, snapped: false };
}

/** A file that could not be read, as the routes answer it: the reader's code, words and byte offset. */
export interface Seg2Refusal {
  code: string;
  message: string;
  byteOffset: number;
}

/** gatherFromSeg2 as a result: the gather, or the Seg2Error's refusal (any other error still throws). */
export function tryGatherFromSeg2(bytes: Uint8Array, overrides: GatherOverrides = {}): { ok: true; gather: Gather } | { ok: false; error: Seg2Refusal } {
  try {
    return { ok: true, gather: gatherFromSeg2(bytes, overrides) };
  } catch (error) {
    if (error instanceof Seg2Error) return { ok: false, error: { code: error.code, message: error.message, byteOffset: error.byteOffset } };
    throw error;
  }
}

/** Reads the bytes and builds the gather; throws Seg2Error (with the byte offset) when it cannot. O(file length + n log n). */
export function gatherFromSeg2(bytes: Uint8Array, overrides: GatherOverrides = {}): Gather {
  const { file, traceOffsets, warnings } = readSeg2(bytes);
  const unitsText = stringValue(file.strings, 'UNITS');
  let metres = 1;
  if (unitsText === undefined) {
    warnings.push({ code: 'seg2-no-units', message: 'The file does not say its UNITS; locations are read as metres.', byteOffset: 32 });
  } else if (UNIT_METRES[unitsText.trim().toUpperCase()] !== undefined) {
    metres = UNIT_METRES[unitsText.trim().toUpperCase()];
    if (metres !== 1) warnings.push({ code: 'seg2-units-feet', message: `The file's locations are in ${unitsText.trim()}; converted to metres (1 ft = 0.3048 m).`, byteOffset: 32 });
  } else {
    warnings.push({ code: 'seg2-units-unknown', message: `The file's UNITS are "${unitsText}", which Arcline does not know; locations are read as metres.`, byteOffset: 32 });
  }

  const number = (trace: number, keyword: string, text: string | undefined): number[] | null => {
    if (text === undefined) return null;
    const values = parseNumbers(text);
    if (values === null) throw new Seg2Error('bad-keyword-value', traceOffsets[trace], `trace ${trace + 1}'s ${keyword} is "${text}", not a number.`);
    return values;
  };

  let shot: { x: number; elevation: number } | null = null;
  let intervalSnapWarned = false;
  const traces: GatherTrace[] = file.traces.map((trace, i) => {
    const at = traceOffsets[i];
    const interval = number(i, 'SAMPLE_INTERVAL', stringValue(trace.strings, 'SAMPLE_INTERVAL'));
    let sampleIntervalMs: number;
    if (overrides.sampleIntervalMs !== undefined) sampleIntervalMs = overrides.sampleIntervalMs;
    else if (interval === null) {
      throw new Seg2Error('no-sample-interval', at, `trace ${i + 1} has no SAMPLE_INTERVAL string; give the sample interval as the query parameter sampleIntervalMs.`);
    } else {
      if (!(interval[0] > 0)) throw new Seg2Error('bad-keyword-value', at, `trace ${i + 1}'s SAMPLE_INTERVAL is ${interval[0]} s; it must be positive.`);
      const snap = snapSampleIntervalMs(interval[0] * 1000);
      sampleIntervalMs = snap.ms;
      if (snap.snapped && !intervalSnapWarned) {
        intervalSnapWarned = true;
        warnings.push({ code: 'seg2-interval-rounded', message: `SAMPLE_INTERVAL is written as ${interval[0]} s, a rounding of ${snap.ms * 1000} µs; ${snap.ms * 1000} µs is used.`, byteOffset: at });
      }
    }
    const delay = number(i, 'DELAY', stringValue(trace.strings, 'DELAY'));
    const delayMs = overrides.delayMs ?? (delay === null ? 0 : delay[0] * 1000);

    const receiver = number(i, 'RECEIVER_LOCATION', stringValue(trace.strings, 'RECEIVER_LOCATION'));
    let x: number;
    if (overrides.geophoneX0 !== undefined && overrides.geophoneSpacing !== undefined) x = overrides.geophoneX0 + i * overrides.geophoneSpacing;
    else if (receiver === null) {
      throw new Seg2Error('no-receiver-location', at, `trace ${i + 1} has no RECEIVER_LOCATION string; give the geophone positions as the query parameters geophoneX0 and geophoneSpacing.`);
    } else x = receiver[0] * metres;
    const elevation = overrides.geophoneElevation ?? (receiver !== null && receiver.length >= 3 ? receiver[2] * metres : 0);

    const source = number(i, 'SOURCE_LOCATION', stringValue(trace.strings, 'SOURCE_LOCATION') ?? stringValue(file.strings, 'SOURCE_LOCATION'));
    if (source !== null) {
      const here = { x: source[0] * metres, elevation: source.length >= 3 ? source[2] * metres : 0 };
      if (shot === null) shot = here;
      else if (Math.abs(here.x - shot.x) > 1e-6) {
        warnings.push({ code: 'seg2-source-differs', message: `Trace ${i + 1} gives the source at x = ${here.x} m, trace 1 at ${shot.x} m; the first is used.`, byteOffset: at });
      }
    }
    const channel = number(i, 'CHANNEL_NUMBER', stringValue(trace.strings, 'CHANNEL_NUMBER'));
    return { channel: channel === null ? i + 1 : channel[0], x, elevation, sampleIntervalMs, delayMs, samples: trace.samples, strings: trace.strings };
  });

  const fromFile = shot as { x: number; elevation: number } | null;
  if (overrides.shotX === undefined && fromFile === null) {
    throw new Seg2Error('no-source-location', traceOffsets[0], 'the traces have no SOURCE_LOCATION string; give the shot position as the query parameter shotX (and shotElevation).');
  }
  if (overrides.shotX !== undefined && fromFile !== null && Math.abs(fromFile.x - overrides.shotX) > 1e-6) {
    warnings.push({ code: 'seg2-source-overridden', message: `The file puts the shot at x = ${fromFile.x} m; the request's shotX = ${overrides.shotX} m is used.`, byteOffset: traceOffsets[0] });
  }
  const finalShot = {
    x: overrides.shotX ?? (fromFile as { x: number; elevation: number }).x,
    elevation: overrides.shotElevation ?? fromFile?.elevation ?? 0,
  };

  const intervals = new Set(traces.map((t) => t.sampleIntervalMs));
  if (intervals.size > 1) warnings.push({ code: 'seg2-mixed-intervals', message: `The traces have ${intervals.size} different sample intervals; each trace is picked at its own.`, byteOffset: traceOffsets[0] });

  // The response lists geophones by x; a file in another order is sorted (stable).
  const increasing = traces.every((t, i) => i === 0 || t.x > traces[i - 1].x);
  if (!increasing) {
    traces.sort((a, b) => a.x - b.x);
    const duplicate = traces.some((t, i) => i > 0 && t.x === traces[i - 1].x);
    warnings.push({
      code: duplicate ? 'seg2-duplicate-receivers' : 'seg2-receivers-reordered',
      message: duplicate ? 'Two or more traces have their geophone at the same x.' : 'The traces are not in order of geophone x; they are listed sorted by x.',
      byteOffset: traceOffsets[0],
    });
  }
  return {
    shot: finalShot,
    traces,
    acquisition: { date: stringValue(file.strings, 'ACQUISITION_DATE') ?? null, time: stringValue(file.strings, 'ACQUISITION_TIME') ?? null },
    fileStrings: file.strings,
    warnings,
  };
}
