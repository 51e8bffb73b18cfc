// Builds the parts of the page from an interpretation. Text goes in through textContent
// only: names, messages and numbers come from files the page does not control.

import { degrees, describePath, metres, milliseconds, refractorDepthRanges, rockStepWords, velocity } from './describe.js';
import { cellText, stationColumns } from './station-columns.js';
import { hiddenLayerNote, otherWarnings } from './hidden-layer-note.js';

/**
 * @typedef {import('../engine/output/interpretation.js').Interpretation} Interpretation
 * @typedef {import('../engine/output/interpretation.js').Station} Station
 * @typedef {import('../engine/output/interpretation.js').Warning} Warning
 * @typedef {import('./api.js').Failure} Failure
 * @typedef {import('./describe.js').SurveyNames} SurveyNames
 */

/**
 * Creates an element with optional class and text; typed by its tag, as createElement is.
 * @template {keyof HTMLElementTagNameMap} K
 * @param {K} tag
 * @param {string} [className]
 * @param {unknown} [text]
 * @returns {HTMLElementTagNameMap[K]}
 */
export function el(tag, className, text) {
  const node = document.createElement(tag);
  if (className) node.className = className;
  if (text !== undefined && text !== null) node.textContent = String(text);
  return node;
}

/**
 * Fills the station table: one row per geophone, in order. The columns, their units and
 * decimals come from station-columns.js, the same list the share page and stations.csv use.
 * @param {HTMLTableRowElement} headRow
 * @param {HTMLTableSectionElement} body
 * @param {readonly Station[]} stations
 */
export function renderStationTable(headRow, body, stations) {
  const columns = stationColumns(stations);
  headRow.replaceChildren(...columns.map((c) => {
    const th = el('th', c.decimals === null ? 'text' : 'num');
    th.scope = 'col';
    th.dataset.column = c.key;
    th.append(el('span', 'col-name', c.label));
    if (c.unit) th.append(el('span', 'col-unit', c.unit));
    return th;
  }));
  body.replaceChildren(...stations.map((station) => {
    const row = el('tr');
    if (station.coverage === 'none' || station.depth === null) row.className = 'no-coverage';
    columns.forEach((c, i) => {
      const cell = el(i === 0 ? 'th' : 'td', c.decimals === null ? 'text' : 'num', cellText(c, station));
      if (i === 0) cell.scope = 'row';
      row.append(cell);
    });
    return row;
  }));
}

/**
 * @param {HTMLElement} list
 * @param {string} name
 * @param {string} value
 */
function term(list, name, value) {
  list.append(el('dt', '', name), el('dd', '', value));
}

/** @type {Readonly<Record<string, string>>} */
const METHOD_NAMES = { 'plus-minus': 'plus-minus', grm: 'generalised reciprocal method', 'time-term': 'time-term least squares' };

/**
 * Plain-words summary of layers, dip, steps, reciprocal checks and residuals.
 * @param {HTMLElement} list
 * @param {Interpretation} interpretation
 */
export function renderSummary(list, interpretation) {
  list.replaceChildren();
  if (interpretation.method) term(list, 'Method', METHOD_NAMES[interpretation.method] ?? String(interpretation.method));

  const layers = Array.isArray(interpretation.layers) ? interpretation.layers : [];
  if (layers.length) {
    term(list, 'Layer velocities', layers.map((l, i) => 'layer ' + (i + 1) + ': ' + velocity(l.velocity) + ' m/s').join(' · '));
  }

  for (const range of refractorDepthRanges(Array.isArray(interpretation.stations) ? interpretation.stations : [])) {
    term(list, range.label, range.text);
  }

  const segments = Array.isArray(interpretation.refractorVelocity) ? interpretation.refractorVelocity : [];
  if (segments.length > 1) {
    term(list, 'Refractor velocity along the line', segments
      .map((s) => metres(s.from) + '–' + metres(s.to) + ' m: ' + velocity(s.velocity) + ' m/s').join(' · '));
  }

  const features = interpretation.features ?? {};
  if (features.dip && typeof features.dip.degrees === 'number') {
    const d = features.dip.degrees;
    const toward = d > 0 ? ' (deepens toward +x)' : d < 0 ? ' (deepens toward −x)' : '';
    term(list, 'Refractor dip', degrees(Math.abs(d)) + '°' + toward);
  } else if (features.dip === null) {
    term(list, 'Refractor dip', 'no single planar dip describes the refractor');
  }

  const steps = Array.isArray(features.steps) ? features.steps : [];
  term(list, 'Steps in the refractor', steps.length
    ? steps.map((s) => 'at x = ' + metres(s.x) + ' m, throw ' + metres(s.throw) + ' m').join('; ')
    : 'none found');

  const rockSteps = rockStepWords(features.lowerRefractor);
  if (rockSteps !== null) term(list, 'Steps in the rock (second refractor)', rockSteps);

  const changes = Array.isArray(features.velocityChanges) ? features.velocityChanges : [];
  if (changes.length) {
    term(list, 'Refractor velocity changes', changes
      .map((c) => 'at x = ' + metres(c.x) + ' m: ' + velocity(c.left) + ' → ' + velocity(c.right) + ' m/s').join('; '));
  }

  const reciprocal = Array.isArray(interpretation.qc?.reciprocal) ? interpretation.qc.reciprocal : [];
  if (reciprocal.length) {
    const bad = reciprocal.filter((r) => !r.ok);
    const text = bad.length === 0
      ? (reciprocal.length === 1 ? 'the opposing shot pair agrees' : 'all ' + reciprocal.length + ' opposing shot pairs agree')
        + ' within tolerance'
      : bad.map((r) => (r.shots ?? []).join(' / ') + ' differ by ' + milliseconds(r.differenceMs) + ' ms').join('; ');
    term(list, 'Reciprocal times', text);
  }

  const residuals = interpretation.qc?.residuals;
  if (residuals && typeof residuals.rmsMs === 'number') {
    term(list, 'Picks against the model', 'RMS misfit ' + milliseconds(residuals.rmsMs) + ' ms');
  }
}

/**
 * Lists qc.warnings other than the hidden-layer caution (shown on its own, see
 * renderAllowance); hides the box when there are none.
 * @param {HTMLElement} box
 * @param {HTMLElement} list
 * @param {readonly Warning[] | undefined} warnings
 */
export function renderWarnings(box, list, warnings) {
  const items = otherWarnings(warnings);
  list.replaceChildren(...items.map((w) => {
    const li = el('li', '', w.message ?? w.code ?? 'Warning');
    // Add the place only when the message does not already name it.
    if (typeof w.x === 'number' && !/x\s*=/.test(String(w.message ?? ''))) li.append(el('span', 'where', ' (at x = ' + metres(w.x) + ' m)'));
    return li;
  }));
  box.hidden = items.length === 0;
}

/**
 * The hidden-layer allowance below the figures, in calm words with its numbers; hidden when
 * the engine gave no such caution.
 * @param {{ box: HTMLElement, headline: HTMLElement, detail: HTMLElement, reasoning: HTMLElement }} parts
 * @param {Interpretation} interpretation
 */
export function renderAllowance(parts, interpretation) {
  const note = hiddenLayerNote(interpretation);
  parts.box.hidden = note === null;
  parts.headline.textContent = note?.headline ?? '';
  parts.detail.textContent = note?.detail ?? '';
  parts.reasoning.textContent = note?.reasoning ?? '';
}

/**
 * The one line above the figures: the hidden-layer allowance in short and how many other
 * warnings are listed below the figures, so neither pushes the figures down. Hidden when empty.
 * @param {HTMLElement} line
 * @param {Interpretation} interpretation
 */
export function renderLineNotes(line, interpretation) {
  const note = hiddenLayerNote(interpretation);
  const count = otherWarnings(interpretation.qc?.warnings).length;
  line.replaceChildren();
  if (note) line.append(el('span', 'line-note allowance-note', note.short));
  if (count) {
    const link = el('a', 'line-note warning-note', count + (count === 1 ? ' warning' : ' warnings') + ' about this line, listed below the figures');
    link.href = '#warnings';
    line.append(link);
  }
  line.hidden = !note && !count;
}

/**
 * Shows a failed request beside the input: one sentence saying what did not happen, then
 * every problem once, in words, with where it is ("line 12 of the pick table, column
 * “time_ms”"). The service's own summary sentence ("… one more problem is listed in
 * problems") is not repeated when the problems themselves are listed. A JSON pointer is shown
 * only where no plain words for it exist.
 * @param {HTMLElement} box
 * @param {Pick<Failure, 'message' | 'path' | 'problems'>} failure
 * @param {SurveyNames} [survey]
 * @param {string} [what] What did not happen, e.g. "The line was not interpreted".
 */
export function renderFailure(box, failure, survey, what) {
  box.replaceChildren();
  const problems = failure.problems.length
    ? failure.problems
    : failure.path ? [{ path: failure.path, message: failure.message }] : [];
  const count = problems.length;
  const title = count === 0
    ? (what ? what + ': ' : '') + failure.message
    : (what ?? 'The request was refused') + (count === 1 ? ':' : ': ' + count + ' problems, each listed below.');
  box.append(el('p', 'message-title', title));
  if (count) {
    const list = el('ul', 'problem-list');
    for (const problem of problems) {
      const li = el('li');
      if (problem.message) li.append(el('span', '', problem.message + ' '));
      const words = describePath(problem.path, survey);
      const where = el('span', 'where', 'Where: ' + words);
      // A pointer the page has no words for is shown as it is, so it can still be found.
      if (problem.path && words === problem.path) where.replaceChildren('Where: ', el('code', '', problem.path));
      li.append(where);
      list.append(li);
    }
    box.append(list);
  }
  box.hidden = false;
}

/**
 * Marks the figures section as a preview of a line that is not stored (dashed frames, the
 * "Not stored — preview" note and caption tags), or as the stored line's figures.
 * @param {HTMLElement} figures
 * @param {boolean} preview
 */
export function markFiguresAsPreview(figures, preview) {
  figures.classList.toggle('preview', preview);
  for (const mark of figures.querySelectorAll('.preview-note, .preview-tag')) {
    if (!(mark instanceof HTMLElement)) continue;
    // Tags inside the note follow the note itself.
    if (mark.parentElement?.classList.contains('preview-note')) continue;
    mark.hidden = !preview;
  }
}
