// Pick review of a stored line's shot gathers: the decimated traces of one shot drawn as
// wiggles with the positive half filled (variable area), its picks over them; a click on a
// trace moves that trace's pick to the time clicked, Delete (or Backspace) clears the
// selected pick, ← and → select the neighbouring trace. Each edit is interpreted at once
// without storing (POST /api/v1/previews, debounced) and the section with the edited picks
// is shown under the traces, marked as a preview. "Store corrected picks" sends the
// line with the edited times as the next revision, with the reviewer's name, and the page
// reopens it: the service re-interprets, so the section follows the picks.
// Text reaches the DOM through textContent only; colours come from style.css.

import { fetchGatherTraces, previewLine, storeRevision } from './api.js';
import { LOW_PICK_CONFIDENCE, checkFirst, pickMarks, plotLayout, reviewWindow, withPick } from './gather-plot.js';

/**
 * @typedef {import('./api.js').StoredLine} StoredLine
 * @typedef {import('./api.js').DecimatedGather} DecimatedGather
 * @typedef {import('../engine/survey/survey.js').Survey} Survey
 */

/**
 * @template {HTMLElement} T
 * @param {string} id
 * @param {{ new (): T }} kind
 * @returns {T}
 */
function $(id, kind) {
  const node = document.getElementById(id);
  if (!(node instanceof kind)) throw new Error('Arcline page is missing #' + id + ' (or it is not a ' + kind.name + ')');
  return node;
}

const ui = {
  panel: $('gather-review', HTMLElement),
  select: $('gather-select', HTMLSelectElement),
  canvas: $('gather-canvas', HTMLCanvasElement),
  status: $('gather-status', HTMLElement),
  author: $('pick-author', HTMLInputElement),
  store: $('store-picks', HTMLButtonElement),
  edits: $('gather-edits', HTMLElement),
  preview: $('pick-preview', HTMLElement),
  previewImage: $('pick-preview-image', HTMLImageElement),
  previewNote: $('pick-preview-note', HTMLElement),
  check: $('pick-check', HTMLElement),
};

/** Wait after the last edit before interpreting, ms: a burst of clicks costs one request (our choice). */
const PREVIEW_DELAY_MS = 150;

/** Display columns asked per trace: one per canvas pixel row of the plot. */
const state = {
  /** @type {string} */ lineId: '',
  /** @type {Survey|null} */ survey: null,
  /** Edited times by shot id (only shots with changes). @type {Map<string, (number|null)[]>} */ edited: new Map(),
  /** @type {string} */ shotId: '',
  /** @type {DecimatedGather|null} */ gather: null,
  /** @type {number} */ selected: -1,
  /** @type {number} */ round: 0,
  /** @type {(id: string, revision: number) => void} */ onStored: () => {},
  /** @type {number} */ previewRound: 0,
  /** @type {ReturnType<typeof setTimeout> | undefined} */ previewTimer: undefined,
  /** @type {string} */ previewUrl: '',
};

/** @param {string} name */
function cssColour(name) {
  return getComputedStyle(document.documentElement).getPropertyValue(name).trim() || '#000';
}

/** The times shown for a shot: the edited ones, else the stored ones. @param {string} shotId */
function timesOf(shotId) {
  const edited = state.edited.get(shotId);
  if (edited) return edited;
  const shot = state.survey?.shots.find((s) => s.id === shotId);
  return shot ? shot.times : [];
}

/** @param {string} shotId */
function storedTimesOf(shotId) {
  return state.survey?.shots.find((s) => s.id === shotId)?.times ?? [];
}

function updateEdits() {
  let count = 0;
  for (const [shotId, times] of state.edited) {
    const stored = storedTimesOf(shotId);
    times.forEach((t, i) => {
      if (t !== stored[i]) count += 1;
    });
  }
  ui.edits.textContent = count === 0 ? 'No picks changed.' : count + (count === 1 ? ' pick changed' : ' picks changed') + ' (not stored yet).';
  ui.store.disabled = count === 0;
}

function draw() {
  const gather = state.gather;
  const ctx = ui.canvas.getContext('2d');
  if (!ctx) return;
  const { width, height } = ui.canvas;
  ctx.fillStyle = cssColour('--paper');
  ctx.fillRect(0, 0, width, height);
  if (!gather) return;
  const n = gather.traces.length;
  const layout = plotLayout(width, height, n, gather.fromMs, gather.toMs);
  const ink = cssColour('--trace-ink');
  const fill = cssColour('--trace-fill');
  ctx.font = '11px system-ui, sans-serif';

  // Time lines every 10 ms (5 ms on short windows), labelled on the left.
  const span = gather.toMs - gather.fromMs;
  const step = span > 80 ? 10 : 5;
  ctx.strokeStyle = cssColour('--rule');
  ctx.fillStyle = cssColour('--ink-soft');
  ctx.textAlign = 'right';
  ctx.textBaseline = 'middle';
  for (let t = Math.ceil(gather.fromMs / step) * step; t <= gather.toMs; t += step) {
    const y = layout.timeY(t);
    ctx.beginPath();
    ctx.moveTo(layout.left, y);
    ctx.lineTo(layout.left + layout.width, y);
    ctx.stroke();
    ctx.fillText(t + ' ms', layout.left - 4, y);
  }
  ctx.textAlign = 'center';
  ctx.textBaseline = 'bottom';

  // Traces: gain so a full swing spans 0.9 of the spacing (our choice: neighbours touch, rarely overlap).
  const gain = 0.9 * layout.spacing;
  const rowHeight = Math.max(1, layout.height / gather.columns);
  gather.traces.forEach((trace, i) => {
    const cx = layout.traceX(i);
    if (n <= 60 || i % Math.ceil(n / 60) === 0) {
      ctx.fillStyle = cssColour('--ink-soft');
      ctx.fillText(String(trace.channel), cx, layout.top - 4);
    }
    for (let c = 0; c < gather.columns; c++) {
      const y = layout.top + c * rowHeight;
      const hi = trace.max[c];
      const lo = trace.min[c];
      if (hi > 0) {
        ctx.fillStyle = fill;
        ctx.fillRect(cx, y, hi * gain, rowHeight);
      }
      ctx.fillStyle = ink;
      ctx.fillRect(cx + lo * gain, y, Math.max(1, (hi - lo) * gain), Math.max(1, rowHeight * 0.6));
    }
  });

  // Picks: the picker's own ones solid, thicker the more confident, hollow when the
  // confidence is low; picks a person set in an earlier revision solid; changed ones orange.
  const marks = currentMarks();
  marks.forEach((mark, i) => {
    if (i >= n) return;
    const cx = layout.traceX(i);
    const t = timesOf(state.shotId)[i];
    if (mark.kind === 'none' || t === null) {
      if (i === state.selected) {
        ctx.strokeStyle = cssColour('--pick-edited');
        ctx.strokeRect(cx - layout.spacing * 0.4, layout.top, layout.spacing * 0.8, layout.height);
      }
      return;
    }
    const y = layout.timeY(t);
    const colour = cssColour(mark.kind === 'edited' ? '--pick-edited' : '--pick');
    const thick = mark.thickness + (i === state.selected ? 2 : 0);
    const half = layout.spacing * 0.45;
    if (mark.kind === 'low') {
      ctx.strokeStyle = colour;
      ctx.lineWidth = 2;
      ctx.strokeRect(cx - half, y - 4, 2 * half, 8);
      ctx.lineWidth = 1;
      if (i === state.selected) ctx.strokeRect(cx - half - 3, y - 7, 2 * half + 6, 14);
      return;
    }
    ctx.fillStyle = colour;
    ctx.fillRect(cx - half, y - thick / 2, 2 * half, thick);
  });
}

/** How each pick of the shot on show is drawn (gather-plot.js). */
function currentMarks() {
  return pickMarks(timesOf(state.shotId), storedTimesOf(state.shotId), state.gather?.automatic);
}

/** The low-confidence picks of the shot on show, as buttons that select the trace, least confident first. */
function showCheckList() {
  const gather = state.gather;
  if (!gather) {
    ui.check.replaceChildren();
    return;
  }
  if (!gather.automatic) {
    ui.check.textContent = 'The service sent no confidence for these picks.';
    return;
  }
  const marks = currentMarks();
  const order = checkFirst(marks);
  const own = marks.filter((m) => m.kind === 'automatic' || m.kind === 'low').length;
  const head = document.createElement('span');
  head.className = 'pick-check-head';
  if (order.length === 0) {
    head.textContent = 'Check first: none. ' + own + (own === 1 ? ' pick is' : ' picks are') + " the picker's own, each with confidence " + LOW_PICK_CONFIDENCE + ' or more.';
    ui.check.replaceChildren(head);
    return;
  }
  head.textContent = 'Check first: ' + order.length + ' of the picker\'s ' + own + ' picks ' + (order.length === 1 ? 'has' : 'have') + ' confidence under ' + LOW_PICK_CONFIDENCE + ':';
  const buttons = order.map((i) => {
    const button = document.createElement('button');
    button.type = 'button';
    button.className = 'button small pick-check-item';
    button.dataset.trace = String(i);
    button.textContent = 'ch ' + gather.traces[i].channel + ' (' + Number(marks[i].confidence).toFixed(2) + ')';
    button.addEventListener('click', () => {
      state.selected = i;
      describeSelected(i);
      draw();
      ui.canvas.focus();
    });
    return button;
  });
  ui.check.replaceChildren(head, ...buttons);
}

/** @param {number} index */
function describeSelected(index) {
  const gather = state.gather;
  if (!gather || index < 0) return;
  const trace = gather.traces[index];
  const t = timesOf(state.shotId)[index];
  const mark = currentMarks()[index];
  const status = gather.automatic?.status[index];
  const why = status === 'dead' ? ' (dead trace)' : status === 'outlier' ? ' (the picker rejected its pick: off its neighbours\' trend)' : '';
  const whose =
    mark?.kind === 'automatic' || mark?.kind === 'low'
      ? ", the picker's, confidence " + Number(mark.confidence).toFixed(2) + (mark.kind === 'low' ? ' (low: check it)' : '')
      : mark?.kind === 'edited' ? ', changed here' : mark?.kind === 'reviewed' ? ', set by a person' : '';
  ui.status.textContent =
    'Channel ' + trace.channel + ' (x = ' + trace.x + ' m): ' + (t === null || t === undefined ? 'no pick' + why : 'pick at ' + t.toFixed(2) + ' ms' + whose) + '.';
}

/** @param {number} index @param {number|null} ms */
function setPick(index, ms) {
  state.edited.set(state.shotId, withPick(timesOf(state.shotId), index, ms));
  state.selected = index;
  describeSelected(index);
  updateEdits();
  draw();
  showCheckList();
  schedulePreview();
}

async function loadShot() {
  const round = ++state.round;
  state.gather = null;
  state.selected = -1;
  draw();
  showCheckList();
  ui.status.textContent = 'Loading the traces of shot ' + state.shotId + '…';
  const window = reviewWindow(timesOf(state.shotId), -Infinity, Infinity);
  const plotRows = ui.canvas.height - 32;
  const result = await fetchGatherTraces(state.lineId, state.shotId, {
    columns: plotRows,
    ...(Number.isFinite(window.toMs) ? { toMs: Math.round(window.toMs) } : {}),
  });
  if (round !== state.round) return;
  if (!result.ok) {
    ui.status.textContent = 'The traces could not be loaded: ' + result.failure.message;
    return;
  }
  state.gather = result.data;
  // The window drawn, for tests and tools that place a click (the canvas has no other trace of it).
  ui.canvas.dataset.fromMs = String(result.data.fromMs);
  ui.canvas.dataset.toMs = String(result.data.toMs);
  ui.canvas.dataset.shot = state.shotId;
  ui.status.textContent = 'Shot ' + state.shotId + ': ' + result.data.traces.length + ' traces, ' + result.data.fromMs + ' to ' + result.data.toMs + ' ms. Click a trace to move its pick.';
  draw();
  showCheckList();
}

/** @param {MouseEvent} event */
function onClick(event) {
  if (!state.gather) return;
  const box = ui.canvas.getBoundingClientRect();
  const px = ((event.clientX - box.left) * ui.canvas.width) / box.width;
  const py = ((event.clientY - box.top) * ui.canvas.height) / box.height;
  const layout = plotLayout(ui.canvas.width, ui.canvas.height, state.gather.traces.length, state.gather.fromMs, state.gather.toMs);
  if (py < layout.top || px < layout.left) return;
  setPick(layout.traceAt(px), layout.timeAt(py));
  ui.canvas.focus();
}

/** @param {KeyboardEvent} event */
function onKey(event) {
  if (!state.gather || state.selected < 0) return;
  if (event.key === 'Delete' || event.key === 'Backspace') {
    event.preventDefault();
    setPick(state.selected, null);
  } else if (event.key === 'ArrowLeft' || event.key === 'ArrowRight') {
    event.preventDefault();
    const next = Math.min(state.gather.traces.length - 1, Math.max(0, state.selected + (event.key === 'ArrowLeft' ? -1 : 1)));
    state.selected = next;
    describeSelected(next);
    draw();
  }
}

/** The stored survey with every edited shot's times. @returns {Survey|null} */
function editedSurvey() {
  if (!state.survey) return null;
  const survey = structuredClone(state.survey);
  for (const shot of survey.shots) {
    const edited = state.edited.get(shot.id);
    if (edited) shot.times = edited;
  }
  return survey;
}

function hidePreview() {
  state.previewRound += 1;
  clearTimeout(state.previewTimer);
  ui.preview.hidden = true;
  if (state.previewUrl) URL.revokeObjectURL(state.previewUrl);
  state.previewUrl = '';
  ui.previewImage.removeAttribute('src');
  delete ui.preview.dataset.round;
}

/** Interprets the edited line (nothing stored) and shows its section; a later edit overtakes an earlier answer. */
async function showPreview() {
  const survey = editedSurvey();
  if (!survey) return;
  const round = ++state.previewRound;
  const started = performance.now();
  const result = await previewLine(JSON.stringify(survey), 'json');
  if (round !== state.previewRound) return;
  ui.preview.hidden = false;
  if (!result.ok) {
    ui.previewImage.hidden = true;
    ui.previewNote.textContent = 'The edited picks could not be interpreted: ' + result.failure.message;
    return;
  }
  if (state.previewUrl) URL.revokeObjectURL(state.previewUrl);
  state.previewUrl = URL.createObjectURL(new Blob([result.data.sectionSvg], { type: 'image/svg+xml' }));
  ui.previewImage.hidden = false;
  ui.previewImage.src = state.previewUrl;
  ui.previewNote.textContent = 'Interpreted in ' + Math.round(performance.now() - started) + ' ms (request and drawing). Store the picks to keep it.';
  ui.preview.dataset.round = String(round);
}

function schedulePreview() {
  clearTimeout(state.previewTimer);
  state.previewTimer = setTimeout(() => void showPreview(), PREVIEW_DELAY_MS);
}

async function storePicks() {
  const survey = editedSurvey();
  if (!survey) return;
  ui.store.disabled = true;
  ui.status.textContent = 'Storing the corrected picks…';
  const result = await storeRevision(state.lineId, JSON.stringify(survey), 'json', false, ui.author.value.trim());
  if (!result.ok) {
    ui.status.textContent = 'The corrected picks were not stored: ' + result.failure.message;
    updateEdits();
    return;
  }
  state.edited.clear();
  hidePreview();
  ui.status.textContent = 'Stored as revision ' + result.data.revision + '.';
  state.onStored(state.lineId, Number(result.data.revision));
}

ui.canvas.addEventListener('click', onClick);
ui.canvas.addEventListener('keydown', onKey);
ui.select.addEventListener('change', () => {
  state.shotId = ui.select.value;
  void loadShot();
});
ui.store.addEventListener('click', () => void storePicks());

/**
 * Shows the review for a stored line opened at its latest revision that has gathers; hides
 * it otherwise (an earlier revision is read-only).
 * @param {StoredLine} line
 * @param {(id: string, revision: number) => void} onStored called after a revision is stored
 */
export function showGatherReview(line, onStored) {
  const gathers = Array.isArray(line.gathers) ? line.gathers : [];
  const survey = line.survey ?? null;
  const shotIds = new Set((survey?.shots ?? []).map((s) => s.id));
  const usable = gathers.filter((g) => shotIds.has(g.shotId));
  const latest = line.revision === undefined || line.revision === line.latestRevision;
  hidePreview();
  if (!survey || usable.length === 0 || !latest) {
    ui.panel.hidden = true;
    state.round += 1;
    return;
  }
  const sameLine = state.lineId === line.id;
  state.lineId = line.id;
  state.survey = survey;
  state.edited.clear();
  state.onStored = onStored;
  ui.select.replaceChildren(
    ...usable.map((g) => {
      const option = document.createElement('option');
      option.value = g.shotId;
      option.textContent = g.shotId;
      return option;
    }),
  );
  state.shotId = sameLine && usable.some((g) => g.shotId === state.shotId) ? state.shotId : usable[0].shotId;
  ui.select.value = state.shotId;
  ui.panel.hidden = false;
  updateEdits();
  void loadShot();
}
