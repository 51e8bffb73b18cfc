/**
 * "no-coverage": why a geophone got no plus time, told once per run of neighbouring
 * geophones with the same reason, e.g. "geophones at x = 0–6 m: only direct arrivals from
 * W-end and no off-end shot on that side to phantom from".
 */
import type { Survey } from '../survey/survey.js';
import type { Warning } from '../output/interpretation.js';
import { refractedTimes } from '../branches/refracted-times.js';
import type { EndShotPhantom } from '../plus-minus/end-shot-phantoms.js';
import type { PairPlusMinus } from '../plus-minus/refractor-plus-times.js';
import { positionText } from './wording.js';

/** One warning per run of uncovered geophones sharing a reason. Cost: O(geophones · (pairs + phantoms)). */
export function coverageWarnings(survey: Survey, pairs: PairPlusMinus[], phantoms: EndShotPhantom[], plusTimeMs: (number | null)[]): Warning[] {
  const reasons = survey.geophones.map((_, i) => (plusTimeMs[i] !== null ? null : noCoverageReason(survey, pairs, phantoms, i)));
  const warnings: Warning[] = [];
  let start = 0;
  for (let i = 1; i <= reasons.length; i++) {
    if (i < reasons.length && reasons[i] === reasons[start]) continue;
    const reason = reasons[start];
    if (reason !== null) {
      const from = survey.geophones[start].x;
      const to = survey.geophones[i - 1].x;
      const where = i - 1 === start ? `geophone at x = ${positionText(from)} m` : `geophones at x = ${positionText(from)}–${positionText(to)} m`;
      warnings.push({ code: 'no-coverage', message: `No delay time or depth at ${where}: ${reason}.`, x: from });
    }
    start = i;
  }
  return warnings;
}

function noCoverageReason(survey: Survey, pairs: PairPlusMinus[], phantoms: EndShotPhantom[], i: number): string {
  const x = survey.geophones[i].x;
  if (pairs.length === 0) return 'no opposing pair of shots records refracted arrivals toward each other';
  const bracketing = pairs.filter((p) => p.left.x < x && x < p.right.x).sort((p, q) => q.right.x - q.left.x - (p.right.x - p.left.x));
  if (bracketing.length === 0) {
    const hasLeft = pairs.some((p) => p.left.x < x);
    return hasLeft ? 'no shot beyond it on the right records refracted arrivals toward it' : 'no shot beyond it on the left records refracted arrivals toward it';
  }
  const pair = bracketing[0];
  const parts: string[] = [];
  for (const [shot, side] of [
    [pair.left, 'right'],
    [pair.right, 'left'],
  ] as const) {
    const own = refractedTimes(survey, shot, side)[i];
    const phantom = phantoms.find((w) => w.shot.id === shot.id && w.side === side);
    if (own !== null || (phantom?.result && phantom.result.timesMs[i] !== null)) continue;
    const branch = shot.branchOfPick[i];
    const what =
      branch === null
        ? `no pick from ${shot.id}`
        : branch === 0
          ? `only direct arrivals from ${shot.id}`
          : `arrivals from ${shot.id} belong to the second refractor`;
    let why = '';
    if (phantom) {
      if (phantom.candidates.length === 0) why = ' and no off-end shot on that side to phantom from';
      else if (!phantom.result) why = ` and too few common refracted arrivals with ${phantom.candidates.join(', ')} to phantom from`;
      else why = ` and ${phantom.from!.id} has no refracted arrival there to phantom from`;
    }
    parts.push(what + why);
  }
  return parts.length > 0 ? parts.join('; ') : `no pair of opposing shots gives both arrivals there`;
}
