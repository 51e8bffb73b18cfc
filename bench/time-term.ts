/**
 * Time-term inversion at the size issue 13 names: a rolling line of 960 geophones and 120
 * shots, each recorded by 48 live geophones (bench/lines.ts, closed-form first arrivals over
 * a flat refractor, rounded to 0.1 ms); the head-wave picks are those later than nothing
 * but the head wave (slower than the direct wave would reach). Prints the wall median of 5
 * inversions, the unknowns and picks, and the memory its result holds (heap and array
 * buffers after a full collection, less before one; `npm run bench` gives --expose-gc).
 */
import { invertTimeTerms, type TimeTermObservation } from '../engine/time-term/time-terms.js';
import { rollingBenchLine } from './lines.js';

const V1 = 600;

export function timeTermBench(): void {
  const survey = rollingBenchLine(960, 120, 48);
  const gx = survey.geophones.map((g) => g.x);
  const sx = survey.shots.map((s) => s.x);
  const observations: TimeTermObservation[] = [];
  survey.shots.forEach((shot, i) => {
    shot.times.forEach((t, j) => {
      // A head-wave pick arrives before the direct wave could: t < offset/V1.
      if (t !== null && t + 0.05 < (1000 * Math.abs(gx[j] - shot.x)) / V1) observations.push({ shot: i, geophone: j, timeMs: t });
    });
  });
  const input = { geophoneXsM: gx, shotXsM: sx, observations, pickSigmaMs: 0.3 };
  invertTimeTerms(input);
  const times: number[] = [];
  for (let r = 0; r < 5; r++) {
    const t0 = performance.now();
    invertTimeTerms(input);
    times.push(performance.now() - t0);
  }
  const gc = (globalThis as { gc?: () => void }).gc;
  gc?.();
  const before = process.memoryUsage();
  const out = invertTimeTerms(input);
  gc?.();
  const after = process.memoryUsage();
  const grownMb = (after.heapUsed - before.heapUsed + after.arrayBuffers - before.arrayBuffers) / 2 ** 20;
  times.sort((a, b) => a - b);
  const detail = out.ok ? `${out.unknowns} unknowns, ${out.count} head-wave picks, V2 ${out.segments[0].velocityMPerS.toFixed(0)} m/s, RMS ${out.rmsMs.toFixed(3)} ms` : `not solved: ${out.reason}`;
  console.log(`Time-term inversion, rolling 960 geophones × 120 shots (48 live): wall median ${times[2].toFixed(1)} ms (min ${times[0].toFixed(1)}, max ${times[4].toFixed(1)}); ${detail}; memory held by the result ≈ ${grownMb.toFixed(1)} MB${gc ? '' : ' (no --expose-gc: not measured)'}`);
}
