/**
 * The dominant period of a gather, in samples, from the first zero crossing of its summed
 * autocorrelation: for a sinusoid of period T the autocorrelation first crosses zero at
 * lag T/4 (a textbook property of the autocorrelation; e.g. Yilmaz, Seismic Data
 * Analysis, SEG 2001, ch. 2). Summing over traces lets the wavelet's correlation, common to
 * all traces, stand above the noise's, which is random from trace to trace. Lags are
 * computed one at a time and the scan stops at the first negative value, so the cost is
 * O(samples × T/4).
 */
export function dominantPeriodSamples(traces: readonly Float64Array[], maxLag: number): number | null {
  if (traces.length === 0) return null;
  const energy = traces.reduce((sum, x) => sum + dot(x, x, 0), 0);
  if (!(energy > 0)) return null;
  for (let lag = 1; lag <= maxLag; lag++) {
    let sum = 0;
    for (const x of traces) sum += dot(x, x, lag);
    if (sum <= 0) return 4 * lag;
  }
  return null;
}

function dot(x: Float64Array, y: Float64Array, lag: number): number {
  let sum = 0;
  for (let i = 0; i + lag < x.length; i++) sum += x[i] * y[i + lag];
  return sum;
}
