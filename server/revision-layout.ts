/**
 * A revision must be of the same line (api-v1.md, POST /api/v1/surveys/:id/revisions): the
 * same geophones at the same positions. Picks, shots, elevations, the name and the options
 * may change (that is what a correction is); a different geophone count or positions mean
 * another line, or a spread moved on purpose, and are refused with 409 `layout_changed`
 * unless the request carries `?layoutChange=confirm`.
 */
import type { Geophone } from '../engine/survey/survey.js';
import { REPEAT_TOLERANCE_M } from '../engine/survey/csv-import.js';

/** The query parameter and value by which a request says the layout change is meant. */
export const LAYOUT_CHANGE_PARAMETER = 'layoutChange';
export const LAYOUT_CHANGE_CONFIRM = 'confirm';

/**
 * Positions closer than this are the same station, m: the pick table's own tolerance for
 * a position written on several rows (1 mm), far below any taped or surveyed spacing.
 */
export const SAME_POSITION_TOLERANCE_M = REPEAT_TOLERANCE_M;

export interface SpreadSummary {
  geophones: number;
  fromX: number;
  toX: number;
}

/** What changes between the stored line's geophones and a revision's (the 409's `layoutChange`). */
export interface LayoutChange {
  stored: SpreadSummary & { revision: number; name: string };
  sent: SpreadSummary;
  /** Geophones at another position (same count only; null when the counts differ). */
  movedGeophones: number | null;
  /** The first moved geophone, 1-based, with both positions (same count only). */
  firstMoved: { geophone: number; storedX: number; sentX: number } | null;
  /** Largest position change of a geophone, m (same count only). */
  largestShiftM: number | null;
  /** The query string that stores the revision anyway. */
  confirmWith: string;
  /** The change in words, one sentence: quoted by the 409 message and shown by the page as it is. */
  description: string;
}

function spread(geophones: readonly Geophone[]): SpreadSummary {
  return { geophones: geophones.length, fromX: geophones[0]?.x ?? 0, toX: geophones[geophones.length - 1]?.x ?? 0 };
}

/**
 * Positions as a field sheet writes them: at most 3 decimals, no trailing zeros. Not the
 * display rules' 0.1 m on purpose: a geophone moved by a few millimetres (more than the 1 mm
 * tolerance) must not read as "from 12.0 m to 12.0 m".
 */
function metres(value: number): string {
  return `${Number(value.toFixed(3))} m`;
}

/** "24 geophones from x = 0 m to 69 m, every 3 m" (the spacing named only when it is regular). O(n). */
function describeSpread(geophones: readonly Geophone[]): string {
  const s = spread(geophones);
  if (s.geophones < 2) return s.geophones === 1 ? `1 geophone at x = ${metres(s.fromX)}` : 'no geophones';
  const spacing = (s.toX - s.fromX) / (s.geophones - 1);
  const regular = geophones.every((g, i) => Math.abs(g.x - (s.fromX + i * spacing)) <= SAME_POSITION_TOLERANCE_M);
  return `${s.geophones} geophones from x = ${metres(s.fromX)} to ${metres(s.toX)}, ${regular ? `every ${metres(spacing)}` : 'irregularly spaced'}`;
}

/**
 * The layout change from the stored geophones to the sent ones, or null when they are the
 * same line (same count, every position within SAME_POSITION_TOLERANCE_M). O(n).
 *
 * `description` is the one text that says what changes: the 409's message quotes it and the
 * page's question before storing shows it as it is (web/app.js), so the two never differ.
 */
export function layoutChange(
  stored: { revision: number; name: string; geophones: readonly Geophone[] },
  sentGeophones: readonly Geophone[],
): LayoutChange | null {
  const before = spread(stored.geophones);
  const after = spread(sentGeophones);
  const base = { stored: { ...before, revision: stored.revision, name: stored.name }, sent: after, confirmWith: `${LAYOUT_CHANGE_PARAMETER}=${LAYOUT_CHANGE_CONFIRM}` };
  const both = `The new revision has ${describeSpread(sentGeophones)}; revision ${stored.revision} of the stored line has ${describeSpread(stored.geophones)}`;
  if (before.geophones !== after.geophones) {
    return { ...base, movedGeophones: null, firstMoved: null, largestShiftM: null, description: `${both}.` };
  }
  let moved = 0;
  let largest = 0;
  let first: LayoutChange['firstMoved'] = null;
  const shifts = new Set<string>();
  stored.geophones.forEach((g, i) => {
    const shift = sentGeophones[i].x - g.x;
    if (Math.abs(shift) <= SAME_POSITION_TOLERANCE_M) return;
    moved++;
    largest = Math.max(largest, Math.abs(shift));
    shifts.add(shift.toFixed(3));
    first ??= { geophone: i + 1, storedX: g.x, sentX: sentGeophones[i].x };
  });
  if (first === null) return null;
  const { geophone, storedX, sentX } = first as NonNullable<LayoutChange['firstMoved']>;
  const detail =
    moved === before.geophones && shifts.size === 1
      ? `all ${moved} geophones are moved by ${sentX - storedX > 0 ? '+' : ''}${metres(sentX - storedX)}`
      : `${moved === 1 ? 'one' : moved} of the ${after.geophones} geophones ${moved === 1 ? 'is at another position' : 'are at other positions'}: ` +
        `geophone ${geophone} at x = ${metres(sentX)} (stored: ${metres(storedX)})` +
        (moved > 1 ? `, and the largest move is ${metres(largest)}` : '');
  return { ...base, movedGeophones: moved, firstMoved: first, largestShiftM: Number(largest.toFixed(3)), description: `${both}: ${detail}.` };
}

/** The 409 message: what changes (the description, word for word), which line, and the two ways on. */
export function layoutChangeMessage(change: LayoutChange): string {
  return (
    `${change.description} That is not the same geophone layout as revision ${change.stored.revision} of "${change.stored.name}", so nothing was stored. ` +
    `If this is another line, store it as a new line (POST /api/v1/surveys); ` +
    `if the layout is meant to change, send the revision again with ?${change.confirmWith}.`
  );
}
