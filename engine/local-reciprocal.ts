/**
 * Reciprocal times read locally. engine/reciprocal.ts reads the time shot A records at
 * shot B's position from a geophone at B when there is one, else from A's whole refracted
 * branch line. Over a step or a lateral velocity change the branch is not one straight
 * line, and a time extrapolated along the whole-branch line errs by a millisecond or more;
 * that error enters every plus time of the pair (T+ = tAG + tBG − tAB, Hagedoorn 1959).
 *
 * Here an extrapolated reading is replaced by one from A's refracted picks nearest to B:
 * inside the picks, linear interpolation between the two picks either side of B (the
 * branch is straight between neighbouring geophones); beyond them, the least-squares line
 * through the LOCAL_PICKS picks nearest B, grown pick by pick while the next one stays
 * within 3σ of it (the last straight piece of the branch; common practice). The check (difference within tolerance) is then redone with the new readings,
 * and the misfit warnings follow it. Readings at a geophone are kept as they are.
 * Units: m, ms.
 */
import { linearRegression } from 'simple-statistics';
import type { Survey } from './survey.js';
import type { ReciprocalCheck, ShotAnalysis, Warning } from './interpretation.js';

/** Refracted picks nearest the other shot used to extrapolate beyond the spread. Common practice. */
export const LOCAL_PICKS = 8;

/** Largest gap between the two picks either side of the other shot that is interpolated, in geophone spacings. */
const MAX_INTERPOLATION_GAP_SPACINGS = 2.5;

interface Pick {
  x: number;
  t: number;
}

/** The shot's own first-refractor picks on the side of it facing atX, in x order. */
function refractedPicksToward(survey: Survey, shot: ShotAnalysis, atX: number): Pick[] {
  const times = survey.shots.find((s) => s.id === shot.id)?.times ?? [];
  const right = atX > shot.x;
  const out: Pick[] = [];
  survey.geophones.forEach((g, i) => {
    const t = times[i];
    if (shot.branchOfPick[i] !== 1 || typeof t !== 'number' || !Number.isFinite(t)) return;
    if (right ? g.x > shot.x : g.x < shot.x) out.push({ x: g.x, t });
  });
  return out.sort((a, b) => a.x - b.x);
}

/** Time the shot records at atX from its nearest refracted picks, ms; null with too few. */
export function localTimeAtMs(survey: Survey, shot: ShotAnalysis, atX: number, spacingM: number, pickSigmaMs: number): number | null {
  const picks = refractedPicksToward(survey, shot, atX);
  if (picks.length < 2) return null;
  const after = picks.findIndex((p) => p.x >= atX);
  if (after > 0) {
    const a = picks[after - 1];
    const b = picks[after];
    if (b.x - a.x <= MAX_INTERPOLATION_GAP_SPACINGS * spacingM) return a.t + ((b.t - a.t) * (atX - a.x)) / (b.x - a.x || 1);
  }
  const byDistance = [...picks].sort((p, q) => Math.abs(p.x - atX) - Math.abs(q.x - atX));
  const used = byDistance.slice(0, LOCAL_PICKS);
  if (used.length < 3) return null;
  let line = linearRegression(used.map((p) => [p.x, p.t]));
  // Grow the straight piece while the next pick stays on it (3σ): more picks, a steadier
  // line, but never across a jump or a bend of the branch.
  for (const p of byDistance.slice(LOCAL_PICKS)) {
    if (Math.abs(p.t - (line.m * p.x + line.b)) > 3 * pickSigmaMs) break;
    used.push(p);
    line = linearRegression(used.map((q) => [q.x, q.t]));
  }
  const t = line.m * atX + line.b;
  return Number.isFinite(t) ? t : null;
}

const ms = (v: number): string => v.toFixed(1);

/**
 * Re-reads every extrapolated reciprocal time locally and redoes the checks. Returns new
 * check objects (the inputs are not changed) and the misfit warnings, rewritten for the
 * pairs whose outcome changed.
 */
export function refineReciprocalChecks(
  survey: Survey,
  shots: ShotAnalysis[],
  checks: ReciprocalCheck[],
  warnings: Warning[],
  spacingM: number,
  pickSigmaMs: number,
): { checks: ReciprocalCheck[]; warnings: Warning[] } {
  const byId = new Map(shots.map((s) => [s.id, s]));
  const changed = new Set<string>();
  const out = checks.map((c) => {
    const a = byId.get(c.shots[0]);
    const b = byId.get(c.shots[1]);
    if (!a || !b) return c;
    const forward = c.forwardSource === 'extrapolated' ? localTimeAtMs(survey, a, b.x, spacingM, pickSigmaMs) : null;
    const reverse = c.reverseSource === 'extrapolated' ? localTimeAtMs(survey, b, a.x, spacingM, pickSigmaMs) : null;
    if (forward === null && reverse === null) return c;
    const forwardMs = forward ?? c.forwardMs;
    const reverseMs = reverse ?? c.reverseMs;
    const differenceMs = Math.abs(forwardMs - reverseMs);
    const tolerance = c.toleranceMs ?? 0;
    const ok = differenceMs <= tolerance;
    if (ok !== c.ok) changed.add(c.shots.join('\u0000'));
    return { ...c, forwardMs, reverseMs, differenceMs, ok, extrapolation: 'local-picks' as const };
  });
  const kept = warnings.filter((w) => {
    if (w.code !== 'reciprocal-misfit') return true;
    return !out.some((c) => changed.has(c.shots.join('\u0000')) && w.message.startsWith(`Reciprocal times of shots ${c.shots[0]} and ${c.shots[1]} `));
  });
  for (const c of out) {
    if (!changed.has(c.shots.join('\u0000')) || c.ok) continue;
    const [a, b] = c.shots;
    kept.push({
      code: 'reciprocal-misfit',
      message:
        `Reciprocal times of shots ${a} and ${b} differ by ${ms(c.differenceMs)} ms ` +
        `(${a}→${b} ${ms(c.forwardMs)} ms, ${b}→${a} ${ms(c.reverseMs)} ms; ` +
        `tolerance ${ms(c.toleranceMs ?? 0)} ms): check the picks near both shots and their trigger times.`,
    });
  }
  return { checks: out, warnings: kept };
}
