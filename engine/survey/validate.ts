/**
 * Survey validation: checks a survey document (api-v1.md, "The survey document") before the
 * engine sees it, and returns every problem found, each with a JSON pointer into the document,
 * a stable kebab-case code and a sentence a field geophysicist understands.
 *
 * Three passes, whose problems are merged in document order:
 * 1. limits, first: every array length against SURVEY_LIMITS (and each shot's times against
 *    the geophone count) before anything inside it is read, so an enormous list is never
 *    walked;
 * 2. shape: the JSON Schema of the survey (`engine/schemas/survey.ts`, the same schema the
 *    service's routes declare), its refusals worded by `shape-problems.ts`;
 * 3. rules the schema cannot say, on the parts that passed 1 and 2: increasing x, elevations
 *    on all geophones or none, unique shot ids, shots with picks, implied velocities,
 *    coverage, methods not available yet, branch overrides against shots and pick counts.
 * At most MAX_PROBLEMS problems are reported (then one "too-many-problems" says the list
 * was cut short).
 *
 * On success it returns a normalised copy holding only the known fields (name, date,
 * geophones, shots, options; unknown option keys are kept; null elevations dropped); the
 * input is never mutated.
 */
import { SURVEY_LIMITS } from './survey.js';
import type { BranchOverride, Geophone, Shot, Survey, SurveyOptions } from './survey.js';
import { AVAILABLE_METHODS } from './options.js';
import type { Problem } from './problem.js';
import { SurveySchema, ShotSchema, SurveyOptionsSchema, BranchOverrideSchema, GeophoneSchema } from '../schemas/survey.js';
import { isObject, shapeProblems, shotLabel, show } from './shape-problems.js';

export type SurveyValidation = { survey: Survey; problems: [] } | { survey: null; problems: Problem[] };

/** Most problems reported for one document; enough to fix a file, small enough to send back. */
export const MAX_PROBLEMS = 100;

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

const MAX_BRANCH_OVERRIDES = 2 * SURVEY_LIMITS.maxShots;

/**
 * Pass 1. Length problems, and the document the schema may walk: every list that is too long
 * (or, for times, of the wrong length) replaced by an empty one. Shallow copies only.
 */
function checkLimits(input: Record<string, unknown>): { problems: Problem[]; walkable: Record<string, unknown> } {
  const problems: Problem[] = [];
  const walkable: Record<string, unknown> = { ...input };
  const geophones = input.geophones;
  let geophoneCount: number | null = null;
  if (Array.isArray(geophones)) {
    if (geophones.length < 2) {
      problems.push({ path: '/geophones', code: 'too-few-geophones', message: `The line has ${geophones.length} geophone(s); at least 2 are needed to measure any velocity.` });
    } else if (geophones.length > SURVEY_LIMITS.maxGeophones) {
      problems.push({ path: '/geophones', code: 'too-many-geophones', message: `The line has ${geophones.length} geophones; at most ${SURVEY_LIMITS.maxGeophones} are accepted.` });
      walkable.geophones = [];
    } else {
      geophoneCount = geophones.length;
    }
  }
  const shots = input.shots;
  if (Array.isArray(shots)) {
    if (shots.length === 0) {
      problems.push({ path: '/shots', code: 'no-shots', message: 'The survey has no shots; at least one forward and one reverse shot are needed.' });
    } else if (shots.length > SURVEY_LIMITS.maxShots) {
      problems.push({ path: '/shots', code: 'too-many-shots', message: `The survey has ${shots.length} shots; at most ${SURVEY_LIMITS.maxShots} are accepted.` });
      walkable.shots = [];
    } else {
      walkable.shots = shots.map((shot: unknown, s) => {
        if (!isObject(shot) || !Array.isArray(shot.times)) return shot;
        const n = shot.times.length;
        const label = shotLabel(input, s);
        const path = `/shots/${s}/times`;
        if (geophoneCount !== null && n !== geophoneCount) {
          problems.push({ path, code: 'times-length', message: `${label} has ${n} times but the line has ${geophoneCount} geophones; give one time (or null) per geophone.` });
        } else if (geophoneCount === null && n > SURVEY_LIMITS.maxGeophones) {
          problems.push({ path, code: 'times-length', message: `${label} has ${n} times; a line has at most ${SURVEY_LIMITS.maxGeophones} geophones.` });
        } else {
          return shot;
        }
        return { ...shot, times: [] };
      });
    }
  }
  const options = input.options;
  if (isObject(options) && Array.isArray(options.branchOverrides) && options.branchOverrides.length > MAX_BRANCH_OVERRIDES) {
    problems.push({
      path: '/options/branchOverrides',
      code: 'too-many-branch-overrides',
      message: `options.branchOverrides has ${options.branchOverrides.length} entries; at most ${MAX_BRANCH_OVERRIDES} (two sides per shot) make sense.`,
    });
    walkable.options = { ...options, branchOverrides: [] };
  }
  return { problems, walkable };
}

/** Problems found so far, asked "is anything wrong at or below this pointer?". */
class Found {
  constructor(private readonly problems: Problem[]) {}
  clean(pointer: string): boolean {
    return !this.problems.some((p) => p.path === pointer || p.path.startsWith(`${pointer}/`));
  }
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

/** Geophones as the engine takes them (null elevations dropped). */
function normalGeophones(input: unknown[]): Geophone[] {
  return input.map((raw) => {
    const g = raw as { x: number; elevation?: number | null };
    return g.elevation === undefined || g.elevation === null ? { x: g.x } : { x: g.x, elevation: g.elevation };
  });
}

function normalShot(raw: unknown): Shot {
  const s = raw as { id: string; x: number; elevation?: number | null; times: (number | null)[] };
  const times = [...s.times];
  return s.elevation === undefined || s.elevation === null ? { id: s.id, x: s.x, times } : { id: s.id, x: s.x, elevation: s.elevation, times };
}

/** Pass 3 for the geophones: strictly increasing x, and elevations on all or none. */
function geophoneRules(geophones: Geophone[], problems: Problem[]): boolean {
  const before = problems.length;
  for (let i = 1; i < geophones.length; i++) {
    if (!(geophones[i].x > geophones[i - 1].x)) {
      problems.push({
        path: `/geophones/${i}/x`,
        code: 'x-not-increasing',
        message: `Geophone ${i + 1} is at x = ${geophones[i].x} m but geophone ${i} is at x = ${geophones[i - 1].x} m; geophone positions must strictly increase along the line.`,
      });
    }
  }
  // Mixing geophones with and without elevation would put the missing ones at datum 0 and
  // draw a cliff of tens of metres into the section.
  const withElevation = geophones.filter((g) => g.elevation !== undefined).length;
  if (withElevation > 0 && withElevation < geophones.length) {
    const missing = geophones.findIndex((g) => g.elevation === undefined);
    problems.push({
      path: `/geophones/${missing}/elevation`,
      code: 'elevation-missing',
      message: `${withElevation} of ${geophones.length} geophones have an elevation but geophone ${missing + 1} (and maybe others) has none; give every geophone an elevation or none of them.`,
    });
  }
  return problems.length === before;
}

/** Pass 3 for one shot's picks: a first arrival faster than any rock. */
function impliedVelocityRule(shot: Shot, s: number, label: string, geophones: Geophone[], problems: Problem[]): void {
  shot.times.forEach((t, i) => {
    if (t === null) return;
    const offsetM = Math.abs(geophones[i].x - shot.x);
    if (offsetM < NEAREST_CHECKED_OFFSET_M || (t !== 0 && offsetM / (t / 1000) <= MAX_IMPLIED_VELOCITY_M_PER_S)) return;
    const implied = t === 0 ? 'an infinite speed' : `${Math.round(offsetM / (t / 1000))} m/s`;
    problems.push({
      path: `/shots/${s}/times/${i}`,
      code: 'impossible-velocity',
      message: `${label} time at the geophone at x = ${geophones[i].x} m is ${t} ms, ${offsetM} m from the shot: that is ${implied}, faster than any rock (over ${MAX_IMPLIED_VELOCITY_M_PER_S} m/s); check the pick, the shot position and the trigger.`,
    });
  });
}

/**
 * Coverage rules, checked once geometry and times are sound:
 * - opposing shots: some geophone must be picked from a shot on its left and from a shot on
 *   its right (plus-minus needs forward and reverse times at the same geophone; Hagedoorn 1959);
 * - a fittable branch: at least one shot side (the geophones strictly left, or strictly right,
 *   of one shot) must hold two or more picks, or no apparent velocity can be fitted at all.
 */
function coverageRules(geophones: Geophone[], shots: Shot[], problems: Problem[]): void {
  const sides = shots.map((s) => ({ left: picksOnSide(s, geophones, 'left'), right: picksOnSide(s, geophones, 'right') }));
  if (!sides.some((c) => c.left >= 2 || c.right >= 2)) {
    problems.push({
      path: '/shots',
      code: 'no-fittable-branch',
      message: 'No shot has two or more picks on the same side of it, so no direct-wave or refractor velocity can be fitted; pick more first breaks.',
    });
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
    problems.push({
      path: '/shots',
      code: 'no-opposing-shots',
      message: 'No geophone has picks from a shot on its left and from a shot on its right, so there is no forward and reverse pair to interpret; add a shot at or beyond the other end of the line.',
    });
  }
}

/** Pass 3 for branch overrides: a shot of this line, one override per shot side, no more picks than the side has. */
function overrideRules(overrides: BranchOverride[], found: Found, shots: Shot[] | null, geophones: Geophone[] | null, problems: Problem[]): void {
  const seen = new Map<string, number>();
  overrides.forEach((o, k) => {
    const path = `/options/branchOverrides/${k}`;
    if (!found.clean(path)) return;
    const shot = shots?.find((s) => s.id === o.shot);
    if (shots && !shot) {
      problems.push({
        path: `${path}/shot`,
        code: 'override-unknown-shot',
        message: `Branch override ${k + 1} names shot ${show(o.shot)}, which is not a shot of this line (shots are ${shots.map((s) => `"${s.id}"`).join(', ')}).`,
      });
      return;
    }
    const key = `${o.side}\u0000${o.shot}`;
    const earlier = seen.get(key);
    if (earlier !== undefined) {
      problems.push({ path, code: 'duplicate-branch-override', message: `Branch overrides ${earlier + 1} and ${k + 1} both set the ${o.side} side of shot "${o.shot}"; keep one.` });
      return;
    }
    seen.set(key, k);
    if (!shot || !geophones) return;
    const available = picksOnSide(shot, geophones, o.side);
    for (const field of ['directPicks', 'firstRefractorPicks'] as const) {
      const n = o[field];
      if (n !== undefined && n > available) {
        problems.push({
          path: `${path}/${field}`,
          code: 'override-exceeds-picks',
          message: `Branch override ${k + 1} sets ${field} = ${n} but shot "${shot.id}" has only ${available} picks on its ${o.side} side.`,
        });
      }
    }
  });
}

/** Pass 3: shot names are unique (compared wherever the id itself is sound). Returns whether any is repeated. */
function duplicateIdRule(input: unknown, found: Found, problems: Problem[]): boolean {
  if (!Array.isArray(input) || input.length > SURVEY_LIMITS.maxShots) return false;
  const firstIndexOfId = new Map<string, number>();
  let repeated = false;
  input.forEach((raw: unknown, s) => {
    if (!found.clean(`/shots/${s}/id`) || !isObject(raw) || typeof raw.id !== 'string') return;
    const earlier = firstIndexOfId.get(raw.id);
    if (earlier === undefined) {
      firstIndexOfId.set(raw.id, s);
      return;
    }
    repeated = true;
    problems.push({ path: `/shots/${s}/id`, code: 'duplicate-shot-id', message: `Shots ${earlier + 1} and ${s + 1} are both called "${raw.id}"; shot names must be unique within the line.` });
  });
  return repeated;
}

/** Pass 3: the rules the schema cannot say, on every part that passes 1 and 2. */
function ruleProblems(input: Record<string, unknown>, found: Found): { problems: Problem[]; geophones: Geophone[] | null; shots: Shot[] | null } {
  const problems: Problem[] = [];
  let geophones: Geophone[] | null = null;
  if (found.clean('/geophones')) {
    const candidate = normalGeophones(input.geophones as unknown[]);
    if (geophoneRules(candidate, problems)) geophones = candidate;
  }
  const duplicates = duplicateIdRule(input.shots, found, problems);
  // Each sound shot is checked even when another is not, so one bad pick hides nothing else.
  let shots: Shot[] | null = null;
  if (Array.isArray(input.shots) && input.shots.length <= SURVEY_LIMITS.maxShots) {
    const sound: Shot[] = [];
    const before = problems.length;
    input.shots.forEach((raw: unknown, s) => {
      if (!found.clean(`/shots/${s}`)) return;
      const shot = normalShot(raw);
      const label = `Shot "${shot.id}"`;
      const mark = problems.length;
      if (geophones) impliedVelocityRule(shot, s, label, geophones, problems);
      if (problems.length === mark && shot.times.every((t) => t === null)) {
        problems.push({ path: `/shots/${s}/times`, code: 'shot-without-picks', message: `${label} has no picks at all (every time is null); remove the shot or pick its first breaks.` });
      }
      sound.push(shot);
    });
    if (found.clean('/shots') && !duplicates && problems.length === before) shots = sound;
  }
  if (geophones && shots) coverageRules(geophones, shots, problems);
  const options = input.options;
  if (isObject(options)) {
    const method = options.method;
    if (found.clean('/options/method') && typeof method === 'string' && !(AVAILABLE_METHODS as readonly string[]).includes(method)) {
      problems.push({
        path: '/options/method',
        code: 'method-not-available',
        message: `options.method is "${method}", which is not available yet; only ${AVAILABLE_METHODS.map((m) => `"${m}"`).join(', ')} can be run now.`,
      });
    }
    // Time terms map one refractor (engine/time-term/): three layers asked for cannot be answered by them.
    if (found.clean('/options/method') && method === 'time-term' && options.layers === 3) {
      problems.push({
        path: '/options/method',
        code: 'method-two-layer-only',
        message:
          'options.method "time-term" maps the first refractor of a two-layer line only, and options.layers asks for 3; use "plus-minus" or "grm" for a three-layer line, or options.layers 2.',
      });
    }
    if (Array.isArray(options.branchOverrides) && options.branchOverrides.length <= MAX_BRANCH_OVERRIDES) {
      overrideRules(options.branchOverrides as BranchOverride[], found, shots, geophones, problems);
    }
  }
  return { problems, geophones, shots };
}

/** Property order of the survey document, for sorting problems into document order. */
const KEY_ORDER = new Map(
  [SurveySchema, ShotSchema, GeophoneSchema, SurveyOptionsSchema, BranchOverrideSchema].flatMap((schema) => Object.keys(schema.properties)).map((k, i) => [k, i] as const).reverse(),
);

/** Compares two JSON pointers by where their values sit in the document (a parent before its children). */
function documentOrder(a: Problem, b: Problem): number {
  const pa = a.path.split('/');
  const pb = b.path.split('/');
  for (let i = 1; i < Math.min(pa.length, pb.length); i++) {
    if (pa[i] === pb[i]) continue;
    const na = Number(pa[i]);
    const nb = Number(pb[i]);
    if (Number.isInteger(na) && Number.isInteger(nb)) return na - nb;
    return (KEY_ORDER.get(pa[i]) ?? Infinity) - (KEY_ORDER.get(pb[i]) ?? Infinity);
  }
  return pa.length - pb.length;
}

function capped(problems: Problem[]): Problem[] {
  if (problems.length <= MAX_PROBLEMS) return problems;
  return [
    ...problems.slice(0, MAX_PROBLEMS),
    {
      path: '',
      code: 'too-many-problems',
      message: `Stopped after ${MAX_PROBLEMS} problems; fix these and check the survey again to see the rest.`,
    },
  ];
}

/**
 * Checks a survey document and returns every problem found (up to MAX_PROBLEMS), or a
 * normalised copy of the survey when there are none.
 *
 * @example
 * validateSurvey({ geophones: [{ x: 0 }], shots: [] }).problems[0].code // "too-few-geophones"
 */
export function validateSurvey(input: unknown): SurveyValidation {
  if (!isObject(input)) {
    return {
      survey: null,
      problems: [{ path: '', code: 'body-not-object', message: `The survey is ${show(input)}; it must be a JSON object with "geophones" and "shots".` }],
    };
  }
  const limits = checkLimits(input);
  const shape = shapeProblems(limits.walkable, MAX_PROBLEMS + 1);
  const early = [...limits.problems, ...shape].sort(documentOrder);
  // With the list already full, some unsound part may have gone unreported: no rules then.
  const rules = shape.length > MAX_PROBLEMS ? null : ruleProblems(input, new Found(early));
  const problems = capped([...early, ...(rules?.problems ?? [])].sort(documentOrder));
  if (problems.length > 0 || !rules?.geophones || !rules.shots) return { survey: null, problems };
  // Key order as in api-v1.md, so a normalised survey prints like the contract's example.
  const survey: Survey = {
    ...(typeof input.name === 'string' ? { name: input.name } : {}),
    ...(typeof input.date === 'string' ? { date: input.date } : {}),
    geophones: rules.geophones,
    shots: rules.shots,
    ...(isObject(input.options) ? { options: normalOptions(input.options) } : {}),
  };
  return { survey, problems: [] };
}

/** Options as given (unknown keys kept, the contract lets fields be added), overrides with known fields only. */
function normalOptions(input: Record<string, unknown>): SurveyOptions {
  const out: Record<string, unknown> = { ...input };
  if (Array.isArray(input.branchOverrides)) {
    out.branchOverrides = (input.branchOverrides as BranchOverride[]).map((o) => ({
      shot: o.shot,
      side: o.side,
      directPicks: o.directPicks,
      ...(o.firstRefractorPicks !== undefined ? { firstRefractorPicks: o.firstRefractorPicks } : {}),
    }));
  }
  return out as SurveyOptions;
}
