/**
 * Automatic first breaks of one shot gather: for each trace an onset from an energy ratio
 * refined by Maeda's AIC (onset.ts), a confidence, dead and reversed-polarity traces found,
 * and picks inconsistent with their neighbours along the spread rejected and re-picked near
 * the neighbours' trend (spread-consistency.ts). Pure; O(samples × period) per gather.
 */
import { aicOnset, backToZeroCrossing, energyRatioOnset, rms } from './onset.js';
import { dominantPeriodSamples } from './dominant-period.js';
import { rejectOutliers, trendResiduals } from './spread-consistency.js';

export interface PickerTrace {
  /** Geophone position along the line, m (traces in order of x). */
  x: number;
  samples: Float64Array;
  sampleIntervalMs: number;
  /** Time of the first sample after the shot, ms (negative: pre-trigger samples). */
  delayMs: number;
}

export type TraceStatus = 'picked' | 'repicked' | 'dead' | 'outlier';

export interface GatherPicks {
  /** First-break time after the shot, ms; null for dead traces and rejected picks. */
  times: (number | null)[];
  /** 0 (no trust) to 1. */
  confidence: number[];
  status: TraceStatus[];
  /** True where the trace's first cycle has the opposite sign to its neighbours'. */
  reversed: boolean[];
  /** Dominant period found for the gather, ms (null: no signal at all). */
  dominantPeriodMs: number | null;
  /** Sample index of each pick (fractional never; null where no pick). */
  sampleIndex: (number | null)[];
}

/**
 * A trace is dead when it is flat: every sample equal (a disconnected channel or a zeroed
 * one), a non-finite sample, or an RMS under this fraction of the gather's median RMS.
 * Our choice (1/1000, 60 dB down).
 */
export const DEAD_RMS_FRACTION = 1e-3;
/** A residual along the spread above this many dominant periods rejects a pick (one period is a cycle skip). Our choice. */
export const OUTLIER_PERIODS = 0.75;
/** Neighbours on each side compared for polarity. Our choice. */
const POLARITY_NEIGHBOURS = 4;
/** Longest lag searched for the dominant period, samples. Our choice (covers 8 Hz at 0.25 ms). */
const MAX_PERIOD_LAG = 512;

function median(values: number[]): number {
  const s = values.slice().sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 === 1 ? s[m] : (s[m - 1] + s[m]) / 2;
}

function demeaned(samples: Float64Array): Float64Array | null {
  let sum = 0;
  for (let i = 0; i < samples.length; i++) {
    if (!Number.isFinite(samples[i])) return null;
    sum += samples[i];
  }
  const mean = samples.length > 0 ? sum / samples.length : 0;
  return samples.map((v) => v - mean);
}

function isFlat(x: Float64Array): boolean {
  for (let i = 1; i < x.length; i++) if (x[i] !== x[0]) return false;
  return true;
}

/** Confidence from the local signal-to-noise ratio s = rms after / rms before: 1 − 1/s², clamped to [0, 1]. Our choice. */
function snrConfidence(x: Float64Array, k: number, L: number): number {
  const before = rms(x, k - 2 * L, k);
  const after = rms(x, k, k + L);
  if (!(after > 0)) return 0;
  if (!(before > 0)) return 1;
  const s = after / before;
  return Math.min(1, Math.max(0, 1 - 1 / (s * s)));
}

/** Onset index on one trace within [from, to) (whole trace by default), or null. */
function onsetIn(x: Float64Array, L: number, from = 0, to = x.length): number | null {
  const coarse = energyRatioOnset(x, L, from, to);
  if (coarse < 0) return null;
  const k = aicOnset(x, Math.max(from, coarse - 2 * L), Math.min(x.length, coarse + L));
  return backToZeroCrossing(x, k < 0 ? coarse : k, L);
}

export function pickGather(traces: readonly PickerTrace[]): GatherPicks {
  const signals = traces.map((t) => demeaned(t.samples));
  const rmsAll = signals.map((x) => (x === null ? 0 : rms(x, 0, x.length)));
  const liveRms = rmsAll.filter((r) => r > 0);
  const gatherRms = liveRms.length > 0 ? median(liveRms) : 0;
  const dead = signals.map((x, i) => x === null || x.length < 8 || isFlat(x) || rmsAll[i] < DEAD_RMS_FRACTION * gatherRms);

  const live = signals.filter((x, i): x is Float64Array => x !== null && !dead[i]);
  const periodSamples = dominantPeriodSamples(live, MAX_PERIOD_LAG);
  const status: TraceStatus[] = dead.map((d) => (d ? 'dead' : 'picked'));
  const empty: GatherPicks = { times: traces.map(() => null), confidence: traces.map(() => 0), status, reversed: traces.map(() => false), dominantPeriodMs: null, sampleIndex: traces.map(() => null) };
  if (periodSamples === null) {
    return { ...empty, status: traces.map(() => 'dead') };
  }
  const L = Math.max(4, periodSamples);
  const index: (number | null)[] = signals.map((x, i) => (x === null || dead[i] ? null : onsetIn(x, L)));
  const timeOf = (i: number, k: number | null): number | null => (k === null ? null : traces[i].delayMs + k * traces[i].sampleIntervalMs);
  const dtMedian = median(traces.map((t) => t.sampleIntervalMs));
  const periodMs = L * dtMedian;
  const thresholdMs = OUTLIER_PERIODS * periodMs;
  const x = traces.map((t) => t.x);

  // Reject picks far from the trend, then re-pick each within a period of its neighbours' prediction.
  const first = index.map((k, i) => timeOf(i, k));
  const { times, rejected } = rejectOutliers(x, first, thresholdMs);
  for (const i of rejected) {
    status[i] = 'outlier';
    index[i] = null;
  }
  for (const i of rejected) {
    const predicted = predictFromNeighbours(x, times, i);
    const signal = signals[i];
    if (predicted === null || signal === null) continue;
    const centre = Math.round((predicted - traces[i].delayMs) / traces[i].sampleIntervalMs);
    const k = onsetIn(signal, L, Math.max(0, centre - L), Math.min(signal.length, centre + L));
    const t = timeOf(i, k);
    if (k === null || t === null || Math.abs(t - predicted) > thresholdMs) continue;
    times[i] = t;
    index[i] = k;
    status[i] = 'repicked';
  }

  const residuals = trendResiduals(x, times);
  const confidence = index.map((k, i) => {
    const signal = signals[i];
    if (k === null || signal === null) return 0;
    const r = residuals[i];
    const consistency = r === null ? 1 : Math.exp(-((r / thresholdMs) ** 2));
    return snrConfidence(signal, k, L) * consistency * (status[i] === 'repicked' ? 0.5 : 1);
  });
  const reversed = reversedPolarity(signals, index, L);
  return { times, confidence, status, reversed, dominantPeriodMs: periodMs, sampleIndex: index };
}

/** The pick predicted at i from the nearest two picks on one side (left first, then right), or null. */
function predictFromNeighbours(x: readonly number[], t: readonly (number | null)[], i: number): number | null {
  const left: number[] = [];
  for (let j = i - 1; j >= 0 && left.length < 2; j--) if (t[j] !== null) left.push(j);
  const right: number[] = [];
  for (let j = i + 1; j < t.length && right.length < 2; j++) if (t[j] !== null) right.push(j);
  const predictions: number[] = [];
  for (const [a, b] of [left, right]) {
    if (a === undefined || b === undefined) continue;
    const slope = (t[a]! - t[b]!) / (x[a] - x[b]);
    predictions.push(t[a]! + slope * (x[i] - x[a]));
  }
  if (predictions.length === 0) return null;
  return predictions.reduce((s, v) => s + v, 0) / predictions.length;
}

/**
 * Reversed polarity: the first period after each pick is correlated with the same stretch
 * after the picks of up to POLARITY_NEIGHBOURS neighbours on each side; a trace whose
 * correlations are negative with most of them is reversed (a geophone wired the wrong way
 * round). Our formulation. O(n × neighbours × period).
 */
function reversedPolarity(signals: (Float64Array | null)[], index: (number | null)[], L: number): boolean[] {
  return signals.map((x, i) => {
    const k = index[i];
    if (x === null || k === null) return false;
    let negative = 0;
    let compared = 0;
    for (let j = Math.max(0, i - POLARITY_NEIGHBOURS); j <= Math.min(signals.length - 1, i + POLARITY_NEIGHBOURS); j++) {
      const y = signals[j];
      const m = index[j];
      if (j === i || y === null || m === null) continue;
      let sxy = 0;
      let sxx = 0;
      let syy = 0;
      for (let d = 0; d < L && k + d < x.length && m + d < y.length; d++) {
        sxy += x[k + d] * y[m + d];
        sxx += x[k + d] ** 2;
        syy += y[m + d] ** 2;
      }
      if (sxx === 0 || syy === 0) continue;
      compared++;
      if (sxy / Math.sqrt(sxx * syy) < 0) negative++;
    }
    return compared >= 2 && negative > compared / 2;
  });
}
