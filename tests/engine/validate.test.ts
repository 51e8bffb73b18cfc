import { describe, expect, it } from 'vitest';
import { validateSurvey, MAX_PROBLEMS } from '../../engine/survey/validate.js';
import { SURVEY_LIMITS } from '../../engine/survey/survey.js';
import type { Problem } from '../../engine/survey/problem.js';
import { NUMERIC_OPTIONS, resolveOptions } from '../../engine/survey/options.js';

// Invented test data: six geophones at 2 m, a shot off each end. Times are plausible, not modelled.
function goodSurvey(): Record<string, any> {
  return {
    name: 'Test line',
    date: 'invented',
    geophones: [
      { x: 0, elevation: 10 },
      { x: 2, elevation: 10.1 },
      { x: 4, elevation: 10.2 },
      { x: 6, elevation: 10.2 },
      { x: 8, elevation: 10.3 },
      { x: 10, elevation: 10.3 },
    ],
    shots: [
      { id: 'W-end', x: -1, elevation: 10, times: [1.6, 4.8, 7.9, 9.6, 10.5, 11.4] },
      { id: 'E-end', x: 11, elevation: 10.3, times: [11.5, 10.6, 9.7, 8.0, 4.8, 1.6] },
    ],
    options: { layers: 2, reciprocalToleranceMs: 2, method: 'plus-minus', residuals: true, pickUncertaintyMs: 0.5 },
  };
}

function problemsOf(input: unknown): Problem[] {
  const result = validateSurvey(input);
  if (result.survey !== null) return [];
  return result.problems;
}

/** Asserts that the input fails with a problem of this code at this path, and returns it. */
function expectProblem(input: unknown, code: string, path: string): Problem {
  const result = validateSurvey(input);
  expect(result.survey).toBeNull();
  const found = result.problems.find((p) => p.code === code && p.path === path);
  expect(found, `expected ${code} at ${path}, got ${JSON.stringify(result.problems)}`).toBeDefined();
  expect(found!.message.length).toBeGreaterThan(20);
  return found!;
}

describe('validateSurvey accepts a sound survey', () => {
  it('returns the survey and no problems', () => {
    const result = validateSurvey(goodSurvey());
    expect(result.problems).toEqual([]);
    expect(result.survey).toEqual(goodSurvey());
  });

  it('returns a copy and never mutates the input', () => {
    const input = goodSurvey();
    const frozen = JSON.stringify(input);
    const result = validateSurvey(input);
    expect(result.survey).not.toBe(input);
    expect(result.survey!.shots[0].times).not.toBe(input.shots[0].times);
    result.survey!.shots[0].times[0] = 999;
    expect(JSON.stringify(input)).toBe(frozen);
  });

  it('accepts a survey without name, date, options or elevations', () => {
    const s = goodSurvey();
    delete s.name;
    delete s.date;
    delete s.options;
    for (const g of s.geophones) delete g.elevation;
    for (const shot of s.shots) delete shot.elevation;
    const result = validateSurvey(s);
    expect(result.problems).toEqual([]);
    expect(result.survey!.geophones[0]).toEqual({ x: 0 });
  });

  it('treats a null elevation as absent', () => {
    const s = goodSurvey();
    for (const g of s.geophones) g.elevation = null;
    s.shots[0].elevation = null;
    const result = validateSurvey(s);
    expect(result.problems).toEqual([]);
    expect('elevation' in result.survey!.geophones[2]).toBe(false);
    expect('elevation' in result.survey!.shots[0]).toBe(false);
  });

  it('accepts null picks and a shot on a geophone with time 0', () => {
    const s = goodSurvey();
    s.shots[0].times[3] = null;
    s.shots.push({ id: 'mid', x: 4, times: [6.3, 3.1, 0, 3.1, 6.3, 9] });
    expect(validateSurvey(s).problems).toEqual([]);
  });

  it('keeps valid branch overrides', () => {
    const s = goodSurvey();
    s.options.branchOverrides = [
      { shot: 'W-end', side: 'right', directPicks: 2 },
      { shot: 'E-end', side: 'left', directPicks: 2, firstRefractorPicks: 4 },
    ];
    const result = validateSurvey(s);
    expect(result.problems).toEqual([]);
    expect(result.survey!.options!.branchOverrides).toEqual(s.options.branchOverrides);
  });
});

describe('validateSurvey rejects the document shape', () => {
  it.each([null, [], 'survey', 42])('body-not-object for %j', (body) => {
    expectProblem(body, 'body-not-object', '');
  });
  it('name-not-string', () => {
    expectProblem({ ...goodSurvey(), name: 12 }, 'name-not-string', '/name');
  });
  it('name-too-long', () => {
    const p = expectProblem({ ...goodSurvey(), name: 'n'.repeat(SURVEY_LIMITS.maxNameLength + 1) }, 'name-too-long', '/name');
    expect(p.message).toContain(String(SURVEY_LIMITS.maxNameLength + 1));
  });
  it('date-not-string', () => {
    expectProblem({ ...goodSurvey(), date: { day: 2 } }, 'date-not-string', '/date');
  });
  it('date-too-long', () => {
    expectProblem({ ...goodSurvey(), date: 'd'.repeat(201) }, 'date-too-long', '/date');
  });
});

describe('validateSurvey checks the geophones', () => {
  it('geophones-not-array when missing', () => {
    const s = goodSurvey();
    delete s.geophones;
    expectProblem(s, 'geophones-not-array', '/geophones');
  });
  it('too-few-geophones', () => {
    const s = goodSurvey();
    s.geophones = [{ x: 0 }];
    const p = expectProblem(s, 'too-few-geophones', '/geophones');
    expect(p.message).toContain('1 geophone');
  });
  it('too-many-geophones, reported once without reading the entries', () => {
    const s = goodSurvey();
    s.geophones = new Array(SURVEY_LIMITS.maxGeophones + 1).fill('not a geophone');
    const p = expectProblem(s, 'too-many-geophones', '/geophones');
    expect(p.message).toContain(String(SURVEY_LIMITS.maxGeophones + 1));
    expect(problemsOf(s).filter((q) => q.code === 'geophone-not-object')).toEqual([]);
  });
  it('geophone-not-object', () => {
    const s = goodSurvey();
    s.geophones[3] = 6;
    expectProblem(s, 'geophone-not-object', '/geophones/3');
  });
  it.each([
    ['six', '"six"'],
    [Number.NaN, 'NaN'],
    [Number.POSITIVE_INFINITY, 'Infinity'],
    [undefined, 'missing'],
  ])('x-not-finite for %s', (x, shown) => {
    const s = goodSurvey();
    s.geophones[3].x = x;
    const p = expectProblem(s, 'x-not-finite', '/geophones/3/x');
    expect(p.message).toContain(`is ${shown}`);
  });
  it('coordinate-too-large', () => {
    const s = goodSurvey();
    s.geophones[5].x = 2e6;
    expectProblem(s, 'coordinate-too-large', '/geophones/5/x');
  });
  it('elevation-not-finite', () => {
    const s = goodSurvey();
    s.geophones[1].elevation = '10.1';
    expectProblem(s, 'elevation-not-finite', '/geophones/1/elevation');
  });
  it('elevation-missing when only some geophones have one', () => {
    const s = goodSurvey();
    delete s.geophones[4].elevation;
    const p = expectProblem(s, 'elevation-missing', '/geophones/4/elevation');
    expect(p.message).toContain('5 of 6');
  });
  it('x-not-increasing names the two positions out of order', () => {
    const s = goodSurvey();
    s.geophones[3].x = 3;
    s.geophones[4].x = 3;
    const p = expectProblem(s, 'x-not-increasing', '/geophones/4/x');
    expect(p.message).toContain('x = 3 m');
    expect(p.message).toMatch(/Geophone 5 .*geophone 4 /);
  });
  it('x-not-increasing for a reversed pair', () => {
    const s = goodSurvey();
    s.geophones[2].x = 7;
    const p = expectProblem(s, 'x-not-increasing', '/geophones/3/x');
    expect(p.message).toContain('x = 6 m');
    expect(p.message).toContain('x = 7 m');
  });
});

describe('validateSurvey checks the shots', () => {
  it('shots-not-array', () => {
    expectProblem({ ...goodSurvey(), shots: { id: 'a' } }, 'shots-not-array', '/shots');
  });
  it('no-shots', () => {
    expectProblem({ ...goodSurvey(), shots: [] }, 'no-shots', '/shots');
  });
  it('too-many-shots', () => {
    const s = goodSurvey();
    s.shots = new Array(SURVEY_LIMITS.maxShots + 1).fill(0);
    expectProblem(s, 'too-many-shots', '/shots');
    expect(problemsOf(s)).toHaveLength(1);
  });
  it('shot-not-object', () => {
    const s = goodSurvey();
    s.shots[1] = 'E-end';
    expectProblem(s, 'shot-not-object', '/shots/1');
  });
  it.each(['', '   ', 7, undefined])('shot-id-invalid for %j', (id) => {
    const s = goodSurvey();
    s.shots[0].id = id;
    expectProblem(s, 'shot-id-invalid', '/shots/0/id');
  });
  it('shot-id-too-long', () => {
    const s = goodSurvey();
    s.shots[0].id = 'x'.repeat(SURVEY_LIMITS.maxShotIdLength + 1);
    expectProblem(s, 'shot-id-too-long', '/shots/0/id');
  });
  it('duplicate-shot-id names the id and both shots', () => {
    const s = goodSurvey();
    s.shots[1].id = 'W-end';
    const p = expectProblem(s, 'duplicate-shot-id', '/shots/1/id');
    expect(p.message).toContain('"W-end"');
    expect(p.message).toContain('Shots 1 and 2');
  });
  it('x-not-finite for a shot', () => {
    const s = goodSurvey();
    s.shots[1].x = null;
    expectProblem(s, 'x-not-finite', '/shots/1/x');
  });
  it('coordinate-too-large for a shot elevation', () => {
    const s = goodSurvey();
    s.shots[1].elevation = -1e7;
    expectProblem(s, 'coordinate-too-large', '/shots/1/elevation');
  });
  it('elevation-not-finite for a shot', () => {
    const s = goodSurvey();
    s.shots[0].elevation = Number.NaN;
    expectProblem(s, 'elevation-not-finite', '/shots/0/elevation');
  });
  it('times-not-array', () => {
    const s = goodSurvey();
    s.shots[0].times = '1.6 4.8';
    expectProblem(s, 'times-not-array', '/shots/0/times');
  });
  it('times-length gives both counts', () => {
    const s = goodSurvey();
    s.shots[1].times.pop();
    const p = expectProblem(s, 'times-length', '/shots/1/times');
    expect(p.message).toContain('5 times');
    expect(p.message).toContain('6 geophones');
  });
  it('times-length is still checked when a geophone position is bad', () => {
    const s = goodSurvey();
    s.geophones[2].x = 'four';
    s.shots[0].times.push(12);
    expectProblem(s, 'times-length', '/shots/0/times');
    expectProblem(s, 'x-not-finite', '/geophones/2/x');
  });
  it('time-not-number', () => {
    const s = goodSurvey();
    s.shots[0].times[2] = '7.9';
    expectProblem(s, 'time-not-number', '/shots/0/times/2');
  });
  it('time-not-finite', () => {
    const s = goodSurvey();
    s.shots[0].times[2] = Number.POSITIVE_INFINITY;
    expectProblem(s, 'time-not-finite', '/shots/0/times/2');
  });
  it('negative-time names the value and the geophone', () => {
    const s = goodSurvey();
    s.shots[1].times[4] = -2.5;
    const p = expectProblem(s, 'negative-time', '/shots/1/times/4');
    expect(p.message).toContain('-2.5 ms');
    expect(p.message).toContain('x = 8 m');
    expect(p.message).toContain('"E-end"');
  });
  it('time-too-large', () => {
    const s = goodSurvey();
    s.shots[1].times[0] = 11500;
    const p = expectProblem(s, 'time-too-large', '/shots/1/times/0');
    expect(p.message).toContain('11500 ms');
  });
  it('impossible-velocity for a time far too early for its offset', () => {
    const s = goodSurvey();
    s.shots[0].times[5] = 0.5; // 11 m in 0.5 ms is 22 000 m/s
    const p = expectProblem(s, 'impossible-velocity', '/shots/0/times/5');
    expect(p.message).toContain('22000 m/s');
  });
  it('impossible-velocity for time 0 away from the shot', () => {
    const s = goodSurvey();
    s.shots[0].times[1] = 0;
    expectProblem(s, 'impossible-velocity', '/shots/0/times/1');
  });
  it('shot-without-picks', () => {
    const s = goodSurvey();
    s.shots.push({ id: 'mid', x: 5, times: [null, null, null, null, null, null] });
    const p = expectProblem(s, 'shot-without-picks', '/shots/2/times');
    expect(p.message).toContain('"mid"');
  });
  it('no-opposing-shots when every shot is at the same end', () => {
    const s = goodSurvey();
    s.shots[1] = { id: 'W-off', x: -10, times: [14, 16, 17, 18, 19, 20] };
    expectProblem(s, 'no-opposing-shots', '/shots');
  });
  it('no-opposing-shots when forward and reverse picks never share a geophone', () => {
    const s = goodSurvey();
    s.shots[0].times = [1.6, 4.8, 7.9, null, null, null];
    s.shots[1].times = [null, null, null, 8.0, 4.8, 1.6];
    expectProblem(s, 'no-opposing-shots', '/shots');
  });
  it('no-fittable-branch when no shot side has two picks', () => {
    const s = goodSurvey();
    s.geophones = [{ x: 0 }, { x: 10 }];
    s.shots = [
      { id: 'W-end', x: -1, times: [1.6, null] },
      { id: 'E-end', x: 11, times: [11.5, null] },
    ];
    expectProblem(s, 'no-fittable-branch', '/shots');
    // Geophone 0 is recorded from both sides, so the pair rule itself is met.
    expect(problemsOf(s).map((p) => p.code)).not.toContain('no-opposing-shots');
  });
});

describe('the validator and the engine agree on the options', () => {
  for (const name of Object.keys(NUMERIC_OPTIONS) as (keyof typeof NUMERIC_OPTIONS)[]) {
    const o = NUMERIC_OPTIONS[name];
    it.each([o.exclusiveMinimum, o.exclusiveMinimum + 1e-9, o.default, o.maximum, o.maximum + 1e-9])(`${name} = %s is accepted exactly when the engine uses it`, (value) => {
      const accepted = problemsOf({ ...goodSurvey(), options: { [name]: value } }).length === 0;
      expect(accepted).toBe(resolveOptions({ [name]: value })[name] === value);
    });
  }
});

describe('validateSurvey checks the options', () => {
  const withOptions = (options: unknown): Record<string, any> => ({ ...goodSurvey(), options });
  it('options-not-object', () => {
    expectProblem(withOptions([2]), 'options-not-object', '/options');
  });
  it.each([1, 4, '2', 2.5])('layers-invalid for %j', (layers) => {
    expectProblem(withOptions({ layers }), 'layers-invalid', '/options/layers');
  });
  it.each([0, -1, 101, Number.NaN, '2'])('reciprocal-tolerance-invalid for %j', (reciprocalToleranceMs) => {
    expectProblem(withOptions({ reciprocalToleranceMs }), 'reciprocal-tolerance-invalid', '/options/reciprocalToleranceMs');
  });
  it('accepts a reciprocal tolerance of exactly 100 ms', () => {
    expect(problemsOf(withOptions({ reciprocalToleranceMs: 100 }))).toEqual([]);
  });
  it('method-unknown', () => {
    expectProblem(withOptions({ method: 'delay-sum' }), 'method-unknown', '/options/method');
  });
  it('accepts method "time-term" on a line left to two layers (api-v1.md)', () => {
    expect(problemsOf(withOptions({ method: 'time-term' }))).toEqual([]);
    expect(problemsOf(withOptions({ method: 'time-term', layers: 2 }))).toEqual([]);
  });
  it('method-two-layer-only: time-term with three layers forced names options.method and why', () => {
    const p = expectProblem(withOptions({ method: 'time-term', layers: 3 }), 'method-two-layer-only', '/options/method');
    expect(p.message).toContain('options.layers');
    expect(p.message).toContain('two-layer');
  });
  it('accepts method "grm" (api-v1.md)', () => {
    expect(problemsOf(withOptions({ method: 'grm' }))).toEqual([]);
  });
  it('residuals-not-boolean', () => {
    expectProblem(withOptions({ residuals: 'no' }), 'residuals-not-boolean', '/options/residuals');
  });
  it.each([0, 21, -0.5, Number.POSITIVE_INFINITY])('pick-uncertainty-invalid for %j', (pickUncertaintyMs) => {
    expectProblem(withOptions({ pickUncertaintyMs }), 'pick-uncertainty-invalid', '/options/pickUncertaintyMs');
  });
  it('branch-overrides-not-array', () => {
    expectProblem(withOptions({ branchOverrides: { shot: 'W-end' } }), 'branch-overrides-not-array', '/options/branchOverrides');
  });
  it('too-many-branch-overrides', () => {
    const branchOverrides = new Array(2 * SURVEY_LIMITS.maxShots + 1).fill({ shot: 'W-end', side: 'right', directPicks: 1 });
    expectProblem(withOptions({ branchOverrides }), 'too-many-branch-overrides', '/options/branchOverrides');
  });
  it('branch-override-not-object', () => {
    expectProblem(withOptions({ branchOverrides: ['W-end'] }), 'branch-override-not-object', '/options/branchOverrides/0');
  });
  it('override-unknown-shot lists the shots there are', () => {
    const p = expectProblem(
      withOptions({ branchOverrides: [{ shot: 'S-end', side: 'left', directPicks: 1 }] }),
      'override-unknown-shot',
      '/options/branchOverrides/0/shot',
    );
    expect(p.message).toContain('"S-end"');
    expect(p.message).toContain('"W-end", "E-end"');
  });
  it('override-side-invalid', () => {
    expectProblem(withOptions({ branchOverrides: [{ shot: 'W-end', side: 'forward', directPicks: 1 }] }), 'override-side-invalid', '/options/branchOverrides/0/side');
  });
  it.each([-1, 1.5, '2', undefined])('override-direct-picks-invalid for %j', (directPicks) => {
    expectProblem(withOptions({ branchOverrides: [{ shot: 'W-end', side: 'right', directPicks }] }), 'override-direct-picks-invalid', '/options/branchOverrides/0/directPicks');
  });
  it('override-first-refractor-picks-invalid', () => {
    expectProblem(
      withOptions({ branchOverrides: [{ shot: 'W-end', side: 'right', directPicks: 1, firstRefractorPicks: -2 }] }),
      'override-first-refractor-picks-invalid',
      '/options/branchOverrides/0/firstRefractorPicks',
    );
  });
  it('duplicate-branch-override', () => {
    expectProblem(
      withOptions({
        branchOverrides: [
          { shot: 'W-end', side: 'right', directPicks: 1 },
          { shot: 'W-end', side: 'right', directPicks: 2 },
        ],
      }),
      'duplicate-branch-override',
      '/options/branchOverrides/1',
    );
  });
  it('override-exceeds-picks gives both numbers', () => {
    // W-end (x = −1 m) has 6 picks to its right and none to its left.
    const p = expectProblem(withOptions({ branchOverrides: [{ shot: 'W-end', side: 'left', directPicks: 1 }] }), 'override-exceeds-picks', '/options/branchOverrides/0/directPicks');
    expect(p.message).toContain('directPicks = 1');
    expect(p.message).toContain('only 0 picks');
  });
});

describe('validateSurvey reports every problem', () => {
  it('collects problems from several places in document order', () => {
    const s = goodSurvey();
    s.name = 5;
    s.shots[0].times[1] = -1;
    s.shots[1].times[2] = 'x';
    s.options.layers = 7;
    const codes = problemsOf(s).map((p) => `${p.code} ${p.path}`);
    expect(codes).toEqual(['name-not-string /name', 'negative-time /shots/0/times/1', 'time-not-number /shots/1/times/2', 'layers-invalid /options/layers']);
  });
  it('reports shape problems and rule problems together, in document order', () => {
    const s = goodSurvey();
    s.shots[0].times[5] = 0.5; // 22 000 m/s: a rule the schema cannot say
    s.shots[1].times[2] = 'x'; // a shape problem in a later shot
    s.name = 5;
    const codes = problemsOf(s).map((p) => `${p.code} ${p.path}`);
    expect(codes).toEqual(['name-not-string /name', 'impossible-velocity /shots/0/times/5', 'time-not-number /shots/1/times/2']);
  });
  it('reads an enormous times list no further than its length', () => {
    const s = goodSurvey();
    s.shots[0].times = new Array(2_000_000).fill('not a time');
    const problems = problemsOf(s);
    expect(problems.map((p) => `${p.code} ${p.path}`)).toEqual(['times-length /shots/0/times']);
    expect(problems[0].message).toContain('2000000 times');
  });
  it('stops after MAX_PROBLEMS and says so', () => {
    const s = goodSurvey();
    s.geophones = Array.from({ length: 300 }, (_, i) => ({ x: i }));
    s.shots = [{ id: 'W-end', x: -1, times: new Array(300).fill(-1) }];
    const problems = problemsOf(s);
    expect(problems).toHaveLength(MAX_PROBLEMS + 1);
    expect(problems[MAX_PROBLEMS].code).toBe('too-many-problems');
  });
});
