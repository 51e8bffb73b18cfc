/**
 * Notes on the structure found: each step, each refractor-velocity change, and a V1 that
 * varies along the line.
 */
import type { Warning } from '../output/interpretation.js';
import type { FoundStep } from '../structure/structure-features.js';
import { ROCK_STEP_MIN_REPLICATES, ROCK_STEP_WORK_BUDGET, type RockStepTest } from '../depth/rock-steps.js';
import { roundM } from '../output/output-decimals.js';
import { groupThousands } from '../output/display-precision.js';
import { lengthText, positionText, velocityNumber } from './wording.js';

export function structureWarnings(steps: FoundStep[], changes: { x: number; left: number; right: number }[], lateralV1: boolean): Warning[] {
  const out: Warning[] = [];
  for (const st of steps) {
    out.push({
      code: 'refractor-step',
      message:
        `The refractor steps ${st.throw > 0 ? 'down' : 'up'} by about ${lengthText(Math.abs(st.throw))} m toward +x near x = ${positionText(st.x)} m ` +
        `(seen in ${(st.seenIn ?? []).join(', ')}). Depths within a few metres of it are smoothed by the method.`,
      x: st.x,
    });
  }
  for (const c of changes) {
    out.push({
      code: 'refractor-velocity-change',
      message: `The refractor velocity changes from about ${velocityNumber(c.left)} to ${velocityNumber(c.right)} m/s near x = ${positionText(c.x)} m (a change in rock type or weathering).`,
      x: c.x,
    });
  }
  if (lateralV1) {
    out.push({
      code: 'lateral-top-layer-velocity',
      message: 'The direct waves of different shots give different top-layer velocities, so V1 varies along the line: each station uses the velocity interpolated between the shots.',
    });
  }
  return out;
}

/** One note per step found in the rock of a three-layer line (depth/rock-steps.ts), with the test that found it. */
export function rockStepWarnings(test: RockStepTest | null | undefined): Warning[] {
  if (!test) return [];
  return test.steps.map((st) => ({
    code: 'rock-step',
    message:
      `The rock (second refractor) steps ${st.throwM > 0 ? 'down' : 'up'} by about ${lengthText(Math.abs(st.throwM))} m toward +x near x = ${positionText(st.x)} m ` +
      `(a jump of ${Math.abs(st.delayJumpMs).toFixed(1)} ms in the middle layer's stripped delay; statistic ${st.statistic.toFixed(1)} against ${st.threshold.toFixed(1)}, ` +
      `the threshold that ${test.replicates} simulated lines with picks as uncertain as stated give for 1 % false alarms). Rock depths within about the depth of the rock of it are smoothed by the method.`,
    // Rounded as features.lowerRefractor.steps[].x is, so the note points at the step drawn.
    x: roundM(st.x),
  }));
}

/**
 * The note for a three-layer line too large for the rock-step test (rockStepReplicates):
 * steps in the rock were not sought, so "none found" would be wrong.
 */
export function rockStepsNotSoughtWarning(picks: number): Warning {
  const most = Math.floor(ROCK_STEP_WORK_BUDGET / ROCK_STEP_MIN_REPLICATES);
  return {
    code: 'rock-steps-not-sought',
    message:
      `Steps in the rock (second refractor) were not sought on this line: the test that tells a rock step from the line's own noise re-runs the layer stripping at least ${ROCK_STEP_MIN_REPLICATES} times, ` +
      `too much work for one interpretation at ${groupThousands(picks)} picks (up to ${groupThousands(most)} are tested). A step in the rock may show as a slope of the second refractor; interpret a shorter stretch of the line to test it.`,
  };
}
