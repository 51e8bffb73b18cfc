/**
 * Synthetic shot gathers for testing the picker and for demo files: each trace carries the
 * forward model's first arrival (and, when it exists, the later of the direct and head
 * waves) as a Ricker wavelet, plus seeded Gaussian noise.
 *
 * Ricker wavelet (Ricker, Geophysics 18, 1953): w(τ) = (1 − 2π²f²τ²)·exp(−π²f²τ²) with peak
 * frequency f. It is symmetric and never exactly zero, so it has no onset to be "true". We
 * start it at the zero crossing ahead of its main lobe, τ = −1/(√2·π·f) (our choice): the
 * trace is zero before the arrival time and rises continuously from it, and the arrival
 * time is where the wavelet starts. Noise amplitude: SNR = peak amplitude of the wavelet /
 * RMS of the noise (a common definition; an RMS/RMS ratio would be lower).
 */
import { firstArrivalMs, directWaveTimeMs, headWaveTimeMs, type PlanarRefractorModel, type SurfacePoint } from './planar-refractor.js';
import { seededUniform, standardNormal } from './seeded-random.js';

export interface SyntheticGatherSpec {
  model: PlanarRefractorModel;
  shot: SurfacePoint;
  geophones: SurfacePoint[];
  sampleIntervalMs: number;
  samples: number;
  /** Time of the first sample after the shot, ms. */
  delayMs: number;
  peakFrequencyHz: number;
  /** Peak amplitude / noise RMS; Infinity for no noise. */
  snr: number;
  seed: number;
  /** Indices of traces written flat (0 everywhere). */
  deadTraces?: number[];
  /** Indices of traces written with reversed polarity. */
  reversedTraces?: number[];
}

export interface SyntheticGather {
  /** One trace per geophone (peak amplitude 1 before noise). */
  traces: Float64Array[];
  /** True first-arrival times, ms after the shot. */
  firstArrivalsMs: number[];
}

/** The Ricker wavelet started at its leading zero crossing; t in ms after the arrival. */
export function causalRicker(tMs: number, peakFrequencyHz: number): number {
  if (tMs < 0) return 0;
  const f = peakFrequencyHz / 1000; // per ms
  const tau = tMs - 1 / (Math.SQRT2 * Math.PI * f);
  const a = Math.PI * Math.PI * f * f * tau * tau;
  return (1 - 2 * a) * Math.exp(-a);
}

/** O(traces × samples). */
export function syntheticGather(spec: SyntheticGatherSpec): SyntheticGather {
  const uniform = seededUniform(spec.seed);
  const dead = new Set(spec.deadTraces ?? []);
  const reversed = new Set(spec.reversedTraces ?? []);
  const firstArrivalsMs = spec.geophones.map((g) => firstArrivalMs(spec.model, spec.shot, g));
  const traces = spec.geophones.map((g, i) => {
    const x = new Float64Array(spec.samples);
    if (dead.has(i)) return x;
    const first = firstArrivalsMs[i];
    const head = headWaveTimeMs(spec.model, spec.shot, g);
    const direct = directWaveTimeMs(spec.model, spec.shot, g);
    const later = head === null ? null : Math.max(head, direct);
    const sign = reversed.has(i) ? -1 : 1;
    for (let k = 0; k < spec.samples; k++) {
      const t = spec.delayMs + k * spec.sampleIntervalMs;
      let v = causalRicker(t - first, spec.peakFrequencyHz);
      if (later !== null && later - first > 1e-9) v += causalRicker(t - later, spec.peakFrequencyHz);
      const noise = Number.isFinite(spec.snr) ? standardNormal(uniform) / spec.snr : 0;
      x[k] = sign * v + noise;
    }
    return x;
  });
  return { traces, firstArrivalsMs };
}
