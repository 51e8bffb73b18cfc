/**
 * The picks of one side of a shot, ordered outward from the shot by offset.
 * Offset is the horizontal distance along the line, |x − shot x| in m: elevation
 * differences are ignored here (the plus-minus step deals with topography).
 */
import type { Survey } from '../survey/survey.js';

export type Side = 'left' | 'right';

export interface SidePick {
  /** Index of the geophone in survey.geophones. */
  geophone: number;
  x: number;
  offsetM: number;
  timeMs: number;
}

/** Offsets closer than this (m) count as "at the shot": the pick is on neither side. */
export const AT_SHOT_TOLERANCE_M = 1e-6;

export function sidePicks(survey: Survey, shotIndex: number, side: Side): SidePick[] {
  const shot = survey.shots[shotIndex];
  const picks: SidePick[] = [];
  survey.geophones.forEach((g, i) => {
    const t = shot.times[i];
    if (t === null || t === undefined || !Number.isFinite(t)) return;
    const d = g.x - shot.x;
    if (Math.abs(d) <= AT_SHOT_TOLERANCE_M) return;
    if ((side === 'left') !== d < 0) return;
    picks.push({ geophone: i, x: g.x, offsetM: Math.abs(d), timeMs: t });
  });
  return picks.sort((a, b) => a.offsetM - b.offsetM);
}
