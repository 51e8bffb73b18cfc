// The "Methods compared" figure: on request (the line is interpreted twice more), the first
// refractor by plus-minus, GRM and time terms on one section (an SVG in an <img> from a blob:
// URL, as every preview), and a table of where they differ by more than their combined 1σ.
// Words and numbers go in through textContent only.

import { compareMethods } from './api.js';
import { fixedDecimals, metresText } from '../engine/output/display-precision.js';

/**
 * @typedef {import('./api.js').MethodsAnswer} MethodsAnswer
 * @typedef {{ url: string } | { bodyText: string, format: import('./describe.js').BodyFormat }} CompareSource
 * @typedef {{ button: HTMLButtonElement, status: HTMLElement, frame: HTMLElement, image: HTMLImageElement, table: HTMLTableElement, body: HTMLTableSectionElement }} CompareUi
 */

/** Method names as the table says them. */
const METHOD_WORDS = { 'plus-minus': 'plus-minus', grm: 'generalised reciprocal', 'time-term': 'time terms' };
const IDLE = 'The first refractor by plus-minus, the generalised reciprocal method and time terms on one section, and where they differ by more than their uncertainty. The line is interpreted twice more, so this runs when asked.';

/** @type {{ ui: CompareUi | null, source: CompareSource | null, round: number, blobUrl: string, name: string }} */
const state = { ui: null, source: null, round: 0, blobUrl: '', name: '' };

/** @param {string} method */
function methodWords(method) {
  return /** @type {Record<string, string>} */ (METHOD_WORDS)[method] ?? method;
}

/** @param {CompareUi} ui */
export function setupMethodCompare(ui) {
  state.ui = ui;
  ui.button.addEventListener('click', () => void runComparison());
  reset();
}

/**
 * The line now on show (null: none); what was compared before goes.
 * @param {CompareSource | null} source
 * @param {string} name
 */
export function setCompareSource(source, name) {
  state.source = source;
  state.name = name;
  reset();
}

function reset() {
  const ui = state.ui;
  if (!ui) return;
  state.round++;
  ui.frame.hidden = true;
  ui.table.hidden = true;
  ui.image.removeAttribute('src');
  ui.body.replaceChildren();
  if (state.blobUrl) URL.revokeObjectURL(state.blobUrl);
  state.blobUrl = '';
  ui.button.disabled = state.source === null;
  ui.status.textContent = IDLE;
}

async function runComparison() {
  const ui = state.ui;
  const source = state.source;
  if (!ui || !source) return;
  const round = ++state.round;
  ui.button.disabled = true;
  ui.status.textContent = 'Interpreting the line by every method…';
  const result = await compareMethods(source);
  if (round !== state.round) return;
  ui.button.disabled = false;
  if (!result.ok) {
    ui.status.textContent = 'The methods could not be compared: ' + result.failure.message;
    return;
  }
  show(ui, result.data);
}

/**
 * @param {CompareUi} ui
 * @param {MethodsAnswer} answer
 */
function show(ui, answer) {
  if (state.blobUrl) URL.revokeObjectURL(state.blobUrl);
  state.blobUrl = URL.createObjectURL(new Blob([answer.methodsSvg], { type: 'image/svg+xml' }));
  ui.image.alt = 'First refractor of ' + state.name + ' by every method';
  ui.image.src = state.blobUrl;
  ui.frame.hidden = false;
  const notRun = answer.comparison.runs.filter((r) => !r.ran);
  const differences = answer.comparison.differences;
  ui.status.textContent = (differences.length === 0
    ? 'The methods agree within their combined 1σ at every station where they give a depth.'
    : differences.length + ' stretch' + (differences.length === 1 ? '' : 'es') + ' where two methods differ by more than their combined 1σ:')
    + notRun.map((r) => ' ' + methodWords(r.method) + ' did not run: ' + (r.note ?? 'see the warnings') ).join('');
  ui.body.replaceChildren(...differences.map((d) => {
    const row = document.createElement('tr');
    const cells = [
      methodWords(d.methods[0]) + ' / ' + methodWords(d.methods[1]),
      d.from === d.to ? metresText(d.from) : metresText(d.from) + ' – ' + metresText(d.to),
      String(d.stations),
      metresText(d.largest),
      metresText(d.combinedSigma),
      // The ratio, because at the shown 0.1 m a difference just over its σ can print as the same number.
      fixedDecimals(d.largest / d.combinedSigma, 1) + 'σ',
      metresText(d.atX),
      methodWords(d.deeperBy),
    ];
    for (const text of cells) {
      const cell = document.createElement('td');
      cell.textContent = text;
      row.append(cell);
    }
    return row;
  }));
  ui.table.hidden = differences.length === 0;
}
