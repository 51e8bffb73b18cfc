/**
 * Phantoming: refracted arrivals an end shot did not record (near the shot its first
 * arrivals are the direct wave), stood in for by the refracted arrivals of an off-end shot
 * on the same side, shifted by a constant.
 *
 * Why a constant shift works: at a geophone G reached by head waves from both shots,
 * t(S, G) = aS + aG + L(S, G)/V2 (delay-time form; Hagedoorn, Geophysical Prospecting 7,
 * 1959). For two shots on the same side of G, L(off, G) − L(end, G) = L(off, end) does not
 * depend on G, so t(off, G) − t(end, G) = aOff − aEnd + L(off, end)/V2 is the same at every
 * such G: the two refracted branches are parallel. The mean of that difference where both
 * shots recorded refracted arrivals is the shift; its RMS about the mean is the
 * parallelism check (near zero over a smooth refractor; a jump in the difference marks a
 * step or a lateral velocity change between the two shots).
 *
 * Units: ms throughout. Inputs are per geophone, in survey order; null = not available.
 */

export interface PhantomInput {
  /** Refracted arrivals of the shot to be completed (the end shot), ms; null where it has none. */
  targetRefractedMs: (number | null)[];
  /** Refracted arrivals of the shot phantomed from (the off-end shot on the same side), ms. */
  sourceRefractedMs: (number | null)[];
  /**
   * Geophones that may receive a phantom time: those on the side of the end shot that
   * faces the spread (the side the off-end shot also looks along). Absent: all.
   */
  eligible?: boolean[];
  /** Fewest common refracted arrivals needed to trust the shift (default 2). */
  minimumOverlap?: number;
}

export interface PhantomResult {
  /** Phantomed arrivals, ms, at geophones where the target had none; null elsewhere. */
  timesMs: (number | null)[];
  /** Mean of source − target over the overlap, ms (subtracted from the source times). */
  shiftMs: number;
  /** RMS of (source − target) about its mean over the overlap, ms: the parallelism check. */
  parallelRmsMs: number;
  /** Geophones where both shots recorded refracted arrivals. */
  overlapCount: number;
  /** Geophones that received a phantom time. */
  phantomCount: number;
}

/** Default fewest common refracted arrivals for a shift (two give a mean and a spread). */
export const DEFAULT_PHANTOM_MINIMUM_OVERLAP = 2;

/**
 * Phantoms the target shot's missing refracted arrivals from the source shot.
 * Returns null when the two shots share fewer than `minimumOverlap` refracted arrivals
 * (no shift can be found) or the arrays differ in length.
 *
 * @example
 * phantomArrivals({ targetRefractedMs: [null, 12, 14], sourceRefractedMs: [20, 22, 24] })
 * // → { timesMs: [10, null, null], shiftMs: 10, parallelRmsMs: 0, overlapCount: 2, phantomCount: 1 }
 */
export function phantomArrivals(input: PhantomInput): PhantomResult | null {
  const { targetRefractedMs: target, sourceRefractedMs: source } = input;
  const minimumOverlap = Math.max(1, input.minimumOverlap ?? DEFAULT_PHANTOM_MINIMUM_OVERLAP);
  if (target.length !== source.length) return null;
  if (input.eligible && input.eligible.length !== target.length) return null;

  const differences: number[] = [];
  for (let i = 0; i < target.length; i++) {
    const t = target[i];
    const s = source[i];
    if (isTime(t) && isTime(s)) differences.push(s - t);
  }
  if (differences.length < minimumOverlap) return null;

  const shiftMs = differences.reduce((sum, d) => sum + d, 0) / differences.length;
  const parallelRmsMs = Math.sqrt(differences.reduce((sum, d) => sum + (d - shiftMs) ** 2, 0) / differences.length);

  let phantomCount = 0;
  const timesMs = target.map((t, i) => {
    const s = source[i];
    const eligible = input.eligible ? input.eligible[i] : true;
    if (isTime(t) || !isTime(s) || !eligible) return null;
    phantomCount++;
    return s - shiftMs;
  });
  return { timesMs, shiftMs, parallelRmsMs, overlapCount: differences.length, phantomCount };
}

function isTime(value: number | null | undefined): value is number {
  return typeof value === 'number' && Number.isFinite(value);
}

/**
 * Variance of one phantomed arrival, ms²: the source pick (σ²) plus the shift's variance,
 * the larger of the noise of a difference of two picks (2σ²) and the measured scatter
 * (parallelRmsMs²), over the overlap (standard error of a mean).
 */
export function phantomVarianceMs2(result: PhantomResult, pickSigmaMs: number): number {
  const scatter = Math.max(2 * pickSigmaMs * pickSigmaMs, result.parallelRmsMs * result.parallelRmsMs);
  return pickSigmaMs * pickSigmaMs + scatter / Math.max(1, result.overlapCount);
}

export interface MergedPhantom {
  /** Inverse-variance mean of the phantomed arrivals of every source at each geophone, ms. */
  timesMs: (number | null)[];
  /** Its variance, ms²; null where nothing was phantomed. */
  varianceMs2: (number | null)[];
  /** Sources that gave a time at each geophone. */
  sourceCount: number[];
}

/**
 * Phantomed arrivals from several off-end shots merged into one set: at each geophone the
 * inverse-variance mean of the sources that give a time there (each source already shifted
 * onto the end shot's branch, so all estimate the same arrival).
 */
export function mergePhantoms(results: PhantomResult[], pickSigmaMs: number): MergedPhantom {
  const n = results.length ? results[0].timesMs.length : 0;
  const merged: MergedPhantom = { timesMs: [], varianceMs2: [], sourceCount: [] };
  for (let i = 0; i < n; i++) {
    let sw = 0;
    let swt = 0;
    let count = 0;
    for (const r of results) {
      const t = r.timesMs[i];
      if (!isTime(t)) continue;
      const w = 1 / phantomVarianceMs2(r, pickSigmaMs);
      sw += w;
      swt += w * t;
      count++;
    }
    merged.timesMs.push(sw > 0 ? swt / sw : null);
    merged.varianceMs2.push(sw > 0 ? 1 / sw : null);
    merged.sourceCount.push(count);
  }
  return merged;
}
