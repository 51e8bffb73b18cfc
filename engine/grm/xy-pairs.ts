/**
 * The opposing pairs of the plus-minus stage, re-read at one XY distance for the
 * generalised reciprocal method (Palmer, "The generalized reciprocal method of seismic
 * refraction interpretation", SEG, 1980; Palmer, Geophysics 46, 1981, 1508–1518).
 *
 * For an XY of k geophone intervals, station j has X = geophone j and Y = geophone j + k,
 * and G is midway between them: G = (x_X + x_Y)/2 (between geophones when k is odd, as in
 * Palmer 1980). The left shot A is read at Y and the right shot B at X:
 *   t_AY + t_BX − (t_AB + XY/V') = 2·t_G            (time-depth function, Palmer 1980)
 * so the plus-minus core (plus-minus/refractor-plus-times.ts) gives 2·t_G when it is handed
 * A's times at Y, and B's times at X less XY/V' (XY/V' is folded into B's times because
 * XY varies from station to station on an irregular layout; tAB stays the pair's own and
 * goes through the same joint adjustment). At k = 0 the pairs are the plus-minus pairs,
 * array for array, which is why GRM at XY = 0 is the plus-minus result.
 * Cost: O(pairs · geophones) per XY, the shot sides' arrays built once per XY and shared.
 */
import type { HeadWaveTimes, OpposingPairInput } from '../plus-minus/refractor-plus-times.js';
import { zeros } from '../shared/zeros.js';

/** The stations of one XY: G, and the XY distance at each, m. */
export interface XyStations {
  /** Index step from X to Y (XY = k geophone intervals). */
  steps: number;
  /** x of G at each station, m (ascending). */
  stationXM: number[];
  /** x_Y − x_X at each station, m. */
  xyM: number[];
  /** Geophone index of X at each station (Y is xIndex + steps). */
  xIndex: number[];
}

/** Stations j = 0 … N−1−k of an XY of k intervals. O(N). */
export function xyStations(geophoneXM: readonly number[], steps: number): XyStations {
  const stationXM: number[] = [];
  const xyM: number[] = [];
  const xIndex: number[] = [];
  for (let j = 0; j + steps < geophoneXM.length; j++) {
    const xX = geophoneXM[j];
    const xY = geophoneXM[j + steps];
    stationXM.push((xX + xY) / 2);
    xyM.push(xY - xX);
    xIndex.push(j);
  }
  return { steps, stationXM, xyM, xIndex };
}

/** A shot side's times moved to the stations: read at `offset` from X, less `lessMs(j)`. O(stations). */
function shifted(times: HeadWaveTimes, st: XyStations, offset: number, lessMs: (j: number) => number): HeadWaveTimes {
  const n = st.stationXM.length;
  const timesMs = zeros(n);
  const varianceMs2 = zeros(n);
  const phantomed: boolean[] = new Array<boolean>(n);
  for (let j = 0; j < n; j++) {
    const i = st.xIndex[j] + offset;
    timesMs[j] = times.timesMs[i] - lessMs(j);
    varianceMs2[j] = times.varianceMs2[i];
    phantomed[j] = times.phantomed[i];
  }
  return { timesMs, varianceMs2, phantomed };
}

/**
 * The pairs at one XY: A's times at Y, B's at X less XY/V'. `refractorVelocity` is V'
 * (m/s); at k = 0 the pairs are returned unchanged (no V' is needed).
 */
export function pairsAtXy(pairs: readonly OpposingPairInput[], st: XyStations, refractorVelocityMPerS: number): OpposingPairInput[] {
  if (st.steps === 0) return pairs.slice();
  // XY/V' in ms (XY in m, V' in m/s).
  const xyMs = (j: number): number => (1000 * st.xyM[j]) / refractorVelocityMPerS;
  // A shot side is shared by every pair it belongs to: each is moved once per role.
  const leftMoved = new Map<HeadWaveTimes, HeadWaveTimes>();
  const rightMoved = new Map<HeadWaveTimes, HeadWaveTimes>();
  const moved = (cache: Map<HeadWaveTimes, HeadWaveTimes>, times: HeadWaveTimes, make: () => HeadWaveTimes): HeadWaveTimes => {
    let t = cache.get(times);
    if (!t) {
      t = make();
      cache.set(times, t);
    }
    return t;
  };
  return pairs.map((p) => ({
    ...p,
    leftTimes: moved(leftMoved, p.leftTimes, () => shifted(p.leftTimes, st, st.steps, () => 0)),
    rightTimes: moved(rightMoved, p.rightTimes, () => shifted(p.rightTimes, st, 0, xyMs)),
  }));
}
