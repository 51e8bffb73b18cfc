/**
 * One line interpreted a few times, for a CPU profile:
 *   npm run build && node --cpu-prof --cpu-prof-dir=/tmp/prof dist/bench/profile.js 96 5 3 off
 *   node --cpu-prof --cpu-prof-dir=/tmp/prof dist/bench/profile.js samples/demo-line.json 0 20 off
 * Arguments: geophones (or a survey JSON file, whose own shots are used), shots, repeats,
 * residuals (on|off). Prints the wall time per call.
 */
import { readFileSync } from 'node:fs';
import { interpret } from '../engine/pipeline/interpret.js';
import type { Survey } from '../engine/survey/survey.js';
import { flatBenchLine } from './lines.js';

const fromFile = process.argv[2]?.endsWith('.json') ? process.argv[2] : null;
const [geophones = 96, shots = 5, repeats = 3] = process.argv.slice(2, 5).map(Number);
const residuals = process.argv[5] === 'on';
const survey: Survey = fromFile ? (JSON.parse(readFileSync(fromFile, 'utf8')) as Survey) : flatBenchLine(geophones, shots);
survey.options = { ...survey.options, residuals };
// One call first so that the JIT has compiled the engine before the timed calls.
interpret(survey);
const t0 = performance.now();
for (let r = 0; r < repeats; r++) interpret(survey);
console.log(`${fromFile ?? `${geophones} geophones, ${shots} shots`}, residuals ${residuals ? 'on' : 'off'}: ${((performance.now() - t0) / repeats).toFixed(2)} ms per interpretation`);
