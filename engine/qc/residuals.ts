/**
 * Closing the loop: first arrivals modelled through the interpreted section, and the
 * residuals of the picks against them (api-v1.md, `qc.residuals`, `shots[].modelledMs`).
 *
 *   residual = pick − modelled first arrival   (ms, per shot and geophone)
 *   RMS      = sqrt(Σ residual² / n)           over every pick with a modelled time
 *
 * The section becomes a layered model (forward/interpretation-model.ts: ground through the
 * geophones and shots, V1 per station, the refractor through the station refractor
 * elevations, the refractor velocity segments, a second refractor when interpreted), and
 * every shot is solved through it by fast marching (forward/eikonal.ts: Sethian 1996,
 * second-order upwind differences after Sethian 1999). A pick that the interpretation
 * explains leaves a residual of about the pick noise; a pattern of large residuals along a
 * shot points to something the section misses (a step, a velocity change, a third layer)
 * or to picks on the wrong branch.
 *
 * A pick at a geophone that coincides with its shot (0 ms by definition) is left out.
 * Modelled times are given over the stretch each shot was recorded on (recordedSpread),
 * null beyond it.
 * When the overall RMS exceeds RESIDUALS_HIGH_FACTOR × the pick uncertainty
 * (options.pickUncertaintyMs, resolved in options.ts), a "residuals-high" warning
 * names the worst shots. An interpretation with no depths, or with no V1 or V2, gets no
 * residuals and a "residuals-not-computed" warning; this function never throws.
 *
 * Cost: one grid build and one solve per shot on one shared workspace, each march stopped
 * once the nodes around the geophones are final; the grid's cell is chosen in
 * interpretation-model.ts (≤ 0.5 m, ≤ spacing/6, capped in nodes). Measured in
 * docs/developers/residuals.md.
 */
import type { Survey } from '../survey/survey.js';
import type { Interpretation, ShotAnalysis, Warning } from '../output/interpretation.js';
import { buildVelocityGrid } from '../forward/model.js';
import { MarchWorkspace, sampleTime, samplingNodes, solveOnWorkspace } from '../forward/eikonal.js';
import { elevationAt } from '../forward/polyline.js';
import { modelFromInterpretation, residualGridExtent } from '../forward/interpretation-model.js';
import { resolveOptions, type ResolvedOptions } from '../survey/options.js';
import { roundTo } from '../shared/numbers.js';
import { roundMs, roundMsOrNull } from '../output/output-decimals.js';
import { timeText } from './wording.js';

/**
 * Residuals are called high when their RMS exceeds this many pick uncertainties. Common
 * practice: a fit within about twice the pick error is accepted as explaining the picks.
 */
export const RESIDUALS_HIGH_FACTOR = 2;

/** Most shots a "residuals-high" warning names. */
const WORST_SHOTS_NAMED = 3;

/** Residuals of one shot. */
export interface ShotResiduals {
  shot: string;
  /** Modelled first arrival at every geophone, ms (null where no path reaches). */
  modelledMs: (number | null)[];
  /** pick − modelled, ms; null where there is no pick or no modelled time, or at the shot. */
  residualMs: (number | null)[];
  /** RMS of the residuals, ms; null when the shot has none. */
  rmsMs: number | null;
  count: number;
}

export interface ResidualsComputed {
  ok: true;
  shots: ShotResiduals[];
  /** RMS over all residuals of the line, ms. */
  rmsMs: number | null;
  count: number;
  /** Grid cell of the forward model, m, and its node count. */
  cellM: number;
  nodes: number;
  /** How the refractor was continued beyond the outermost depth. */
  refractorContinuation: 'planar-dip' | 'flat';
  /** Shots the solver could not start (source outside the model), with the reason. */
  failedShots: { shot: string; reason: string }[];
}

export interface ResidualsNotComputed {
  ok: false;
  reason: string;
}

/**
 * The stretch of the line a shot was recorded on: from its first to its last geophone with
 * a pick (dead traces inside it included). Times are modelled there only: beyond it there
 * is no pick to compare with, and on a rolling line a shot's march would otherwise run on
 * under every geophone of the line (a 240-geophone line with 48 live per shot cost 5.8× its
 * interpretation). O(G).
 */
function recordedSpread(survey: Survey, times: readonly (number | null)[]): { covers: (x: number) => boolean } {
  let lo = Infinity;
  let hi = -Infinity;
  survey.geophones.forEach((g, i) => {
    const t = times[i];
    if (typeof t === 'number' && Number.isFinite(t)) {
      lo = Math.min(lo, g.x);
      hi = Math.max(hi, g.x);
    }
  });
  return { covers: (x) => x >= lo - 1e-6 && x <= hi + 1e-6 };
}

/**
 * Modelled first arrivals and residuals of every shot (see the file comment). Pure,
 * deterministic, unrounded; never throws.
 */
export function computeResiduals(survey: Survey, interpretation: Interpretation): ResidualsComputed | ResidualsNotComputed {
  try {
    const built = modelFromInterpretation(survey, interpretation);
    if (!built.ok) return { ok: false, reason: built.reason };
    const { extent, nodes } = residualGridExtent(built, survey);
    const grid = buildVelocityGrid(built.model, extent);
    // One workspace for every shot, and the nodes each geophone is read from: each shot's
    // march stops once the nodes of the geophones it recorded are accepted (their times are
    // then final; eikonal.ts).
    const workspace = new MarchWorkspace(grid);
    const geophoneNodes = survey.geophones.map((g, i) => samplingNodes(grid, g.x, interpretation.stations[i]?.elevation ?? g.elevation ?? 0));
    const failedShots: { shot: string; reason: string }[] = [];
    let sumSq = 0;
    let count = 0;
    const shots = survey.shots.map((shot): ShotResiduals => {
      const z = shotSourceElevation(survey, interpretation, shot.id, shot.x, built.model.surface);
      const source = { x: shot.x, z };
      const recorded = recordedSpread(survey, shot.times);
      const receiverNodes: number[] = [];
      survey.geophones.forEach((g, i) => {
        if (recorded.covers(g.x)) for (const k of geophoneNodes[i]) receiverNodes.push(k);
      });
      let times: Float64Array;
      try {
        times = solveOnWorkspace(workspace, source, {}, receiverNodes);
      } catch (error) {
        failedShots.push({ shot: shot.id, reason: error instanceof Error ? error.message : String(error) });
        const none = survey.geophones.map(() => null);
        return { shot: shot.id, modelledMs: none, residualMs: none, rmsMs: null, count: 0 };
      }
      const modelledMs = survey.geophones.map((g, i) => {
        const ge = interpretation.stations[i]?.elevation ?? g.elevation ?? 0;
        if (Math.abs(g.x - shot.x) < 1e-6) return 0;
        if (!recorded.covers(g.x)) return null;
        const t = sampleTime(grid, times, g.x, ge, source);
        return Number.isFinite(t) ? t : null;
      });
      let shotSq = 0;
      let shotCount = 0;
      const residualMs = modelledMs.map((m, i) => {
        const pick = shot.times[i];
        if (m === null || typeof pick !== 'number' || !Number.isFinite(pick)) return null;
        if (Math.abs(survey.geophones[i].x - shot.x) < 1e-6) return null;
        const r = pick - m;
        shotSq += r * r;
        shotCount++;
        return r;
      });
      sumSq += shotSq;
      count += shotCount;
      return { shot: shot.id, modelledMs, residualMs, rmsMs: shotCount > 0 ? Math.sqrt(shotSq / shotCount) : null, count: shotCount };
    });
    return {
      ok: true,
      shots,
      rmsMs: count > 0 ? Math.sqrt(sumSq / count) : null,
      count,
      cellM: extent.cellM,
      nodes,
      refractorContinuation: built.continuation,
      failedShots,
    };
  } catch (error) {
    // The model is built from checked numbers, so this is not expected; still, a QC step
    // must never take the interpretation down with it.
    return { ok: false, reason: `the forward model failed (${error instanceof Error ? error.message : String(error)})` };
  }
}

/**
 * The interpretation with residuals attached: a new object whose shots carry `modelledMs`
 * (and `residualMs`), whose qc carries `residuals` {rmsMs, perShot: [{shot, rmsMs}], …},
 * and whose warnings gain "residuals-high" or "residuals-not-computed" when due. With
 * options.residuals false (options.ts) the interpretation is returned as it is.
 */
export function withResiduals(survey: Survey, interpretation: Interpretation, options: ResolvedOptions = resolveOptions(survey.options)): Interpretation {
  if (!options.residuals) return interpretation;
  const result = computeResiduals(survey, interpretation);
  const warnings: Warning[] = [...interpretation.qc.warnings];
  if (!result.ok) {
    warnings.push({
      code: 'residuals-not-computed',
      message: `The picks were not checked against first arrivals modelled through the section: ${result.reason}.`,
    });
    return { ...interpretation, qc: { ...interpretation.qc, warnings } };
  }
  const byId = new Map(result.shots.map((s) => [s.shot, s]));
  const shots: (ShotAnalysis & { residualMs?: (number | null)[] })[] = interpretation.shots.map((a) => {
    const r = byId.get(a.id);
    return r ? { ...a, modelledMs: r.modelledMs.map(roundMsOrNull), residualMs: r.residualMs.map(roundMsOrNull) } : a;
  });
  for (const f of result.failedShots) {
    warnings.push({ code: 'residuals-shot-not-modelled', message: `No first arrivals were modelled for shot ${f.shot}: ${f.reason}` });
  }
  const perShot = result.shots
    .filter((s): s is ShotResiduals & { rmsMs: number } => s.rmsMs !== null)
    .map((s) => ({ shot: s.shot, rmsMs: roundMs(s.rmsMs), count: s.count }));
  if (result.rmsMs === null) {
    warnings.push({
      code: 'residuals-not-computed',
      message: 'No pick could be compared with a modelled first arrival, so the section was not checked against the picks.',
    });
    return { ...interpretation, shots, qc: { ...interpretation.qc, warnings } };
  }
  const uncertaintyMs = options.pickUncertaintyMs;
  const limitMs = RESIDUALS_HIGH_FACTOR * uncertaintyMs;
  if (result.rmsMs > limitMs) warnings.push(residualsHighWarning(result, uncertaintyMs, limitMs));
  return {
    ...interpretation,
    shots,
    qc: {
      ...interpretation.qc,
      warnings,
      residuals: {
        rmsMs: roundMs(result.rmsMs),
        perShot,
        count: result.count,
        cellM: roundTo(result.cellM, 3),
        refractorContinuation: result.refractorContinuation,
      } as NonNullable<Interpretation['qc']['residuals']>,
    },
  };
}

/** "residuals-high": the overall RMS and the worst shots, worst first. */
function residualsHighWarning(result: ResidualsComputed, uncertaintyMs: number, limitMs: number): Warning {
  const ranked = result.shots
    .filter((s): s is ShotResiduals & { rmsMs: number } => s.rmsMs !== null)
    .sort((a, b) => b.rmsMs - a.rmsMs);
  const over = ranked.filter((s) => s.rmsMs > limitMs);
  const named = (over.length > 0 ? over : ranked).slice(0, WORST_SHOTS_NAMED);
  const list = named.map((s) => `${s.shot} (${fmtMs(s.rmsMs)} ms)`).join(', ');
  return {
    code: 'residuals-high',
    message:
      `The picks differ from first arrivals modelled through the interpreted section by ${fmtMs(result.rmsMs as number)} ms RMS, ` +
      `more than ${RESIDUALS_HIGH_FACTOR} × the pick uncertainty of ${fmtMs(uncertaintyMs)} ms. Worst: ${list}. ` +
      'The section may miss a step, a change of velocity or a third layer, or picks may sit on the wrong branch.',
  };
}

/** Source elevation: the shot's own, the one the interpretation used, else the modelled ground. */
function shotSourceElevation(
  survey: Survey,
  interpretation: Interpretation,
  id: string,
  x: number,
  surface: readonly { x: number; elevation: number }[],
): number {
  const ground = elevationAt(surface, x);
  const own = survey.shots.find((s) => s.id === id)?.elevation;
  const analysed = interpretation.shots?.find((s) => s.id === id)?.elevation;
  const z = typeof own === 'number' ? own : typeof analysed === 'number' ? analysed : ground;
  // A shot at a geophone's x sits on the modelled ground there (the geophone's elevation);
  // a source above the ground would be in the air.
  return Math.min(z, ground);
}

/** A time in a warning, as the page shows it (0.1 ms). */
const fmtMs = (v: number): string => timeText(v);
