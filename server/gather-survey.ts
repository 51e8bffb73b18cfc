/**
 * A shot gather's automatic picks made into a survey: a new line of one shot, or the stored
 * line with this shot added (or replaced, when the shot id is already there). Pure; the
 * route (server/routes/survey-gathers.ts) checks, interprets and stores.
 *
 * Layout rule (the same as POST /api/v1/surveys/:id/revisions, server/revision-layout.ts):
 * the gather's geophones must be the stored line's, else 409 `layout_changed` unless the
 * request confirms; when confirmed, the line's geophones become the union of both (by x,
 * within the same 1 mm tolerance), and every other shot gets no pick (null) at the
 * geophones it did not record.
 */
import type { GatherPicksResponse } from '../engine/picking/gather-picks.js';
import type { Geophone, Shot, Survey } from '../engine/survey/survey.js';
import { layoutChange, SAME_POSITION_TOLERANCE_M, type LayoutChange } from './revision-layout.js';

/** A pick the survey cannot hold (before the shot) left out, with why. */
export interface DroppedPick {
  geophoneX: number;
  timeMs: number;
}

/** The default shot id when the request names none: the shot's position (our choice). */
export function defaultShotId(shotX: number): string {
  return `x=${Number(shotX.toFixed(3))}`;
}

/**
 * The shot of the picks. A pick before the shot (negative time: a picker error in the
 * pre-trigger noise, since nothing arrives before the shot) is left out as no pick and
 * reported, rather than refusing the whole file. O(n).
 */
export function shotFromPicks(picks: GatherPicksResponse, shotId: string): { shot: Shot; dropped: DroppedPick[] } {
  const dropped: DroppedPick[] = [];
  const times = picks.times.map((t, i) => {
    if (t !== null && t < 0) {
      dropped.push({ geophoneX: picks.geophones[i].x, timeMs: t });
      return null;
    }
    return t;
  });
  return { shot: { id: shotId, x: picks.shot.x, elevation: picks.shot.elevation, times }, dropped };
}

/** A new line of this one shot. */
export function lineFromShot(picks: GatherPicksResponse, shot: Shot, name: string | undefined): Survey {
  return { ...(name === undefined ? {} : { name }), geophones: picks.geophones.map((g) => ({ ...g })), shots: [shot] };
}

/** Index of the geophone at x in a sorted list (within the tolerance), or -1. O(log n). */
function indexAt(geophones: readonly Geophone[], x: number): number {
  let lo = 0;
  let hi = geophones.length - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    const d = geophones[mid].x - x;
    if (Math.abs(d) <= SAME_POSITION_TOLERANCE_M) return mid;
    if (d < 0) lo = mid + 1;
    else hi = mid - 1;
  }
  return -1;
}

export type ExtendResult = { ok: true; survey: Survey; replaced: boolean } | { ok: false; change: LayoutChange };

/**
 * The stored line with the shot added (or the shot of the same id replaced). Refuses a
 * different layout unless `confirmed`; then merges the layouts. O((n + m) log(n + m) + shots × n).
 */
export function lineWithShot(
  stored: { revision: number; name: string; survey: Survey },
  gatherGeophones: readonly Geophone[],
  shot: Shot,
  confirmed: boolean,
): ExtendResult {
  const { survey } = stored;
  const change = layoutChange({ revision: stored.revision, name: stored.name, geophones: survey.geophones }, gatherGeophones);
  let geophones = survey.geophones;
  let shots = survey.shots;
  let shotTimes = shot.times;
  if (change !== null) {
    if (!confirmed) return { ok: false, change };
    // Union by x: the stored geophones first (their elevations kept), then the gather's new ones.
    const merged = [...survey.geophones.map((g) => ({ ...g }))];
    for (const g of gatherGeophones) if (indexAt(survey.geophones, g.x) < 0) merged.push({ ...g });
    merged.sort((a, b) => a.x - b.x);
    geophones = merged;
    const remap = (from: readonly Geophone[], times: readonly (number | null)[]): (number | null)[] => {
      const out: (number | null)[] = new Array<number | null>(merged.length).fill(null);
      from.forEach((g, i) => {
        out[indexAt(merged, g.x)] = times[i];
      });
      return out;
    };
    shots = survey.shots.map((s) => ({ ...s, times: remap(survey.geophones, s.times) }));
    shotTimes = remap(gatherGeophones, shot.times);
  }
  const newShot: Shot = { ...shot, times: shotTimes };
  const at = shots.findIndex((s) => s.id === shot.id);
  const replaced = at >= 0;
  const nextShots = replaced ? shots.map((s, i) => (i === at ? newShot : s)) : [...shots, newShot];
  return { ok: true, survey: { ...survey, geophones, shots: nextShots }, replaced };
}
