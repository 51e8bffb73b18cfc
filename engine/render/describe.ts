/**
 * Words and positions both plots share: the line's name, the method in words, where each
 * shot is drawn, and a one-line summary of the checks.
 */
import type { MethodName, Survey } from '../survey/survey.js';
import type { Interpretation } from '../output/interpretation.js';
import type { ShotPlacement } from './section-markers.js';
import { formatMetres, formatMs } from './format.js';

export function lineName(survey: Survey, interpretation: Interpretation): string {
  const name = interpretation.name ?? survey.name;
  return typeof name === 'string' && name.trim().length > 0 ? name : 'Unnamed line';
}

const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];

/**
 * The survey's free-text date line (site, date of shooting, crew) as people read it: a bare
 * ISO date ("2024-05-14") in words ("shot on 14 May 2024"), anything else as the survey gives
 * it. Written by hand (no Intl), so every render is the same on every machine; the drawings'
 * title blocks and the share page both use it.
 */
export function surveyDateText(text: string): string {
  const match = /^(\d{4})-(\d{2})-(\d{2})$/.exec(text.trim());
  if (!match) return text;
  const [year, month, day] = [Number(match[1]), Number(match[2]), Number(match[3])];
  // Gregorian leap years: every 4th, not every 100th, every 400th.
  const leap = (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0;
  const days = [31, leap ? 29 : 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
  if (month < 1 || month > 12 || day < 1 || day > days[month - 1]) return text;
  return `shot on ${day} ${MONTHS[month - 1]} ${year}`;
}

/** The method in words for a title block; GRM adds the XY it took (Palmer 1980), as a geophysicist reading the sheet needs it. */
export function describeInterpretationMethod(interpretation: Pick<Interpretation, 'method' | 'grm' | 'timeTerm'>): string {
  const words = describeMethod(interpretation.method);
  if (interpretation.method === 'grm' && interpretation.grm) return `${words}, optimum XY ${formatMetres(interpretation.grm.optimumXy)}`;
  // Time terms: the inversion's misfit is what tells the reader how well one delay per position fits.
  if (interpretation.method === 'time-term' && interpretation.timeTerm) return `${words}, ${interpretation.timeTerm.picks} head-wave picks, RMS ${formatMs(interpretation.timeTerm.rmsMs)}`;
  return words;
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

/**
 * Notes for the title block: residual RMS and failed reciprocal checks. The warnings are not
 * counted here ("1 warning" tells a reader nothing): the plots say them in words, under the
 * title (warningSummary).
 */
export function qcSummary(interpretation: Interpretation): { text: string; role: string; alert?: boolean }[] {
  const notes: { text: string; role: string; alert?: boolean }[] = [];
  const residuals = interpretation.qc?.residuals;
  if (residuals && Number.isFinite(residuals.rmsMs)) notes.push({ text: `picks vs model RMS ${formatMs(residuals.rmsMs)}`, role: 'qc-summary' });
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
