/**
 * The steps of a shot-gather upload short of storing it: pick the file in the compute pool,
 * make the line (a new line of this one shot, or the stored line with it added), check it
 * and interpret it in the pool. The routes (server/routes/survey-gathers.ts) store the
 * answer in one store call; the demo seed (server/seed.ts) runs the same steps for Demo A's
 * files and stores them all in one transaction. Nothing here writes.
 *
 * A line built shot by shot has, at first, no forward and reverse pair: the survey check's
 * `no-opposing-shots` problem alone does not refuse it (the line is stored with the
 * interpretation's own warnings, no-coverage and the like); every other problem does.
 */
import type { ComputePool } from './compute/pool.js';
import { AppError, problemsError } from './errors.js';
import { seg2Error } from './routes/gathers.js';
import { defaultShotId, lineFromShot, lineWithShot, shotFromPicks, type DroppedPick } from './gather-survey.js';
import { layoutChangeMessage } from './revision-layout.js';
import { validateSurvey } from '../engine/survey/validate.js';
import type { Survey } from '../engine/survey/survey.js';
import type { GatherOverrides } from '../engine/seg2/gather.js';
import type { GatherPicksResponse } from '../engine/picking/gather-picks.js';
import type { Interpretation } from '../engine/output/interpretation.js';

/** Problems a line being built shot by shot may have and still be stored. */
const ALLOWED_WHILE_BUILDING = new Set(['no-opposing-shots']);

/** A gather's line, checked and interpreted, ready to be stored. */
export interface PreparedGatherLine {
  shotId: string;
  dropped: DroppedPick[];
  survey: Survey;
  interpretation: Interpretation;
}

/** The survey check, letting a line under construction through (see the file comment). */
export function checkedWhileBuilding(survey: Survey): Survey {
  const result = validateSurvey(survey);
  if (result.survey !== null) return result.survey;
  if (result.problems.every((p) => ALLOWED_WHILE_BUILDING.has(p.code))) return survey;
  throw problemsError('invalid_survey', result.problems.filter((p) => !ALLOWED_WHILE_BUILDING.has(p.code)));
}

/** The file read and picked in the pool; 400 `invalid_seg2` (with the byte offset) when it cannot be read. */
export async function pickGather(compute: ComputePool, bytes: Uint8Array, overrides: GatherOverrides, signal?: AbortSignal): Promise<GatherPicksResponse> {
  const result = await compute.run('gatherPicks', { bytes, overrides }, signal);
  if (!result.ok) throw seg2Error(result.error);
  return result.picks;
}

/** A new line of this one shot, checked and interpreted. */
export async function newLineFromGather(
  compute: ComputePool,
  picks: GatherPicksResponse,
  options: { shotId?: string; name?: string },
  signal?: AbortSignal,
): Promise<PreparedGatherLine> {
  const shotId = options.shotId ?? defaultShotId(picks.shot.x);
  const { shot, dropped } = shotFromPicks(picks, shotId);
  const survey = checkedWhileBuilding(lineFromShot(picks, shot, options.name));
  const interpretation = await compute.run('interpret', { survey }, signal);
  return { shotId, dropped, survey, interpretation };
}

/**
 * The stored line (as given: its latest revision) with this shot added or replaced, checked
 * and interpreted; 409 `layout_changed` when the geophones differ and `confirmLayout` is false.
 */
export async function lineWithGather(
  compute: ComputePool,
  stored: { revision: number; name: string; survey: Survey },
  picks: GatherPicksResponse,
  options: { shotId?: string; confirmLayout: boolean },
  signal?: AbortSignal,
): Promise<PreparedGatherLine & { replaced: boolean }> {
  const shotId = options.shotId ?? defaultShotId(picks.shot.x);
  const { shot, dropped } = shotFromPicks(picks, shotId);
  const extended = lineWithShot(stored, picks.geophones, shot, options.confirmLayout);
  if (!extended.ok) throw new AppError('layout_changed', { message: layoutChangeMessage(extended.change), path: '/geophones', layoutChange: extended.change });
  const survey = checkedWhileBuilding(extended.survey);
  const interpretation = await compute.run('interpret', { survey }, signal);
  return { shotId, dropped, survey, interpretation, replaced: extended.replaced };
}
