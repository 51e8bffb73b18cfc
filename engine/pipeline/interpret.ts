/**
 * Interprets one refraction line by the plus-minus method (Hagedoorn, Geophysical
 * Prospecting 7, 1959), as a list of stages, each a function of the ones before:
 * options → branches and V1 → opposing pairs (slope-intercept velocities, reciprocal check)
 * → phantoming of the end shots → the plus-minus core on the first refractor → line V2 →
 * V1 along the line → the first refractor's section (steps, lateral V2, depths) → dip →
 * output (all rounding) → second refractor → cautions from the data → residuals.
 *
 * Deterministic and pure. The survey must already be valid (validateSurvey). Nothing is
 * rounded before toInterpretation. Choices and assumptions are told in each stage's file
 * and in docs/developers/plus-minus.md; geophones sit on the ground at their elevations,
 * and the shots' own elevations cancel out of T+ through the reciprocal time.
 */
import type { Survey } from '../survey/survey.js';
import type { Interpretation } from '../output/interpretation.js';
import { resolveOptions } from '../survey/options.js';
import { assignBranches } from '../branches/assign-branches.js';
import { geophoneSpacingM } from '../branches/shot-geometry.js';
import { refractedBranches } from '../branches/refracted-times.js';
import { topLayerVelocity } from '../velocities/direct-velocity.js';
import { opposingPairs } from '../velocities/opposing-pairs.js';
import { opposingPairVelocities } from '../velocities/slope-intercept.js';
import { directSides } from '../velocities/direct-sides.js';
import { localTopLayerVelocities } from '../velocities/lateral-v1.js';
import { lineRefractorVelocity } from '../velocities/line-refractor-velocity.js';
import { layerVelocity } from '../velocities/refractor-velocity-segments.js';
import { reciprocalChecks } from '../reciprocal/reciprocal-checks.js';
import { phantomEndShots, phantomWarnings } from '../plus-minus/end-shot-phantoms.js';
import { firstRefractorPairs } from '../plus-minus/first-refractor-pairs.js';
import { refractorPlusTimes, widestPairMinusTimes } from '../plus-minus/refractor-plus-times.js';
import { firstRefractorSection } from '../depth/first-refractor-section.js';
import { secondRefractor } from '../depth/second-refractor.js';
import { pickCount, rockStepReplicates, rockSteps } from '../depth/rock-steps.js';
import { sectionDips } from '../structure/line-dip.js';
import { branchWarnings, methodWarnings } from '../qc/input-warnings.js';
import { negativeDelayWarnings, plusTimeWarnings } from '../qc/plus-time-warnings.js';
import { coverageWarnings } from '../qc/coverage-warnings.js';
import { rockStepsNotSoughtWarning, rockStepWarnings, structureWarnings } from '../qc/structure-warnings.js';
import { withDataCautions } from '../qc/data-cautions.js';
import { withResiduals } from '../qc/residuals.js';
import { chooseLayerCount, needsLayerChoice } from '../qc/layer-choice.js';
import { toInterpretation } from '../output/to-interpretation.js';
import { isFiniteNumber } from '../shared/numbers.js';
import { grmTimeDepths } from '../grm/grm.js';
import { withTimeDepths } from '../grm/grm-output.js';
import { timeTermStage, withTimeTerms } from '../time-term/time-term-stage.js';
import type { TimeTermRecord } from '../time-term/time-term-output.js';
import { timeTermFailedWarning, timeTermThreeLayerWarning } from '../qc/method-warnings.js';
import type { RefractorPlusTimes } from '../plus-minus/refractor-plus-times.js';
import type { Warning } from '../output/interpretation.js';

/**
 * The interpretation of a line. Unforced (no options.layers) and with residuals on, a line
 * whose residuals are high is interpreted again with two and with three layers forced and
 * the layer count is chosen by the picks' misfit (qc/layer-choice.ts, qc.layerChoice).
 */
export function interpret(survey: Survey): Interpretation {
  const options = resolveOptions(survey.options);
  const auto = interpretOnce(survey);
  if (!options.residuals || !needsLayerChoice(auto, options.pickUncertaintyMs, options.layers)) return auto;
  // A forced two-layer run repeats the auto one when that already has two layers: O(1) saved solve.
  const counts = auto.layers.length === 2 ? ([3] as const) : ([2, 3] as const);
  const forced = counts.map((layers) => ({
    label: layers === 2 ? ('two-layer' as const) : ('three-layer' as const),
    interp: interpretOnce({ ...survey, options: { ...survey.options, layers } }),
  }));
  return chooseLayerCount(auto, forced, options.pickUncertaintyMs);
}

/**
 * The GRM interpretation at a forced XY (in geophone intervals) instead of the optimum:
 * the reference checks compare XY = 0 with plus-minus through it.
 */
export function interpretGrmAtXy(survey: Survey, steps: number): Interpretation {
  return interpretOnce({ ...survey, options: { ...survey.options, method: 'grm' } }, steps);
}

/** One pass of the stages with the survey's own options (see the file comment). */
function interpretOnce(survey: Survey, grmForcedSteps?: number, fallbackNote?: Warning): Interpretation {
  const options = resolveOptions(survey.options);
  const sigmaMs = options.pickUncertaintyMs;
  const xs = survey.geophones.map((g) => g.x);
  const elevation = survey.geophones.map((g) => g.elevation ?? 0);

  const shots = assignBranches(survey, options);
  const direct = topLayerVelocity(shots, survey);
  const v1 = isFiniteNumber(direct.velocity) && direct.velocity > 0 ? direct.velocity : null;

  const pairs = opposingPairs(shots);
  const pairVelocities = v1 === null ? [] : pairs.flatMap(([a, b]) => opposingPairVelocities(v1, a, b) ?? []);
  const reciprocal = reciprocalChecks(survey, shots, options);
  const phantoms = phantomEndShots(survey, shots, sigmaMs);

  const pairInputs = firstRefractorPairs(survey, pairs, reciprocal.checks, phantoms, sigmaMs);
  const plusMinusTimes = refractorPlusTimes(pairInputs, xs);
  const lineV2 = lineRefractorVelocity(plusMinusTimes.pairs, xs, v1);
  // GRM (engine/grm/): the time-depths at the optimum XY take the place of the delay times.
  const grm =
    options.method === 'grm'
      ? grmTimeDepths({ pairs: pairInputs, geophoneXM: xs, spacingM: geophoneSpacingM(survey.geophones), plusMinusDelayMs: plusMinusTimes.delayTimeMs, v1MPerS: v1, v2MPerS: lineV2.velocity, forcedSteps: grmForcedSteps })
      : null;
  const topLayer = localTopLayerVelocities(xs, directSides(survey, shots, sigmaMs), v1);
  const sectionOf = (times: RefractorPlusTimes) =>
    firstRefractorSection({
      xsM: xs,
      elevationM: elevation,
      spacingM: geophoneSpacingM(survey.geophones),
      delayTimeMs: times.delayTimeMs,
      plusSigmaMs: times.combined.plusSigmaMs,
      minusPairs: lineV2.minusPairs,
      v1,
      v1At: topLayer.v1MPerS,
      lineV2: lineV2.velocity,
      lineFit: lineV2.fit,
      branches: refractedBranches(survey, shots),
      pickSigmaMs: sigmaMs,
    });
  let plus = grm ? withTimeDepths(plusMinusTimes, grm) : plusMinusTimes;
  let section = sectionOf(plus);
  // Time terms (engine/time-term/): one slowness per segment between the plus-minus section's
  // velocity changes; the geophone terms take the place of the delay times and the section is
  // drawn again from them. O(section) more than plus-minus.
  const methodNotes = [...(fallbackNote ? [fallbackNote] : [])];
  let timeTerm: TimeTermRecord | null = null;
  if (options.method === 'time-term') {
    const solved = timeTermStage({ survey, shots, velocityChangeXsM: section.changes.map((c) => c.x), pickSigmaMs: sigmaMs, v1MPerS: v1, v2MPerS: lineV2.velocity });
    if (solved.ok) {
      timeTerm = solved;
      plus = withTimeTerms(plusMinusTimes, solved);
      section = sectionOf(plus);
    } else {
      methodNotes.push(timeTermFailedWarning(solved.reason));
    }
  }
  const v2 = layerVelocity(section.segments, xs.filter((_, i) => plus.delayTimeMs[i] !== null)) ?? lineV2.velocity;

  const verticalDepthM = section.depths.verticalDepthM;
  const twoLayerRecord = { v1MPerS: v1, v2MPerS: v2, v1At: topLayer.v1MPerS, v2At: section.v2At.map((v, i) => (plus.delayTimeMs[i] === null ? null : v)), depthM: verticalDepthM };
  const threeLayer = secondRefractor(survey, shots, twoLayerRecord, options);
  // Steps in the rock: a jump scan on the stripped middle-layer delay, its threshold from a
  // Monte Carlo test of the line's own error process (depth/rock-steps.ts), with as many
  // re-runs of the stripping as the line's picks allow (rockStepReplicates); a line too
  // large to test in the service's time gets a note instead.
  const rockMap = threeLayer?.map;
  if (threeLayer && rockMap?.mapped && rockMap.structure) {
    const picks = pickCount(survey);
    const replicates = rockStepReplicates(picks);
    if (replicates > 0) {
      const stepTest = rockSteps(survey, shots, twoLayerRecord, options, rockMap, replicates);
      rockMap.structure = { ...rockMap.structure, stepTest };
      threeLayer.warnings.push(...rockStepWarnings(stepTest));
    } else {
      threeLayer.warnings.push(rockStepsNotSoughtWarning(picks));
    }
  }
  // Time terms map the first refractor only (two-layer lines): a line with a mapped second
  // refractor is interpreted by plus-minus instead, and says so (README, options.method).
  if (options.method === 'time-term' && threeLayer?.map?.mapped && threeLayer.map.velocitiesMPerS[2] !== null) {
    return interpretOnce({ ...survey, options: { ...survey.options, method: 'plus-minus' } }, undefined, timeTermThreeLayerWarning());
  }
  // The first refractor's dip from the depths the section shows: on a three-layer line the
  // map's (branch-1 picks only), not the two-layer section's, which mixed in rock arrivals.
  const mapped = threeLayer?.map?.mapped ? threeLayer.map : null;
  const dips = sectionDips({
    xsM: xs,
    elevationM: elevation,
    depthM: mapped ? mapped.depthM.map((d) => d[0]) : verticalDepthM,
    stepXsM: section.steps.map((st) => st.x),
    changeXsM: section.changes.map((c) => c.x),
    v1,
    v2: mapped?.velocitiesMPerS[1] ?? v2,
    v1At: topLayer.v1MPerS,
    v2At: mapped ? xs.map(() => mapped.velocitiesMPerS[1]) : section.v2At,
    pickSigmaMs: sigmaMs,
    pairs: pairVelocities,
    shots,
  });

  const twoLayerWarnings = [
    ...methodWarnings(options),
    ...methodNotes,
    ...branchWarnings(v1, shots),
    ...reciprocal.warnings,
    ...phantomWarnings(phantoms, sigmaMs),
    ...plusTimeWarnings(xs, plus, pairs.length),
    ...lineV2.warnings,
    ...(v1 !== null && v2 !== null ? negativeDelayWarnings(xs, plus.delayTimeMs) : []),
    ...coverageWarnings(survey, plus.pairs, phantoms, plus.combined.plusTimeMs),
    ...structureWarnings(section.steps, section.changes, topLayer.lateral),
  ];
  const warnings = [...twoLayerWarnings.filter((w) => !threeLayer?.answers(w)), ...(threeLayer?.warnings ?? [])];
  const output = toInterpretation({
    survey,
    shots,
    phantoms,
    reciprocalChecks: reciprocal.checks,
    direct,
    v1,
    v1At: topLayer.v1MPerS,
    v2,
    pairVelocities,
    plus,
    section,
    lineFit: lineV2.fit,
    widestMinusMs: widestPairMinusTimes(plus.pairs, xs.length),
    dip: dips.dip,
    localDips: dips.local,
    threeLayer,
    warnings,
    pickSigmaMs: sigmaMs,
    v1SigmaMPerS: lineV1SigmaMPerS(v1, topLayer.sides),
    // The method actually run: one asked for but not available yet fell back to plus-minus (warned).
    method: grm ? 'grm' : timeTerm ? 'time-term' : 'plus-minus',
    grm,
    timeTerm,
  });
  const interpretation = withDataCautions(survey, output);
  return options.residuals ? withResiduals(survey, interpretation) : interpretation;
}

/**
 * One standard deviation of the line V1, m/s: the inverse-variance mean of the direct sides'
 * slownesses (their standard errors from the picks), σ_p = 1/√Σ(1/σ_i²), turned into a
 * velocity as σ_V = V²·σ_p (first order); null without sides.
 */
function lineV1SigmaMPerS(v1: number | null, sides: { slownessStandardErrorMsPerM: number }[]): number | null {
  if (v1 === null) return null;
  const weight = sides.reduce((s, side) => (side.slownessStandardErrorMsPerM > 0 && Number.isFinite(side.slownessStandardErrorMsPerM) ? s + 1 / side.slownessStandardErrorMsPerM ** 2 : s), 0);
  return weight > 0 ? (v1 * v1 * (1 / Math.sqrt(weight))) / 1000 : null;
}
