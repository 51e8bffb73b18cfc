/**
 * Shape problems: what the survey's JSON Schema (`engine/schemas/survey.ts`) refuses, as
 * problems with the validator's stable codes and a sentence a field geophysicist
 * understands, e.g. `Shot "W-end" time at the geophone at x = 8 m is "abc"; it must be a
 * number of milliseconds, or null for no pick.`
 *
 * The schema decides where the document is wrong (a JSON pointer); this file decides what
 * to say, from the field the pointer names and the offending value. Array lengths are not
 * reported here: the validator checks them first (see validate.ts).
 */
import { TypeCompiler } from '@sinclair/typebox/compiler';
import { ValueErrorType } from '@sinclair/typebox/errors';
import { SurveySchema } from '../schemas/survey.js';
import { KNOWN_METHODS, NUMERIC_OPTIONS } from './options.js';
import { SURVEY_LIMITS } from './survey.js';
import type { Problem } from './problem.js';

const surveyChecker = TypeCompiler.Compile(SurveySchema);

/** Length keywords: the validator's limits pass reports these before the schema runs. */
const LENGTH_ERRORS = new Set<ValueErrorType>([ValueErrorType.ArrayMinItems, ValueErrorType.ArrayMaxItems]);

/** A short, safe rendering of any value for a message. */
export function show(value: unknown): string {
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

export function isObject(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/** Every shape problem of the document in document order, at most `limit`, one per path. */
export function shapeProblems(document: Record<string, unknown>, limit: number): Problem[] {
  if (surveyChecker.Check(document)) return [];
  const out: Problem[] = [];
  let lastPath: string | null = null;
  for (const error of surveyChecker.Errors(document)) {
    if (LENGTH_ERRORS.has(error.type) || error.path === lastPath) continue;
    lastPath = error.path;
    out.push(describe(document, error.path, error.value));
    if (out.length >= limit) break;
  }
  return out;
}

/** "Shot "W-end"" when the shot has a usable id, else "Shot 3". */
export function shotLabel(document: Record<string, unknown>, s: number): string {
  const shot = Array.isArray(document.shots) ? document.shots[s] : undefined;
  const id = isObject(shot) ? shot.id : undefined;
  return typeof id === 'string' && id.trim() !== '' && id.length <= SURVEY_LIMITS.maxShotIdLength ? `Shot "${id}"` : `Shot ${s + 1}`;
}

/** "the geophone at x = 8 m" when its position is a number, else "geophone 5". */
function geophoneLabel(document: Record<string, unknown>, i: number): string {
  const g = Array.isArray(document.geophones) ? document.geophones[i] : undefined;
  const x = isObject(g) ? g.x : undefined;
  return typeof x === 'number' && Number.isFinite(x) ? `the geophone at x = ${x} m` : `geophone ${i + 1}`;
}

function coordinate(path: string, what: string, value: unknown): Problem {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    const code = path.endsWith('/x') ? 'x-not-finite' : 'elevation-not-finite';
    return { path, code, message: `${what} is ${show(value)}; it must be a finite number of metres.` };
  }
  return { path, code: 'coordinate-too-large', message: `${what} is ${value} m; coordinates must lie within ±${SURVEY_LIMITS.maxCoordinateM} m.` };
}

function text(path: string, field: string, value: unknown, maxLength: number, example: string): Problem {
  const code = path.slice(1);
  if (typeof value !== 'string') return { path, code: `${code}-not-string`, message: `${field} is ${show(value)}; it must be text, such as ${example}.` };
  return { path, code: `${code}-too-long`, message: `${field} is ${value.length} characters long; at most ${maxLength} are accepted.` };
}

function time(path: string, label: string, where: string, t: unknown): Problem {
  const at = `${label} time at ${where}`;
  if (typeof t !== 'number') return { path, code: 'time-not-number', message: `${at} is ${show(t)}; it must be a number of milliseconds, or null for no pick.` };
  if (!Number.isFinite(t)) return { path, code: 'time-not-finite', message: `${at} is ${show(t)}; it must be a finite number of milliseconds, or null for no pick.` };
  if (t < 0) return { path, code: 'negative-time', message: `${at} is ${t} ms; a first break cannot come before the shot, so times must be 0 ms or more.` };
  return {
    path,
    code: 'time-too-large',
    message: `${at} is ${t} ms; first breaks on an engineering line arrive well within ${SURVEY_LIMITS.maxTimeMs} ms — check the units (ms, not µs).`,
  };
}

const wholePicks = (k: number, field: string, value: unknown): string =>
  `Branch override ${k + 1} ${field} is ${show(value)}; it must be a whole number of picks, 0 or more.`;

/** The problem for the value at `path`, which the schema refused. */
function describe(document: Record<string, unknown>, path: string, value: unknown): Problem {
  const [, top, a, b, c] = path.split('/');
  const n = (segment: string | undefined): number => Number(segment);
  switch (top) {
    case 'name':
      return text(path, 'name', value, SURVEY_LIMITS.maxNameLength, '"Line 3, pump-station terrace"');
    case 'date':
      return text(path, 'date', value, SURVEY_LIMITS.maxDateLength, 'free text like "2 May, crew B"');
    case 'geophones': {
      if (a === undefined) return { path, code: 'geophones-not-array', message: `geophones is ${show(value)}; it must be a list of geophones, each { "x": metres along the line }.` };
      const what = `Geophone ${n(a) + 1}`;
      if (b === undefined) return { path, code: 'geophone-not-object', message: `${what} is ${show(value)}; it must be an object such as { "x": 12, "elevation": 41.3 }.` };
      return coordinate(path, b === 'x' ? `${what} position x` : `${what} elevation`, value);
    }
    case 'shots': {
      if (a === undefined) return { path, code: 'shots-not-array', message: `shots is ${show(value)}; it must be a list of shots, each { "id", "x", "times" }.` };
      const s = n(a);
      if (b === undefined) return { path, code: 'shot-not-object', message: `Shot ${s + 1} is ${show(value)}; it must be an object such as { "id": "W-end", "x": -1, "times": [...] }.` };
      const label = shotLabel(document, s);
      if (b === 'id') {
        return typeof value === 'string' && value.length > SURVEY_LIMITS.maxShotIdLength
          ? { path, code: 'shot-id-too-long', message: `Shot ${s + 1} id is ${value.length} characters long; at most ${SURVEY_LIMITS.maxShotIdLength} are accepted.` }
          : { path, code: 'shot-id-invalid', message: `Shot ${s + 1} id is ${show(value)}; every shot needs a non-empty name such as "W-off".` };
      }
      if (b === 'times') {
        if (c === undefined) return { path, code: 'times-not-array', message: `${label} times is ${show(value)}; it must be a list with one first-break time (ms) or null per geophone.` };
        return time(path, label, geophoneLabel(document, n(c)), value);
      }
      return coordinate(path, b === 'x' ? `${label} position x` : `${label} elevation`, value);
    }
    case 'options':
      return option(path, a, b, c, value);
    default:
      return { path, code: 'invalid-value', message: `The value at ${path} is ${show(value)}, which the survey document does not allow.` };
  }
}

function option(path: string, field: string | undefined, index: string | undefined, key: string | undefined, value: unknown): Problem {
  const numeric = (name: keyof typeof NUMERIC_OPTIONS, code: string, tail: string): Problem => {
    const o = NUMERIC_OPTIONS[name];
    return { path, code, message: `options.${name} is ${show(value)}; it must be a number of milliseconds above ${o.exclusiveMinimum} and at most ${o.maximum}${tail}.` };
  };
  switch (field) {
    case undefined:
      return { path, code: 'options-not-object', message: `options is ${show(value)}; it must be an object such as { "layers": 2 }.` };
    case 'layers':
      return { path, code: 'layers-invalid', message: `options.layers is ${show(value)}; it must be 2 or 3 (leave it out to let the picks decide).` };
    case 'reciprocalToleranceMs':
      return numeric('reciprocalToleranceMs', 'reciprocal-tolerance-invalid', ' (a few ms is usual)');
    case 'pickUncertaintyMs':
      return numeric('pickUncertaintyMs', 'pick-uncertainty-invalid', '');
    case 'method':
      return { path, code: 'method-unknown', message: `options.method is ${show(value)}; it must be one of ${KNOWN_METHODS.map((m) => `"${m}"`).join(', ')}.` };
    case 'residuals':
      return { path, code: 'residuals-not-boolean', message: `options.residuals is ${show(value)}; it must be true or false.` };
    case 'branchOverrides': {
      if (index === undefined) return { path, code: 'branch-overrides-not-array', message: `options.branchOverrides is ${show(value)}; it must be a list of { "shot", "side", "directPicks" }.` };
      const k = Number(index);
      switch (key) {
        case undefined:
          return { path, code: 'branch-override-not-object', message: `Branch override ${k + 1} is ${show(value)}; it must be an object such as { "shot": "W-end", "side": "right", "directPicks": 4 }.` };
        case 'shot':
          return { path, code: 'override-unknown-shot', message: `Branch override ${k + 1} names shot ${show(value)}; it must be the id of a shot of this line.` };
        case 'side':
          return { path, code: 'override-side-invalid', message: `Branch override ${k + 1} side is ${show(value)}; it must be "left" or "right".` };
        case 'directPicks':
          return { path, code: 'override-direct-picks-invalid', message: wholePicks(k, 'directPicks', value) };
        default:
          return { path, code: 'override-first-refractor-picks-invalid', message: wholePicks(k, 'firstRefractorPicks', value) };
      }
    }
    default:
      return { path, code: 'invalid-value', message: `The value at ${path} is ${show(value)}, which the survey document does not allow.` };
  }
}
