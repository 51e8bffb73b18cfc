/**
 * Each shot side's direct-wave velocity, placed along the line: the input of V1 along the
 * line (lateral-v1.ts).
 */
import { median } from 'simple-statistics';
import type { Survey } from '../survey/survey.js';
import type { ShotAnalysis } from '../output/interpretation.js';
import { isFiniteNumber } from '../shared/numbers.js';
import { RunningMedian } from './running-median.js';
import { slownessStandardError, type DirectSide } from './lateral-v1.js';

/**
 * A direct pick further than this many pick uncertainties from the line through the
 * nearer direct picks ends a shot side's direct run (the line predicted from a few noisy
 * picks is itself uncertain, so more than the usual 3σ). Common practice.
 */
const RUN_BREAK_SIGMAS = 4;

/**
 * Each shot side's direct-wave velocity from the run of direct picks that starts at the shot
 * (stopping at the first pick of another branch: past it the first arrivals no longer
 * sample the ground next to the shot), by the Theil–Sen slope; placed at the middle of
 * that run, with its slowness standard error from the pick uncertainty or the run's own
 * scatter, whichever is larger. Runs of fewer than three picks are left out.
 * Cost: O(r² log r) per side for a run of r picks: the Theil–Sen slope (theil-sen.ts,
 * the median of all pairwise slopes) is kept up to date as picks join the run, the new
 * pick's r slopes added to a running median (running-median.ts, O(log r) each), and the
 * intercept (median of t − slope·offset) found in O(r) for each pick tested; the same
 * slopes and medians as a fit from scratch per pick (which cost O(r³)). Plus
 * O(G log G) per side to sort the picks by offset, G geophones; shots found by id
 * through one map (O(S)).
 */
export function directSides(survey: Survey, shots: ShotAnalysis[], pickSigmaMs: number): DirectSide[] {
  const out: DirectSide[] = [];
  const timesById = new Map(survey.shots.map((s) => [s.id, s.times]));
  for (const shot of shots) {
    const times = timesById.get(shot.id) ?? [];
    for (const side of ['left', 'right'] as const) {
      const picks = survey.geophones
        .map((g, i) => ({ offset: Math.abs(g.x - shot.x), x: g.x, t: times[i], b: shot.branchOfPick[i] }))
        .filter((p) => (side === 'left' ? p.x < shot.x : p.x > shot.x) && isFiniteNumber(p.t) && p.b !== null)
        .sort((p, q) => p.offset - q.offset);
      const run: { offset: number; x: number; t: number }[] = [];
      // Pairwise slopes of the run so far (Theil–Sen), kept as a running median.
      const slopes = new RunningMedian();
      const lineOf = (r: typeof run): { slope: number; intercept: number } | null => {
        const slope = slopes.median();
        return slope === null ? null : { slope, intercept: r.length > 0 ? median(r.map((p) => p.t - slope * p.offset)) : 0 };
      };
      for (const p of picks) {
        if (p.b !== 0) break;
        // A pick off the straight line of the run so far (RUN_BREAK_SIGMAS·σ) ends it: the branch code may
        // have kept a few refracted picks, or the top layer changes, beyond that point.
        const line = run.length >= 3 ? lineOf(run) : null;
        if (line && Math.abs((p.t as number) - line.intercept - line.slope * p.offset) > RUN_BREAK_SIGMAS * pickSigmaMs) break;
        const t = p.t as number;
        for (const q of run) {
          // The slope of the pair (earlier pick q, new pick p), as theilSenSlope forms it.
          const dx = p.offset - q.offset;
          if (Math.abs(dx) > 1e-9) slopes.add((t - q.t) / dx);
        }
        run.push({ offset: p.offset, x: p.x, t });
      }
      if (run.length < 3) continue;
      const fitted = lineOf(run);
      if (fitted === null || !(fitted.slope > 0)) continue;
      const { slope, intercept } = fitted;
      // Residual scatter with n − 2 degrees of freedom (a line has two parameters).
      const rms = Math.sqrt(run.reduce((sum, p) => sum + (p.t - intercept - slope * p.offset) ** 2, 0) / Math.max(1, run.length - 2));
      out.push({
        shot: shot.id,
        side,
        velocity: 1000 / slope,
        xM: (shot.x + run[run.length - 1].x) / 2,
        slownessStandardErrorMsPerM: slownessStandardError(run.map((p) => p.offset), Math.max(pickSigmaMs, rms)),
      });
    }
  }
  return out;
}
