/**
 * Robustness of the whole input path against odd but possible lines: seeded random
 * mutations of the demo line (dead traces, moved shots, shuffled or scaled picks, odd
 * elevations, duplicated shots, wrong types). Every mutated document must either be
 * rejected by validation with problems, or interpreted without throwing and without a
 * NaN or infinite number anywhere (api-v1.md: bad input is a clear 400, never a 500).
 * The mutations are reproducible (seeded); a failure names its seed. About 40 % of them stay
 * valid and are interpreted. FUZZ_SEEDS=400 runs more (400 passed when written).
 */
import { describe, expect, it } from 'vitest';
import { validateSurvey } from '../../engine/survey/validate.js';
import { interpret } from '../../engine/pipeline/interpret.js';
import { demoLine } from '../../engine/samples/demo-lines.js';
import type { Survey } from '../../engine/survey/survey.js';
import { mulberry32 } from '../helpers/random.js';

type Rng = () => number;

const pick = <T>(rng: Rng, items: T[]): T => items[Math.floor(rng() * items.length)];

/** One random change to a deep copy of the survey (some keep it valid, some do not). */
function mutate(base: Survey, rng: Rng): unknown {
  const s = JSON.parse(JSON.stringify(base)) as Survey & Record<string, unknown>;
  const shot = pick(rng, s.shots);
  const i = Math.floor(rng() * s.geophones.length);
  const kind = Math.floor(rng() * 14);
  switch (kind) {
    case 0: // dead traces
      for (const sh of s.shots) sh.times = sh.times.map((t) => (rng() < 0.3 ? null : t));
      break;
    case 1: // a shot moved along the line, even onto a geophone
      shot.x = pick(rng, [s.geophones[i].x, shot.x + (rng() - 0.5) * 40, -500, 500]);
      break;
    case 2: // picks shuffled within a shot
      shot.times = [...shot.times].sort(() => rng() - 0.5);
      break;
    case 3: // a shot's picks scaled (a wrong sample interval)
      shot.times = shot.times.map((t) => (t === null ? null : t * pick(rng, [0.01, 0.5, 2, 10])));
      break;
    case 4: // wild elevations
      for (const g of s.geophones) g.elevation = (g.elevation ?? 0) + (rng() - 0.5) * pick(rng, [1, 20, 200]);
      break;
    case 5: // a duplicated shot under another name, or the same name
      s.shots.push({ ...shot, id: rng() < 0.5 ? shot.id : `${shot.id}-again` });
      break;
    case 6: // one shot only
      s.shots = [shot];
      break;
    case 7: // a pick of a wrong type or value
      (shot.times as unknown[])[i] = pick(rng, ['12.5', -3, 1e9, true, {}, [], 0]);
      break;
    case 8: // geophones out of order or doubled
      s.geophones[i].x = s.geophones[Math.max(0, i - 1)].x;
      break;
    case 9: // every pick equal
      shot.times = shot.times.map((t) => (t === null ? null : 20));
      break;
    case 10: // odd options
      s.options = pick(rng, [{ layers: 3 }, { layers: 2 }, { layers: 4 as 2 }, { reciprocalToleranceMs: 0.01 }, { pickUncertaintyMs: 5 }, { residuals: false }, { method: 'grm' }]) as Survey['options'];
      break;
    case 11: // a branch override that forces nonsense
      s.options = { branchOverrides: [{ shot: shot.id, side: pick(rng, ['left', 'right']), directPicks: Math.floor(rng() * 6) }] };
      break;
    case 12: // most geophones removed
      {
        const keep = Math.max(2, Math.floor(rng() * 5));
        s.geophones = s.geophones.slice(0, keep);
        for (const sh of s.shots) sh.times = sh.times.slice(0, keep);
      }
      break;
    default: // a field removed
      delete (s as Record<string, unknown>)[pick(rng, ['geophones', 'shots', 'name'])];
  }
  return s;
}

function expectFiniteEverywhere(value: unknown, path = ''): void {
  if (typeof value === 'number') expect(Number.isFinite(value), `non-finite number at ${path}`).toBe(true);
  else if (Array.isArray(value)) value.forEach((v, k) => expectFiniteEverywhere(v, `${path}/${k}`));
  else if (value && typeof value === 'object') for (const [k, v] of Object.entries(value)) expectFiniteEverywhere(v, `${path}/${k}`);
}

describe('interpret on seeded random mutations of the demo line', () => {
  const base = demoLine();
  for (let seed = 1; seed <= (Number(process.env.FUZZ_SEEDS) || 60); seed++) {
    it(`seed ${seed}: rejected with problems, or interpreted with finite numbers`, () => {
      const rng = mulberry32(seed);
      const doc = mutate(base, rng);
      const checked = validateSurvey(doc);
      if (checked.survey === null) {
        expect(checked.problems.length).toBeGreaterThan(0);
        for (const p of checked.problems) expect(p.path.startsWith('/') || p.path === '').toBe(true);
        return;
      }
      // Residuals are exercised on a third of the cases: they cost an eikonal run per shot.
      const survey = seed % 3 === 0 ? checked.survey : { ...checked.survey, options: { ...checked.survey.options, residuals: false } };
      const result = interpret(survey);
      expect(result.stations).toHaveLength(survey.geophones.length);
      expectFiniteEverywhere(result);
    });
  }
});
