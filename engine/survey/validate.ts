/**
 * Survey validation: checks a survey document (api-v1.md, "The survey document") before the
 * engine sees it, and returns every problem found, each with a JSON pointer into the document,
 * a stable kebab-case code and a sentence a field geophysicist understands.
 *
 * On success it returns a normalised copy holding only the known fields (name, date,
 * geophones, shots, options); the input is never mutated.
 *
 * Memory and time stay bounded whatever arrives: array lengths are checked against
 * SURVEY_LIMITS before anything inside them is read, and at most MAX_PROBLEMS problems are
 * reported (then one "too-many-problems" problem says the list was cut short).
 */
import { SURVEY_LIMITS } from './survey.js';
import type { BranchOverride, Geophone, MethodName, Shot, Survey, SurveyOptions } from './survey.js';
import type { Problem } from './problem.js';

export type SurveyValidation = { survey: Survey; problems: [] } | { survey: null; problems: Problem[] };

/** Methods the contract names. */
export const KNOWN_METHODS: readonly MethodName[] = ['plus-minus', 'grm', 'time-term'];
/** Methods the engine can run today; the others are refused with "method-not-available". */
export const AVAILABLE_METHODS: readonly MethodName[] = ['plus-minus'];

/** Most problems reported for one document; enough to fix a file, small enough to send back. */
export const MAX_PROBLEMS = 100;

/** Largest allowed reciprocal tolerance, ms (options.reciprocalToleranceMs). */
export const MAX_RECIPROCAL_TOLERANCE_MS = 100;
/** Largest allowed pick uncertainty, ms (options.pickUncertaintyMs). */
export const MAX_PICK_UNCERTAINTY_MS = 20;
/** Longest free-text date accepted, characters. */
export const MAX_DATE_LENGTH = 200;

/**
 * Fastest straight-line speed a first arrival may imply, m/s. No rock met at engineering
 * depths carries P waves this fast (fresh crystalline rock is about 5–7 km/s, from memory;
 * Telford, Geldart & Sheriff 1990, ch. 4 tabulate such values), so a pick implying more is a
 * wrong time or a wrong position. Checked only from NEAREST_CHECKED_OFFSET_M outward, where
 * a one-sample pick error cannot trip it.
 */
export const MAX_IMPLIED_VELOCITY_M_PER_S = 10_000;
/** Offsets below this are not checked for implied velocity, m. */
export const NEAREST_CHECKED_OFFSET_M = 1;

class ProblemList {
  readonly items: Problem[] = [];
  full = false;

  add(path: string, code: string, message: string): void {
    if (this.full) return;
    if (this.items.length >= MAX_PROBLEMS) {
      this.items.push({
        path: '',
        code: 'too-many-problems',
        message: `Stopped after ${MAX_PROBLEMS} problems; fix these and check the survey again to see the rest.`,
      });
      this.full = true;
      return;
    }
    this.items.push({ path, code, message });
  }
}

function isObject(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/** A short, safe rendering of any value for a message. */
function show(value: unknown): string {
  if (value === undefined) return 'missing';
  if (typeof value === 'number') return Number.isNaN(value) ? 'NaN' : String(value);
  if (typeof value === 'string') {
    const cut = value.length > 40 ? `${value.slice(0, 40)}…` : value;
    return `"${cut}"`;
  }
  if (Array.isArray(value)) return `a list of ${value.length}`;
  if (value === null) return 'null';
  if (typeof value === 'object') return 'an object';
  return String(value);
}

function isFiniteNumber(value: unknown): value is number {
  return typeof value === 'number' && Number.isFinite(value);
}

function checkCoordinate(problems: ProblemList, value: unknown, path: string, what: string, required: boolean): value is number {
  // An absent elevation may also arrive as null from JSON writers that emit every key.
  if ((value === undefined || value === null) && !required) return false;
  if (!isFiniteNumber(value)) {
    const code = path.endsWith('/x') ? 'x-not-finite' : 'elevation-not-finite';
    problems.add(path, code, `${what} is ${show(value)}; it must be a finite number of metres.`);
    return false;
  }
  if (Math.abs(value) > SURVEY_LIMITS.maxCoordinateM) {
    problems.add(path, 'coordinate-too-large', `${what} is ${value} m; coordinates must lie within ±${SURVEY_LIMITS.maxCoordinateM} m.`);
    return false;
  }
  return true;
}

/** Returns the normalised geophones, or null when they cannot be used for further checks. */
function checkGeophones(problems: ProblemList, input: unknown): Geophone[] | null {
  if (!Array.isArray(input)) {
    problems.add('/geophones', 'geophones-not-array', `geophones is ${show(input)}; it must be a list of geophones, each { "x": metres along the line }.`);
    return null;
  }
  if (input.length < 2) {
    problems.add('/geophones', 'too-few-geophones', `The line has ${input.length} geophone(s); at least 2 are needed to measure any velocity.`);
    return null;
  }
  if (input.length > SURVEY_LIMITS.maxGeophones) {
    problems.add('/geophones', 'too-many-geophones', `The line has ${input.length} geophones; at most ${SURVEY_LIMITS.maxGeophones} are accepted.`);
    return null;
  }
  const out: Geophone[] = [];
  let usable = true;
  let withElevation = 0;
  for (let i = 0; i < input.length && !problems.full; i++) {
    const g = input[i];
    const path = `/geophones/${i}`;
    if (!isObject(g)) {
      problems.add(path, 'geophone-not-object', `Geophone ${i + 1} is ${show(g)}; it must be an object such as { "x": 12, "elevation": 41.3 }.`);
      usable = false;
      continue;
    }
    const xOk = checkCoordinate(problems, g.x, `${path}/x`, `Geophone ${i + 1} position x`, true);
    if (!xOk) usable = false;
    const elevOk = checkCoordinate(problems, g.elevation, `${path}/elevation`, `Geophone ${i + 1} elevation`, false);
    if (g.elevation !== undefined && g.elevation !== null) withElevation++;
    if (xOk) out.push(elevOk ? { x: g.x as number, elevation: g.elevation as number } : { x: g.x as number });
  }
  if (!usable) return null;
  for (let i = 1; i < out.length && !problems.full; i++) {
    if (!(out[i].x > out[i - 1].x)) {
      problems.add(
        `/geophones/${i}/x`,
        'x-not-increasing',
        `Geophone ${i + 1} is at x = ${out[i].x} m but geophone ${i} is at x = ${out[i - 1].x} m; geophone positions must strictly increase along the line.`,
      );
      usable = false;
    }
  }
  // Mixing geophones with and without elevation would put the missing ones at datum 0 and
  // draw a cliff of tens of metres into the section.
  if (withElevation > 0 && withElevation < input.length) {
    const missing = input.findIndex((g) => isObject(g) && (g.elevation === undefined || g.elevation === null));
    problems.add(
      `/geophones/${missing}/elevation`,
      'elevation-missing',
      `${withElevation} of ${input.length} geophones have an elevation but geophone ${missing + 1} (and maybe others) has none; give every geophone an elevation or none of them.`,
    );
    usable = false;
  }
  return usable ? out : null;
}

function checkTimes(
  problems: ProblemList,
  shot: Record<string, unknown>,
  path: string,
  label: string,
  geophoneCount: number | null,
  geophones: Geophone[] | null,
  shotX: number | null,
): (number | null)[] | null {
  const times = shot.times;
  if (!Array.isArray(times)) {
    problems.add(`${path}/times`, 'times-not-array', `${label} times is ${show(times)}; it must be a list with one first-break time (ms) or null per geophone.`);
    return null;
  }
  // Length first, so an enormous list is never walked.
  const expected = geophoneCount;
  if (expected !== null && times.length !== expected) {
    problems.add(`${path}/times`, 'times-length', `${label} has ${times.length} times but the line has ${expected} geophones; give one time (or null) per geophone.`);
    return null;
  }
  if (expected === null && times.length > SURVEY_LIMITS.maxGeophones) {
    problems.add(`${path}/times`, 'times-length', `${label} has ${times.length} times; a line has at most ${SURVEY_LIMITS.maxGeophones} geophones.`);
    return null;
  }
  const out: (number | null)[] = [];
  let ok = true;
  for (let i = 0; i < times.length && !problems.full; i++) {
    const t = times[i];
    const tPath = `${path}/times/${i}`;
    const where = geophones ? `the geophone at x = ${geophones[i].x} m` : `geophone ${i + 1}`;
    if (t === null) {
      out.push(null);
      continue;
    }
    if (typeof t !== 'number') {
      problems.add(tPath, 'time-not-number', `${label} time at ${where} is ${show(t)}; it must be a number of milliseconds, or null for no pick.`);
      ok = false;
      continue;
    }
    if (!Number.isFinite(t)) {
      problems.add(tPath, 'time-not-finite', `${label} time at ${where} is ${show(t)}; it must be a finite number of milliseconds, or null for no pick.`);
      ok = false;
      continue;
    }
    if (t < 0) {
      problems.add(tPath, 'negative-time', `${label} time at ${where} is ${t} ms; a first break cannot come before the shot, so times must be 0 ms or more.`);
      ok = false;
      continue;
    }
    if (t > SURVEY_LIMITS.maxTimeMs) {
      problems.add(tPath, 'time-too-large', `${label} time at ${where} is ${t} ms; first breaks on an engineering line arrive well within ${SURVEY_LIMITS.maxTimeMs} ms — check the units (ms, not µs).`);
      ok = false;
      continue;
    }
    if (geophones && shotX !== null) {
      const offsetM = Math.abs(geophones[i].x - shotX);
      if (offsetM >= NEAREST_CHECKED_OFFSET_M && (t === 0 || offsetM / (t / 1000) > MAX_IMPLIED_VELOCITY_M_PER_S)) {
        const implied = t === 0 ? 'an infinite speed' : `${Math.round(offsetM / (t / 1000))} m/s`;
        problems.add(
          tPath,
          'impossible-velocity',
          `${label} time at ${where} is ${t} ms, ${offsetM} m from the shot: that is ${implied}, faster than any rock (over ${MAX_IMPLIED_VELOCITY_M_PER_S} m/s); check the pick, the shot position and the trigger.`,
        );
        ok = false;
        continue;
      }
    }
    out.push(t);
  }
  return ok ? out : null;
}

/** Returns the normalised shots, or null when any shot is unusable. */
function checkShots(problems: ProblemList, input: unknown, geophoneCount: number | null, geophones: Geophone[] | null): Shot[] | null {
  if (!Array.isArray(input)) {
    problems.add('/shots', 'shots-not-array', `shots is ${show(input)}; it must be a list of shots, each { "id", "x", "times" }.`);
    return null;
  }
  if (input.length === 0) {
    problems.add('/shots', 'no-shots', 'The survey has no shots; at least one forward and one reverse shot are needed.');
    return null;
  }
  if (input.length > SURVEY_LIMITS.maxShots) {
    problems.add('/shots', 'too-many-shots', `The survey has ${input.length} shots; at most ${SURVEY_LIMITS.maxShots} are accepted.`);
    return null;
  }
  const out: Shot[] = [];
  let usable = true;
  const firstIndexOfId = new Map<string, number>();
  for (let s = 0; s < input.length && !problems.full; s++) {
    const shot = input[s];
    const path = `/shots/${s}`;
    if (!isObject(shot)) {
      problems.add(path, 'shot-not-object', `Shot ${s + 1} is ${show(shot)}; it must be an object such as { "id": "W-end", "x": -1, "times": [...] }.`);
      usable = false;
      continue;
    }
    let label = `Shot ${s + 1}`;
    const id = shot.id;
    let idOk = false;
    if (typeof id !== 'string' || id.trim() === '') {
      problems.add(`${path}/id`, 'shot-id-invalid', `Shot ${s + 1} id is ${show(id)}; every shot needs a non-empty name such as "W-off".`);
    } else if (id.length > SURVEY_LIMITS.maxShotIdLength) {
      problems.add(`${path}/id`, 'shot-id-too-long', `Shot ${s + 1} id is ${id.length} characters long; at most ${SURVEY_LIMITS.maxShotIdLength} are accepted.`);
    } else {
      label = `Shot "${id}"`;
      const earlier = firstIndexOfId.get(id);
      if (earlier !== undefined) {
        problems.add(`${path}/id`, 'duplicate-shot-id', `Shots ${earlier + 1} and ${s + 1} are both called "${id}"; shot names must be unique within the line.`);
      } else {
        firstIndexOfId.set(id, s);
        idOk = true;
      }
    }
    const xOk = checkCoordinate(problems, shot.x, `${path}/x`, `${label} position x`, true);
    const elevOk = checkCoordinate(problems, shot.elevation, `${path}/elevation`, `${label} elevation`, false);
    const elevationGiven = shot.elevation !== undefined && shot.elevation !== null;
    const times = checkTimes(problems, shot, path, label, geophoneCount, geophones, xOk ? (shot.x as number) : null);
    if (!idOk || !xOk || (elevationGiven && !elevOk) || times === null) {
      usable = false;
      continue;
    }
    if (times.every((t) => t === null)) {
      problems.add(`${path}/times`, 'shot-without-picks', `${label} has no picks at all (every time is null); remove the shot or pick its first breaks.`);
      usable = false;
      continue;
    }
    out.push(
      elevationGiven
        ? { id: id as string, x: shot.x as number, elevation: shot.elevation as number, times }
        : { id: id as string, x: shot.x as number, times },
    );
  }
  return usable ? out : null;
}

/** Picks of a shot strictly on one side of it. */
function picksOnSide(shot: Shot, geophones: Geophone[], side: 'left' | 'right'): number {
  let n = 0;
  for (let i = 0; i < geophones.length; i++) {
    if (shot.times[i] === null) continue;
    if (side === 'left' ? geophones[i].x < shot.x : geophones[i].x > shot.x) n++;
  }
  return n;
}

/**
 * Coverage rules, checked once geometry and times are sound:
 * - opposing shots: some geophone must be picked from a shot on its left and from a shot on
 *   its right (plus-minus needs forward and reverse times at the same geophone; Hagedoorn 1959);
 * - a fittable branch: at least one shot side (the geophones strictly left, or strictly right,
 *   of one shot) must hold two or more picks, or no apparent velocity can be fitted at all.
 */
function checkCoverage(problems: ProblemList, geophones: Geophone[], shots: Shot[]): void {
  const sides = shots.map((s) => ({ left: picksOnSide(s, geophones, 'left'), right: picksOnSide(s, geophones, 'right') }));
  if (!sides.some((c) => c.left >= 2 || c.right >= 2)) {
    problems.add(
      '/shots',
      'no-fittable-branch',
      'No shot has two or more picks on the same side of it, so no direct-wave or refractor velocity can be fitted; pick more first breaks.',
    );
  }
  const reachedFromLeft = new Array<boolean>(geophones.length).fill(false);
  const reachedFromRight = new Array<boolean>(geophones.length).fill(false);
  for (const shot of shots) {
    for (let i = 0; i < geophones.length; i++) {
      if (shot.times[i] === null) continue;
      if (geophones[i].x > shot.x) reachedFromLeft[i] = true;
      if (geophones[i].x < shot.x) reachedFromRight[i] = true;
    }
  }
  if (!reachedFromLeft.some((v, i) => v && reachedFromRight[i])) {
    problems.add(
      '/shots',
      'no-opposing-shots',
      'No geophone has picks from a shot on its left and from a shot on its right, so there is no forward and reverse pair to interpret; add a shot at or beyond the other end of the line.',
    );
  }
}

function isNonNegativeInteger(value: unknown): value is number {
  return typeof value === 'number' && Number.isInteger(value) && value >= 0;
}

function checkBranchOverrides(problems: ProblemList, input: unknown, shots: Shot[] | null, geophones: Geophone[] | null): BranchOverride[] | null {
  const base = '/options/branchOverrides';
  if (!Array.isArray(input)) {
    problems.add(base, 'branch-overrides-not-array', `options.branchOverrides is ${show(input)}; it must be a list of { "shot", "side", "directPicks" }.`);
    return null;
  }
  const maxOverrides = 2 * SURVEY_LIMITS.maxShots;
  if (input.length > maxOverrides) {
    problems.add(base, 'too-many-branch-overrides', `options.branchOverrides has ${input.length} entries; at most ${maxOverrides} (two sides per shot) make sense.`);
    return null;
  }
  const out: BranchOverride[] = [];
  let ok = true;
  const seen = new Map<string, number>();
  for (let k = 0; k < input.length && !problems.full; k++) {
    const o = input[k];
    const path = `${base}/${k}`;
    if (!isObject(o)) {
      problems.add(path, 'branch-override-not-object', `Branch override ${k + 1} is ${show(o)}; it must be an object such as { "shot": "W-end", "side": "right", "directPicks": 4 }.`);
      ok = false;
      continue;
    }
    let entryOk = true;
    const shot = shots ? shots.find((s) => s.id === o.shot) : undefined;
    if (typeof o.shot !== 'string' || (shots && !shot)) {
      const known = shots ? ` (shots are ${shots.map((s) => `"${s.id}"`).join(', ')})` : '';
      problems.add(`${path}/shot`, 'override-unknown-shot', `Branch override ${k + 1} names shot ${show(o.shot)}, which is not a shot of this line${known}.`);
      entryOk = false;
    }
    if (o.side !== 'left' && o.side !== 'right') {
      problems.add(`${path}/side`, 'override-side-invalid', `Branch override ${k + 1} side is ${show(o.side)}; it must be "left" or "right".`);
      entryOk = false;
    }
    if (!isNonNegativeInteger(o.directPicks)) {
      problems.add(`${path}/directPicks`, 'override-direct-picks-invalid', `Branch override ${k + 1} directPicks is ${show(o.directPicks)}; it must be a whole number of picks, 0 or more.`);
      entryOk = false;
    }
    if (o.firstRefractorPicks !== undefined && !isNonNegativeInteger(o.firstRefractorPicks)) {
      problems.add(
        `${path}/firstRefractorPicks`,
        'override-first-refractor-picks-invalid',
        `Branch override ${k + 1} firstRefractorPicks is ${show(o.firstRefractorPicks)}; it must be a whole number of picks, 0 or more.`,
      );
      entryOk = false;
    }
    if (!entryOk) {
      ok = false;
      continue;
    }
    const key = `${o.side as string}\u0000${o.shot as string}`;
    const earlier = seen.get(key);
    if (earlier !== undefined) {
      problems.add(path, 'duplicate-branch-override', `Branch overrides ${earlier + 1} and ${k + 1} both set the ${o.side as string} side of shot "${o.shot as string}"; keep one.`);
      ok = false;
      continue;
    }
    seen.set(key, k);
    if (shot && geophones) {
      const available = picksOnSide(shot, geophones, o.side as 'left' | 'right');
      for (const field of ['directPicks', 'firstRefractorPicks'] as const) {
        const n = o[field];
        if (typeof n === 'number' && n > available) {
          problems.add(
            `${path}/${field}`,
            'override-exceeds-picks',
            `Branch override ${k + 1} sets ${field} = ${n} but shot "${shot.id}" has only ${available} picks on its ${o.side as string} side.`,
          );
          ok = false;
        }
      }
    }
    const normal: BranchOverride = { shot: o.shot as string, side: o.side as 'left' | 'right', directPicks: o.directPicks as number };
    if (o.firstRefractorPicks !== undefined) normal.firstRefractorPicks = o.firstRefractorPicks as number;
    out.push(normal);
  }
  return ok ? out : null;
}

function checkOptions(problems: ProblemList, input: unknown, shots: Shot[] | null, geophones: Geophone[] | null): SurveyOptions | null {
  if (!isObject(input)) {
    problems.add('/options', 'options-not-object', `options is ${show(input)}; it must be an object such as { "layers": 2 }.`);
    return null;
  }
  // Unknown option keys are kept (the contract lets fields be added).
  const out: Record<string, unknown> = { ...input };
  let ok = true;
  if (input.layers !== undefined && input.layers !== 2 && input.layers !== 3) {
    problems.add('/options/layers', 'layers-invalid', `options.layers is ${show(input.layers)}; it must be 2 or 3 (leave it out to let the picks decide).`);
    ok = false;
  }
  const tol = input.reciprocalToleranceMs;
  if (tol !== undefined && !(isFiniteNumber(tol) && tol > 0 && tol <= MAX_RECIPROCAL_TOLERANCE_MS)) {
    problems.add(
      '/options/reciprocalToleranceMs',
      'reciprocal-tolerance-invalid',
      `options.reciprocalToleranceMs is ${show(tol)}; it must be a number of milliseconds above 0 and at most ${MAX_RECIPROCAL_TOLERANCE_MS} (a few ms is usual).`,
    );
    ok = false;
  }
  const method = input.method;
  if (method !== undefined) {
    if (typeof method !== 'string' || !(KNOWN_METHODS as readonly string[]).includes(method)) {
      problems.add('/options/method', 'method-unknown', `options.method is ${show(method)}; it must be one of ${KNOWN_METHODS.map((m) => `"${m}"`).join(', ')}.`);
      ok = false;
    } else if (!(AVAILABLE_METHODS as readonly string[]).includes(method)) {
      problems.add(
        '/options/method',
        'method-not-available',
        `options.method is "${method}", which is not available yet; only ${AVAILABLE_METHODS.map((m) => `"${m}"`).join(', ')} can be run now.`,
      );
      ok = false;
    }
  }
  if (input.residuals !== undefined && typeof input.residuals !== 'boolean') {
    problems.add('/options/residuals', 'residuals-not-boolean', `options.residuals is ${show(input.residuals)}; it must be true or false.`);
    ok = false;
  }
  const unc = input.pickUncertaintyMs;
  if (unc !== undefined && !(isFiniteNumber(unc) && unc > 0 && unc <= MAX_PICK_UNCERTAINTY_MS)) {
    problems.add(
      '/options/pickUncertaintyMs',
      'pick-uncertainty-invalid',
      `options.pickUncertaintyMs is ${show(unc)}; it must be a number of milliseconds above 0 and at most ${MAX_PICK_UNCERTAINTY_MS}.`,
    );
    ok = false;
  }
  if (input.branchOverrides !== undefined) {
    const overrides = checkBranchOverrides(problems, input.branchOverrides, shots, geophones);
    if (overrides === null) ok = false;
    else out.branchOverrides = overrides;
  }
  return ok ? (out as SurveyOptions) : null;
}

/**
 * Checks a survey document and returns every problem found (up to MAX_PROBLEMS), or a
 * normalised copy of the survey when there are none.
 *
 * @example
 * validateSurvey({ geophones: [{ x: 0 }], shots: [] }).problems[0].code // "too-few-geophones"
 */
export function validateSurvey(input: unknown): SurveyValidation {
  const problems = new ProblemList();
  if (!isObject(input)) {
    problems.add('', 'body-not-object', `The survey is ${show(input)}; it must be a JSON object with "geophones" and "shots".`);
    return { survey: null, problems: problems.items };
  }
  let name: string | undefined;
  let date: string | undefined;
  if (input.name !== undefined) {
    if (typeof input.name !== 'string') {
      problems.add('/name', 'name-not-string', `name is ${show(input.name)}; it must be text, such as "Line 3, pump-station terrace".`);
    } else if (input.name.length > SURVEY_LIMITS.maxNameLength) {
      problems.add('/name', 'name-too-long', `name is ${input.name.length} characters long; at most ${SURVEY_LIMITS.maxNameLength} are accepted.`);
    } else {
      name = input.name;
    }
  }
  if (input.date !== undefined) {
    if (typeof input.date !== 'string') {
      problems.add('/date', 'date-not-string', `date is ${show(input.date)}; it must be free text, such as "2 May, crew B".`);
    } else if (input.date.length > MAX_DATE_LENGTH) {
      problems.add('/date', 'date-too-long', `date is ${input.date.length} characters long; at most ${MAX_DATE_LENGTH} are accepted.`);
    } else {
      date = input.date;
    }
  }
  const geophones = checkGeophones(problems, input.geophones);
  // The geophone count is known whenever the list itself is sound, even if a position is bad,
  // so every shot's times can still be counted against it.
  const geophoneCount =
    Array.isArray(input.geophones) && input.geophones.length >= 2 && input.geophones.length <= SURVEY_LIMITS.maxGeophones
      ? input.geophones.length
      : null;
  const shots = checkShots(problems, input.shots, geophoneCount, geophones);
  if (geophones && shots) checkCoverage(problems, geophones, shots);
  let options: SurveyOptions | null = null;
  if (input.options !== undefined) options = checkOptions(problems, input.options, shots, geophones);

  if (problems.items.length > 0 || !geophones || !shots) return { survey: null, problems: problems.items };
  // Key order as in api-v1.md, so a normalised survey prints like the contract's example.
  const survey: Survey = {
    ...(name !== undefined ? { name } : {}),
    ...(date !== undefined ? { date } : {}),
    geophones,
    shots,
    ...(options ? { options } : {}),
  };
  return { survey, problems: [] };
}
