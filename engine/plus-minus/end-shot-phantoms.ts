/**
 * Phantoming of the end shots: each end shot's missing refracted arrivals on the side
 * facing the spread, from the off-end shots on that side (phantom.ts gives the shift and
 * the merge; this file chooses the sources and says when the choice is doubtful).
 */
import type { Survey } from '../survey/survey.js';
import type { ShotAnalysis, Warning } from '../output/interpretation.js';
import { refractedTimes, type Side } from '../branches/refracted-times.js';
import { timeText } from '../qc/wording.js';
import { mergePhantoms, phantomArrivals, type PhantomResult } from './phantom.js';

/**
 * Phantoming is trusted while the end and off-end branches stay parallel within this many
 * pick uncertainties (RMS of their difference). Common practice: two standard deviations.
 */
export const PHANTOM_PARALLEL_FACTOR = 2;

/** The phantoming of one end shot toward the spread. */
export interface EndShotPhantom {
  shot: ShotAnalysis;
  side: Side;
  /** Off-end shots on that side that were tried; empty when there is none. */
  candidates: string[];
  /** Main source: of the accepted candidates the one that fills most geophones, then the nearest. */
  from: ShotAnalysis | null;
  /** Merged phantom of every accepted candidate (shift and RMS those of the main source). */
  result: PhantomResult | null;
  /** Variance of each merged phantom time, ms². */
  varianceMs2: (number | null)[];
  /** Every candidate that shared enough refracted arrivals, with its parallelism check. */
  tried: { from: ShotAnalysis; result: PhantomResult; parallel: boolean; used: boolean }[];
}

/**
 * For each end shot, phantoms its missing refracted arrivals (on the side facing the
 * spread) from every off-end shot on the same side whose refracted branch runs parallel
 * to the end shot's where both were recorded (RMS of the difference within
 * PHANTOM_PARALLEL_FACTOR pick uncertainties); their phantoms are merged by inverse
 * variance (phantom.ts). With no parallel candidate, the one that fills most geophones is
 * used (and phantomWarnings says so). The main source reported is the accepted candidate
 * that fills most geophones, then the nearest. Cost: O(shots² · geophones).
 */
export function phantomEndShots(survey: Survey, shots: ShotAnalysis[], pickSigmaMs: number): EndShotPhantom[] {
  const work: EndShotPhantom[] = [];
  for (const shot of shots) {
    if (shot.position !== 'end-left' && shot.position !== 'end-right') continue;
    const side = shot.position === 'end-left' ? 'right' : 'left';
    const offEnd = shots
      .filter((s) => s.position === (side === 'right' ? 'off-end-left' : 'off-end-right'))
      .sort((p, q) => Math.abs(p.x - shot.x) - Math.abs(q.x - shot.x));
    const target = refractedTimes(survey, shot, side);
    const eligible = survey.geophones.map((g) => (side === 'right' ? g.x > shot.x : g.x < shot.x));
    const tried: EndShotPhantom['tried'] = [];
    for (const from of offEnd) {
      const result = phantomArrivals({ targetRefractedMs: target, sourceRefractedMs: refractedTimes(survey, from, side), eligible });
      if (result) tried.push({ from, result, parallel: result.parallelRmsMs <= PHANTOM_PARALLEL_FACTOR * pickSigmaMs, used: false });
    }
    const parallel = tried.filter((t) => t.parallel && t.result.phantomCount > 0);
    const fills = (t: (typeof tried)[number]): number => t.result.phantomCount;
    const accepted = parallel.length > 0 ? parallel : tried.length > 0 ? [tried.reduce((b, t) => (fills(t) > fills(b) ? t : b))] : [];
    accepted.forEach((t) => (t.used = true));
    const main = accepted.reduce<(typeof tried)[number] | null>((b, t) => (!b || fills(t) > fills(b) ? t : b), null);
    let result: PhantomResult | null = null;
    let varianceMs2: (number | null)[] = survey.geophones.map(() => null);
    if (main) {
      const merged = mergePhantoms(accepted.map((t) => t.result), pickSigmaMs);
      result = { ...main.result, timesMs: merged.timesMs, phantomCount: merged.timesMs.filter((t) => t !== null).length };
      varianceMs2 = merged.varianceMs2;
    }
    work.push({ shot, side, candidates: offEnd.map((s) => s.id), from: main?.from ?? null, result, varianceMs2, tried });
  }
  return work;
}

/** "phantom-not-parallel": one per off-end candidate whose branch is not parallel to its end shot's. */
export function phantomWarnings(phantoms: EndShotPhantom[], pickSigmaMs: number): Warning[] {
  const warnings: Warning[] = [];
  for (const p of phantoms) {
    for (const t of p.tried) {
      if (t.parallel) continue;
      warnings.push({
        code: 'phantom-not-parallel',
        message:
          `Refracted arrivals of ${t.from.id} and ${p.shot.id} are not parallel where both were recorded ` +
          `(RMS ${timeText(t.result.parallelRmsMs)} ms about the ${timeText(t.result.shiftMs)} ms shift, limit ` +
          `${timeText(PHANTOM_PARALLEL_FACTOR * pickSigmaMs)} ms). A vertical jump in the off-end branch of ${t.from.id} ` +
          `(two parallel pieces offset in time) points to a step in the refractor; a change of slope to a change of refractor velocity. ` +
          (t.used
            ? `No parallel off-end shot was found, so ${t.from.id} was used anyway and the phantomed times near ${p.shot.id} are doubtful.`
            : `${t.from.id} was not used to phantom ${p.shot.id}.`),
        x: p.shot.x,
      });
    }
  }
  return warnings;
}
