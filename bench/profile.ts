/**
 * One line interpreted a few times, for a CPU profile:
 *   npm run build && node --cpu-prof --cpu-prof-dir=/tmp/prof dist/bench/profile.js 96 5 3 off
 * Arguments: geophones, shots, repeats, residuals (on|off). Prints the wall time per call.
 */
import { interpret } from '../engine/pipeline/interpret.js';
import { flatBenchLine } from './lines.js';

const [geophones = 96, shots = 5, repeats = 3] = process.argv.slice(2, 5).map(Number);
const residuals = process.argv[5] === 'on';
const survey = flatBenchLine(geophones, shots);
survey.options = { residuals };
const t0 = performance.now();
for (let r = 0; r < repeats; r++) interpret(survey);
console.log(`${geophones} geophones, ${shots} shots, residuals ${residuals ? 'on' : 'off'}: ${((performance.now() - t0) / repeats).toFixed(1)} ms per interpretation`);
