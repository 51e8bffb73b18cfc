/**
 * Synthetic shot gathers for the picker's tests: a 48-geophone line at 2 m over a planar
 * refractor (the closed-form model of engine/forward/planar-refractor.ts), five shots (two
 * off-end, two end, one centre), 0.25 ms sampling with 10 ms of pre-trigger samples, a
 * 100 Hz Ricker wavelet (engine/forward/synthetic-gather.ts).
 */
import { syntheticGather, type SyntheticGatherSpec } from '../../engine/forward/synthetic-gather.js';
import type { PlanarRefractorModel } from '../../engine/forward/planar-refractor.js';
import { pickGather, type GatherPicks } from '../../engine/picking/pick-gather.js';

export const PICKER_MODEL: PlanarRefractorModel = { v1: 600, v2: 2400, refractorElevationAtZero: -6, dipDegrees: 3 };
export const GEOPHONES = Array.from({ length: 48 }, (_, i) => ({ x: 2 * i, elevation: 0 }));
export const SHOT_XS = [-20, -1, 47, 95, 114];
export const DT_MS = 0.25;
export const DELAY_MS = -10;

export function spec(shotX: number, snr: number, seed: number, extra: Partial<SyntheticGatherSpec> = {}): SyntheticGatherSpec {
  return {
    model: PICKER_MODEL,
    shot: { x: shotX, elevation: 0 },
    geophones: GEOPHONES,
    sampleIntervalMs: DT_MS,
    samples: 1024,
    delayMs: DELAY_MS,
    peakFrequencyHz: 100,
    snr,
    seed,
    ...extra,
  };
}

/** Picks of one synthetic gather and the pick errors in samples (null where no pick). */
export function pickSynthetic(s: SyntheticGatherSpec): { picks: GatherPicks; errors: (number | null)[]; truth: number[] } {
  const { traces, firstArrivalsMs } = syntheticGather(s);
  const picks = pickGather(traces.map((samples, i) => ({ x: s.geophones[i].x, samples, sampleIntervalMs: s.sampleIntervalMs, delayMs: s.delayMs })));
  const errors = picks.times.map((t, i) => (t === null ? null : (t - firstArrivalsMs[i]) / s.sampleIntervalMs));
  return { picks, errors, truth: firstArrivalsMs };
}

export interface ErrorStats {
  snr: number;
  traces: number;
  picked: number;
  medianAbs: number;
  p90Abs: number;
  maxAbs: number;
  medianSigned: number;
}

function quantile(sorted: number[], q: number): number {
  if (sorted.length === 0) return NaN;
  const pos = (sorted.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return sorted[lo] + (sorted[hi] - sorted[lo]) * (pos - lo);
}

/** Errors over every shot and `seeds` noise draws at one SNR. */
export function errorStats(snr: number, seeds: number): ErrorStats {
  const all: number[] = [];
  let traces = 0;
  for (let seed = 1; seed <= seeds; seed++) {
    for (const x of SHOT_XS) {
      const { errors } = pickSynthetic(spec(x, snr, seed * 1000 + x));
      traces += errors.length;
      for (const e of errors) if (e !== null) all.push(e);
    }
  }
  const abs = all.map(Math.abs).sort((a, b) => a - b);
  const signed = all.slice().sort((a, b) => a - b);
  return { snr, traces, picked: all.length, medianAbs: quantile(abs, 0.5), p90Abs: quantile(abs, 0.9), maxAbs: abs[abs.length - 1], medianSigned: quantile(signed, 0.5) };
}
