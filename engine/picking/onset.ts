/**
 * Onset of the first arrival on one trace: a coarse onset from an energy ratio, refined
 * with the Akaike information criterion computed directly from the trace.
 *
 * Energy ratio (common practice in first-break picking; e.g. Han, Wong & Bancroft, CREWES
 * Report 21, 2009, for its "modified" form): ER(i) = mean(x²[i, i+L/2)) / mean(x²[i−L, i)),
 * largest just where a window of signal follows a window of noise. We use plain means so
 * the "before" window may be shortened near the start of the record.
 *
 * AIC picker (Maeda, J. Seismol. Soc. Japan 38, 1985, 365–379), for a window x[0..N):
 *   AIC(k) = k·ln(var(x[0..k])) + (N − k − 1)·ln(var(x[k+1..N)))
 * whose minimum splits the window into two stationary parts, noise before and signal after;
 * the onset is the first sample of the second part. Variances from running sums: O(N).
 */

/**
 * Floor of variances and energies, relative to the window's own variance, so a perfectly
 * flat stretch (exact zeros before the arrival on a noise-free trace) gives a steady finite
 * log instead of one set by rounding. Our choice.
 */
const RELATIVE_FLOOR = 1e-12;

/**
 * Share of the largest rise of the energy ratio above 1 (its level on noise alone) that the
 * first arrival's must reach: the coarse onset is the largest ratio within one window after
 * the first sample reaching this share, so a later, stronger arrival (the direct wave
 * beyond the crossover) does not win, and noise alone rarely does. Our choice.
 */
export const FIRST_ONSET_SHARE = 0.4;

/** Coarse onset: the first strong maximum of the energy ratio with windows of L samples, or -1. O(n). */
export function energyRatioOnset(x: Float64Array, windowSamples: number, from = 0, to = x.length): number {
  const L = Math.max(2, Math.round(windowSamples));
  const n = x.length;
  const sq = new Float64Array(n + 1);
  for (let i = 0; i < n; i++) sq[i + 1] = sq[i] + x[i] * x[i];
  // The signal window spans the first lobe (half a period: a longer one dilutes it with the
  // quieter part of the wavelet); the noise window a whole period, for a steadier level.
  const after = Math.max(2, Math.round(L / 2));
  const minBefore = Math.max(2, Math.round(L / 2));
  const floor = RELATIVE_FLOOR * (sq[n] / Math.max(1, n)) + Number.MIN_VALUE;
  const start = Math.max(minBefore, from);
  const end = Math.min(n - 2, to);
  if (end <= start) return -1;
  const ratios = new Float64Array(end - start);
  let largest = 0;
  for (let i = start; i < end; i++) {
    const a0 = Math.max(0, i - L);
    const b1 = Math.min(n, i + after);
    const before = (sq[i] - sq[a0]) / (i - a0);
    const ratio = (sq[b1] - sq[i]) / (b1 - i) / (before + floor);
    ratios[i - start] = ratio;
    if (ratio > largest) largest = ratio;
  }
  let first = 0;
  while (first < ratios.length && ratios[first] - 1 < FIRST_ONSET_SHARE * (largest - 1)) first++;
  let best = first;
  for (let j = first; j < Math.min(ratios.length, first + L); j++) if (ratios[j] > ratios[best]) best = j;
  return start + best;
}

/**
 * Maeda's AIC onset within x[from, to): the index of the first sample after the split.
 * Returns -1 when the window is too short (under 6 samples). O(to − from).
 */
export function aicOnset(x: Float64Array, from: number, to: number): number {
  const a = Math.max(0, from);
  const b = Math.min(x.length, to);
  const N = b - a;
  if (N < 6) return -1;
  const s1 = new Float64Array(N + 1);
  const s2 = new Float64Array(N + 1);
  for (let i = 0; i < N; i++) {
    const v = x[a + i];
    s1[i + 1] = s1[i] + v;
    s2[i + 1] = s2[i] + v * v;
  }
  const raw = (i: number, j: number): number => {
    const m = j - i;
    const mean = (s1[j] - s1[i]) / m;
    return (s2[j] - s2[i]) / m - mean * mean;
  };
  const floor = RELATIVE_FLOOR * Math.max(0, raw(0, N)) + Number.MIN_VALUE;
  const variance = (i: number, j: number): number => Math.max(floor, raw(i, j));
  let best = -1;
  let bestAic = Infinity;
  // k samples before the split (indices 0..k-1 of the window), the rest after; at least 2 on each side.
  for (let k = 2; k <= N - 2; k++) {
    const aic = k * Math.log(variance(0, k)) + (N - k - 1) * Math.log(variance(k, N));
    if (aic < bestAic) {
      bestAic = aic;
      best = k;
    }
  }
  return a + best;
}

/** RMS of x[from, to) (clipped to the trace); 0 for an empty range. O(to − from). */
export function rms(x: Float64Array, from: number, to: number): number {
  const a = Math.max(0, from);
  const b = Math.min(x.length, to);
  if (b <= a) return 0;
  let sum = 0;
  for (let i = a; i < b; i++) sum += x[i] * x[i];
  return Math.sqrt(sum / (b - a));
}

/**
 * The pick moved back to the zero crossing that starts the first lobe, as a first break is
 * placed by hand at the first departure from the zero line (common practice): the lobe's
 * sign is that of the largest sample within half a period after the AIC onset k, and the
 * pick walks back from k while samples keep that sign, at most a quarter period (so noise
 * cannot carry it far). O(period).
 */
export function backToZeroCrossing(x: Float64Array, k: number, periodSamples: number): number {
  const half = Math.max(1, Math.round(periodSamples / 2));
  let peak = k;
  for (let i = k; i < Math.min(x.length, k + half); i++) if (Math.abs(x[i]) > Math.abs(x[peak])) peak = i;
  const sign = Math.sign(x[peak]);
  if (sign === 0) return k;
  const limit = Math.max(0, k - Math.max(1, Math.round(periodSamples / 4)));
  let j = k;
  while (j - 1 >= limit && Math.sign(x[j - 1]) === sign) j--;
  return j;
}
