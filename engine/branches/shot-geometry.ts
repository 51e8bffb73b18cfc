/**
 * Where a shot sits on the spread: its elevation, its position class (off an end, at an
 * end, inside) and the nominal geophone spacing used for those decisions. Units: m.
 */
import type { Geophone, Shot } from '../survey/survey.js';
import type { ShotAnalysis } from '../output/interpretation.js';

/** Median spacing between neighbouring geophones, m (0 for a single geophone). */
export function geophoneSpacingM(geophones: Geophone[]): number {
  const gaps: number[] = [];
  for (let i = 1; i < geophones.length; i++) gaps.push(geophones[i].x - geophones[i - 1].x);
  if (gaps.length === 0) return 0;
  gaps.sort((a, b) => a - b);
  const mid = Math.floor(gaps.length / 2);
  return gaps.length % 2 ? gaps[mid] : (gaps[mid - 1] + gaps[mid]) / 2;
}

/**
 * Shot elevation, m: the given one; else linear interpolation between the geophone
 * elevations (absent geophone elevation = datum 0), held constant beyond the ends.
 */
export function shotElevationM(shot: Shot, geophones: Geophone[]): number {
  if (shot.elevation !== undefined) return shot.elevation;
  if (geophones.length === 0) return 0;
  const z = (g: Geophone): number => g.elevation ?? 0;
  if (shot.x <= geophones[0].x) return z(geophones[0]);
  const last = geophones[geophones.length - 1];
  if (shot.x >= last.x) return z(last);
  for (let i = 1; i < geophones.length; i++) {
    const a = geophones[i - 1];
    const b = geophones[i];
    if (shot.x <= b.x) return z(a) + ((z(b) - z(a)) * (shot.x - a.x)) / (b.x - a.x);
  }
  return z(last);
}

/**
 * Position class: 'off-end-left' when the shot lies left of the first geophone by more
 * than half a spacing, 'end-left' within half a spacing of it; the same on the right;
 * 'inside' otherwise.
 */
export function shotPosition(shotX: number, geophones: Geophone[]): ShotAnalysis['position'] {
  const half = geophoneSpacingM(geophones) / 2;
  const first = geophones[0].x;
  const last = geophones[geophones.length - 1].x;
  if (shotX < first - half) return 'off-end-left';
  if (Math.abs(shotX - first) <= half) return 'end-left';
  if (shotX > last + half) return 'off-end-right';
  if (Math.abs(shotX - last) <= half) return 'end-right';
  return 'inside';
}
