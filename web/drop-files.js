// Pure helpers of the seismograph-file drop (web/gather-drop.js): which files are taken, the
// shot id each file gets, the route each upload goes to, and the words of each file's state.
// No DOM; the unit tests call them (tests/web/drop-files.test.ts).

import { LOW_PICK_CONFIDENCE } from './gather-plot.js';

/** File name endings taken as SEG-2 (what seismographs and their software commonly write; common practice). */
export const SEG2_EXTENSIONS = Object.freeze(['.sg2', '.seg2', '.dat']);

/** Longest shot id the service takes (SURVEY_LIMITS.maxShotIdLength). */
export const MAX_SHOT_ID_LENGTH = 40;

/** Demo A's seismograph files, served at samples/<name> (server/demo-gathers-route.ts), in shot order along the line. */
export const DEMO_GATHER_FILES = Object.freeze(['demo-line-W-off.sg2', 'demo-line-W-end.sg2', 'demo-line-mid.sg2', 'demo-line-E-end.sg2', 'demo-line-E-off.sg2']);

/** The name of the line the demo files make. */
export const DEMO_GATHER_LINE_NAME = 'Demo A from seismograph files';

/** @param {string} name */
export function isSeg2Name(name) {
  const lower = name.toLowerCase();
  return SEG2_EXTENSIONS.some((ext) => lower.endsWith(ext) && lower.length > ext.length);
}

/** The name without its extension. @param {string} name */
export function stemOf(name) {
  const dot = name.lastIndexOf('.');
  return dot > 0 ? name.slice(0, dot) : name;
}

/**
 * The longest start every stem shares, cut back to a separator (-, _, space or .) so a
 * shared "shot1" of "shot10" and "shot11" is not cut into. O(stems × length).
 * @param {string[]} stems
 */
export function sharedPrefix(stems) {
  if (stems.length < 2) return '';
  let end = 0;
  const first = stems[0];
  while (end < first.length && stems.every((s) => s.length > end && s[end] === first[end])) end += 1;
  const prefix = first.slice(0, end);
  const cut = Math.max(prefix.lastIndexOf('-'), prefix.lastIndexOf('_'), prefix.lastIndexOf(' '), prefix.lastIndexOf('.'));
  return cut < 0 ? '' : prefix.slice(0, cut + 1);
}

/**
 * The shot id of each file: its name without the extension and without the start all the
 * dropped files share ("line3-shot01.sg2", "line3-shot02.sg2" → "shot01", "shot02"), at most
 * 40 characters; a repeated id gets " (2)", " (3)" so no file replaces another of the same
 * drop. Ids already in the line are kept as they are: a file of the same shot id replaces
 * that shot (the service's rule), which is how a re-shot is brought in. O(files × length).
 * @param {string[]} names
 * @returns {string[]}
 */
export function shotIdsFor(names) {
  const stems = names.map(stemOf);
  const prefix = sharedPrefix(stems);
  /** @type {Map<string, number>} */
  const seen = new Map();
  return stems.map((stem) => {
    const rest = stem.slice(prefix.length).trim();
    const base = (rest === '' ? stem.trim() || 'shot' : rest).slice(0, MAX_SHOT_ID_LENGTH);
    const count = (seen.get(base) ?? 0) + 1;
    seen.set(base, count);
    if (count === 1) return base;
    const suffix = ' (' + count + ')';
    return base.slice(0, MAX_SHOT_ID_LENGTH - suffix.length) + suffix;
  });
}

/**
 * The line name proposed for a drop: the start the files share, without its trailing
 * separator ("line3-" → "line3"); one file's own name without its extension; else "" (the
 * service then stores the line unnamed).
 * @param {string[]} names
 */
export function lineNameFor(names) {
  const stems = names.map(stemOf);
  const shared = stems.length === 1 ? stems[0] : sharedPrefix(stems);
  return shared.replace(/[-_ .]+$/, '').trim().slice(0, 200);
}

/**
 * The route of one upload: a new line (POST api/v1/surveys/gathers) or the line `lineId`
 * extended (POST api/v1/surveys/:id/gathers), with the shot id, the name and reviewer when
 * given, and positions the file lacks (`overrides`: shotX, geophoneX0, geophoneSpacing, m).
 * Relative, like every path of the page (api.js).
 * `confirmLayout` adds `layoutChange=confirm` (a file whose geophones are not the line's is
 * added anyway, the layouts merged).
 * @param {{ lineId: string, shotId: string, name?: string, author?: string, overrides?: Record<string, number>, confirmLayout?: boolean }} target
 */
export function uploadPath(target) {
  const query = ['shotId=' + encodeURIComponent(target.shotId)];
  if (target.lineId !== '' && target.confirmLayout) query.push('layoutChange=confirm');
  if (target.lineId === '' && target.name) query.push('name=' + encodeURIComponent(target.name));
  if (target.author) query.push('author=' + encodeURIComponent(target.author));
  for (const [key, value] of Object.entries(target.overrides ?? {})) {
    if (Number.isFinite(value)) query.push(encodeURIComponent(key) + '=' + encodeURIComponent(String(value)));
  }
  const base = target.lineId === '' ? 'api/v1/surveys/gathers' : 'api/v1/surveys/' + encodeURIComponent(target.lineId) + '/gathers';
  return base + '?' + query.join('&');
}

/**
 * The positions to ask for when the service says a file lacks them: its error's `path` names
 * the query parameter that supplies the missing header (server/routes/gathers.ts, seg2Error).
 * @param {string} path
 * @returns {{ key: string, label: string }[]}
 */
export function missingPositions(path) {
  if (path === '/shotX') return [{ key: 'shotX', label: 'Shot x (m)' }];
  if (path === '/geophoneX0') return [{ key: 'geophoneX0', label: 'First geophone x (m)' }, { key: 'geophoneSpacing', label: 'Geophone spacing (m)' }];
  return [];
}

/**
 * What a stored file says: its picks and how many of them to check first.
 * @param {{ times: (number|null)[], confidence: number[] }} picks
 * @param {string} shotId
 */
export function storedFileText(picks, shotId) {
  const picked = picks.times.filter((t) => t !== null).length;
  const low = picks.times.filter((t, i) => t !== null && picks.confidence[i] < LOW_PICK_CONFIDENCE).length;
  return 'Stored as shot ' + shotId + ': ' + picked + ' of ' + picks.times.length + ' traces picked' + (low > 0 ? ', ' + low + ' with low confidence to check' : '') + '.';
}

/**
 * The percentage of an upload sent, 0–100, whole.
 * @param {number} loaded
 * @param {number} total
 */
export function percentSent(loaded, total) {
  if (!(total > 0)) return 0;
  return Math.max(0, Math.min(100, Math.floor((100 * loaded) / total)));
}

/**
 * The progress line of a drop under way: files done of the total, and the file now going.
 * @param {number} done files finished (stored or refused)
 * @param {number} total SEG-2 files in the drop
 * @param {string} current name of the file being sent, '' when none
 */
export function progressText(done, total, current) {
  const head = done + ' of ' + total + (total === 1 ? ' file' : ' files') + ' done';
  return current === '' ? head + '.' : head + '. Now: ' + current + '.';
}

/**
 * Whether a cancelled upload that made a new line was stored all the same (the service had
 * finished it before the cancel reached it): the id of a line listed now, not before, of
 * that name; null when there is none. O(lines).
 * @param {string[]} idsBefore the stored lines' ids before the upload
 * @param {{ id: string, name?: string }[]} listedNow
 * @param {string} name the new line's name ('' when unnamed)
 * @returns {string | null}
 */
export function landedNewLine(idsBefore, listedNow, name) {
  const before = new Set(idsBefore);
  const match = listedNow.find((line) => !before.has(line.id) && (name === '' || line.name === name));
  return match === undefined ? null : match.id;
}

/**
 * Whether a cancelled upload into a stored line was stored all the same: the line has a
 * revision after `revisionBefore` that brought a file of this shot id. O(gathers).
 * @param {number} revisionBefore the line's latest revision before the upload
 * @param {{ latestRevision?: number, gathers?: { shotId: string, revision: number }[] }} lineNow
 * @param {string} shotId
 */
export function landedInLine(revisionBefore, lineNow, shotId) {
  if (!((lineNow.latestRevision ?? 0) > revisionBefore)) return false;
  return (lineNow.gathers ?? []).some((g) => g.shotId === shotId && g.revision > revisionBefore);
}

/**
 * What the panel says once a drop is cancelled: what is stored (it stays stored), what
 * became of the file that was going, and how many were not sent.
 * @param {{ stored: number, lineName: string, current: string, currentStored: boolean | null, notSent: number }} c
 *   stored: files stored before the cancel; current: the file that was going ('' when none);
 *   currentStored: whether the service had stored it all the same (null: it could not be checked)
 */
export function cancelledText(c) {
  const files = (/** @type {number} */ n) => n + (n === 1 ? ' file' : ' files');
  const line = c.lineName === '' ? 'the line' : 'the line “' + c.lineName + '”';
  const kept = c.stored + (c.currentStored === true ? 1 : 0);
  const parts = ['Cancelled.'];
  if (c.current !== '') {
    if (c.currentStored === true) parts.push(c.current + ' had already been stored when the cancel reached the service.');
    else if (c.currentStored === false) parts.push(c.current + ' was not stored.');
    else parts.push('Whether ' + c.current + ' was stored could not be checked (the service did not answer): look at the line\'s revisions.');
  }
  parts.push(kept === 0 ? 'Nothing was stored.' : files(kept) + (kept === 1 ? ' is stored and stays' : ' are stored and stay') + ' stored in ' + line + '.');
  if (c.notSent > 0) parts.push(files(c.notSent) + (c.notSent === 1 ? ' was' : ' were') + ' not sent.');
  return parts.join(' ');
}
