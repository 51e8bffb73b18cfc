/**
 * Words and positions both plots share: the line's name, the method in words, where each
 * shot is drawn, and a one-line summary of the checks.
 */
import type { MethodName, Survey } from '../survey/survey.js';
import type { Interpretation } from '../output/interpretation.js';
import type { ShotPlacement } from './section-markers.js';
import { formatMs } from './format.js';

export function lineName(survey: Survey, interpretation: Interpretation): string {
  const name = interpretation.name ?? survey.name;
  return typeof name === 'string' && name.trim().length > 0 ? name : 'Unnamed line';
}

export function describeMethod(method: MethodName | undefined): string {
  switch (method) {
    case 'plus-minus':
      return 'plus-minus method';
    case 'grm':
      return 'generalised reciprocal method';
    case 'time-term':
      return 'time-term method';
    default:
      return '';
  }
}

/**
 * Where to draw each shot: the elevation the interpretation used (its ShotAnalysis), else
 * the survey's, else the nearest geophone's — only to place the star, never used in a sum.
 */
export function shotPlacements(survey: Survey, interpretation: Interpretation): ShotPlacement[] {
  const analysed = new Map((interpretation.shots ?? []).map((s) => [s.id, s]));
  return survey.shots.map((shot) => {
    const a = analysed.get(shot.id);
    let elevation = a?.elevation ?? shot.elevation;
    if (elevation === undefined || !Number.isFinite(elevation)) {
      let nearest: number | undefined;
      let best = Infinity;
      for (const g of survey.geophones) {
        const d = Math.abs(g.x - shot.x);
        if (d < best) {
          best = d;
          nearest = g.elevation ?? 0;
        }
      }
      elevation = nearest ?? 0;
    }
    return { id: shot.id, x: shot.x, elevation };
  });
}

/** Notes for the title block: warnings count, residual RMS, failed reciprocal checks. */
export function qcSummary(interpretation: Interpretation): { text: string; role: string; alert?: boolean }[] {
  const notes: { text: string; role: string; alert?: boolean }[] = [];
  const warnings = interpretation.qc?.warnings ?? [];
  const residuals = interpretation.qc?.residuals;
  const parts: string[] = [];
  parts.push(warnings.length === 1 ? '1 warning' : `${warnings.length} warnings`);
  if (residuals && Number.isFinite(residuals.rmsMs)) parts.push(`picks vs model RMS ${formatMs(residuals.rmsMs)}`);
  notes.push({ text: parts.join(' · '), role: 'qc-summary' });
  const failed = (interpretation.qc?.reciprocal ?? []).filter((r) => !r.ok);
  if (failed.length > 0) {
    const worst = failed.reduce((a, b) => (Math.abs(b.differenceMs) > Math.abs(a.differenceMs) ? b : a));
    notes.push({
      text: `reciprocal check failed (${failed.length}): ${worst.shots[0]}/${worst.shots[1]} Δ ${formatMs(Math.abs(worst.differenceMs))}`,
      role: 'reciprocal-alert',
      alert: true,
    });
  }
  return notes;
}
