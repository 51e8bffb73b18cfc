/**
 * The number of layers chosen by the picks (issue 10): when the layer count is not forced
 * and the interpretation's forward-model misfit is high, the two-layer and the three-layer
 * interpretations (options.layers forced to 2 and to 3) are made as well and the three
 * candidates compared by the Bayesian information criterion (Schwarz, Annals of Statistics
 * 6, 1978) with the pick uncertainty σ as the known noise:
 *     BIC = χ² + k·ln n,   χ² = Σ (residual/σ)² = n·RMS²/σ²,
 * n the picks compared, k the free parameters: one depth per station per refractor plus one
 * velocity per layer (k = N + 2 for two layers, 2N + 3 for three; our choice, and a
 * conservative one: the depths are smoothed and derived, so the true count is lower, and
 * counting every depth makes the extra layer dearer, which keeps two-layer lines two-layer).
 * The lowest BIC is taken; ties keep the picks' own ('auto') candidate. A three-layer
 * candidate whose V3 is less than SECOND_REFRACTOR_MIN_CONTRAST × V2 is not a candidate: the
 * same contrast the branch assignment asks of a second refractor (assign-branches.ts), so a
 * misfit the extra layer lowers without being a distinct layer never adds one.
 * The RMS is the rounded qc.residuals.rmsMs (0.01 ms), so χ² is exact to about 2·0.005/RMS.
 * Cost: at most two more interpretations with their residuals, and only on a line whose
 * residuals are already high (RESIDUALS_HIGH_FACTOR·σ, residuals.ts); none otherwise.
 */
import type { Interpretation, LayerCandidate, LayerChoice, Warning } from '../output/interpretation.js';
import { RESIDUALS_HIGH_FACTOR } from './residuals.js';
import { SECOND_REFRACTOR_MIN_CONTRAST } from '../branches/assign-branches.js';
import { timeText } from './wording.js';

/** BIC of one interpretation, or null without residuals. O(1). */
export function layerCandidate(label: LayerCandidate['label'], interp: Interpretation, sigmaMs: number): LayerCandidate | null {
  const res = interp.qc.residuals;
  if (!res || !(res.count > 0) || !(sigmaMs > 0)) return null;
  const layers = interp.layers.length;
  // A forced run that did not come out with the layer count it forced (the branch
  // assignment found no second refractor on any side) repeats another candidate.
  if ((label === 'three-layer' && layers !== 3) || (label === 'two-layer' && layers !== 2)) return null;
  if (layers === 3 && !(interp.layers[2].velocity >= SECOND_REFRACTOR_MIN_CONTRAST * interp.layers[1].velocity)) return null;
  const stations = interp.stations.length;
  const parameters = (layers - 1) * stations + layers;
  const chiSquare = (res.count * res.rmsMs * res.rmsMs) / (sigmaMs * sigmaMs);
  const bic = chiSquare + parameters * Math.log(res.count);
  return { label, layers, rmsMs: res.rmsMs, count: res.count, chiSquare: round1(chiSquare), parameters, bic: round1(bic) };
}

/** True when the line's misfit calls for comparing layer counts (unforced line, residuals high). */
export function needsLayerChoice(interp: Interpretation, sigmaMs: number, forcedLayers: 2 | 3 | null): boolean {
  const rms = interp.qc.residuals?.rmsMs;
  return forcedLayers === null && typeof rms === 'number' && rms > RESIDUALS_HIGH_FACTOR * sigmaMs;
}

/**
 * The candidate with the lowest BIC (first listed on ties, so list 'auto' first), with
 * qc.layerChoice and a `layer-count-chosen` note added. `others` are the forced
 * interpretations; candidates without residuals are left out.
 */
export function chooseLayerCount(auto: Interpretation, others: { label: LayerCandidate['label']; interp: Interpretation }[], sigmaMs: number): Interpretation {
  const all = [{ label: 'auto' as const, interp: auto }, ...others]
    .map((c) => ({ ...c, cand: layerCandidate(c.label, c.interp, sigmaMs) }))
    .filter((c): c is typeof c & { cand: LayerCandidate } => c.cand !== null);
  if (all.length < 2) return auto;
  let best = all[0];
  for (const c of all) if (c.cand.bic < best.cand.bic) best = c;
  const layerChoice: LayerChoice = { criterion: 'bic', candidates: all.map((c) => c.cand), chosen: best.label };
  const list = all.map((c) => `${c.label} (${c.cand.layers} layers): RMS ${timeText(c.cand.rmsMs)} ms, BIC ${c.cand.bic}`).join('; ');
  const note: Warning = {
    code: 'layer-count-chosen',
    message:
      `The first interpretation misfit the picks (RMS ${typeof auto.qc.residuals?.rmsMs === 'number' ? timeText(auto.qc.residuals.rmsMs) : 'unknown'} ms against a pick uncertainty of ${timeText(sigmaMs)} ms), so two- and three-layer interpretations were compared by their forward-model misfit, penalised per free parameter (Bayesian information criterion, Schwarz 1978): ${list}. ` +
      `Taken: ${best.cand.layers} layers (${best.label}). Check the choice against boreholes or test pits; a layer count the picks barely support changes depths to rock.`,
  };
  return { ...best.interp, qc: { ...best.interp.qc, warnings: [...best.interp.qc.warnings, note], layerChoice } };
}

function round1(v: number): number {
  return Math.round(v * 10) / 10;
}
