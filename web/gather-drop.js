// Seismograph files onto the page: a drop zone (and a button for choosing files) that takes
// one SEG-2 file per shot, sends each as its raw bytes to the gather upload routes (the
// first makes a new stored line, or joins the open one; the rest join it), shows each
// file's progress (sent, then "picking…" while the service reads, picks and interprets) and
// the service's own error beside the file, then opens the line, whose pick review and
// section appear under the figures. "Load the demo gathers" fetches Demo A's files from the
// service and sends them the same way. Files are sent one after another: each upload makes
// the next revision of the line, built on the one before. While files go, a bar says how
// many are done of how many and names the file going; Cancel aborts the request under way
// (an AbortController) and sends no more. Files stored before stay stored; the file that was
// going is not stored unless the service had finished it before the cancel reached it,
// which the page then asks the service and says.
// Text reaches the DOM through textContent only; states are CSS classes (no inline style).

import { fetchLine, listLines, uploadGatherFile } from './api.js';
import {
  DEMO_GATHER_FILES, DEMO_GATHER_LINE_NAME, cancelledText, isSeg2Name, landedInLine, landedNewLine, lineNameFor, missingPositions, percentSent,
  progressText, shotIdsFor, storedFileText, uploadPath,
} from './drop-files.js';

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
  zone: $('drop-zone', HTMLElement),
  input: $('gather-files', HTMLInputElement),
  choose: $('gather-files-button', HTMLElement),
  demo: $('demo-gathers-button', HTMLButtonElement),
  targetNew: $('drop-target-new', HTMLInputElement),
  targetOpen: $('drop-target-open', HTMLInputElement),
  targetOpenText: $('drop-target-open-text', HTMLElement),
  name: $('drop-line-name', HTMLInputElement),
  list: $('drop-list', HTMLElement),
  status: $('drop-status', HTMLElement),
  progress: $('drop-progress', HTMLElement),
  progressBar: $('drop-progress-bar', HTMLProgressElement),
  progressText: $('drop-progress-text', HTMLElement),
  cancel: $('drop-cancel', HTMLButtonElement),
};

/** @typedef {{ id: string, name: string, fromGathers: boolean } | null} OpenLine */

const state = {
  busy: false,
  /** @type {AbortController | null} Cancel's: aborts the work under way. */
  cancel: null,
  /** The line the last drop went into ('' when none was stored): a file sent again joins it. */
  lineId: '',
  /** @type {() => OpenLine} */ openLine: () => null,
  /** @type {(id: string) => Promise<void>} */ showLine: async () => {},
};

/**
 * One row of the list: the file's name, a progress bar, and its state in words.
 * @param {string} name
 */
function fileRow(name) {
  const item = document.createElement('li');
  item.className = 'drop-file waiting';
  item.dataset.state = 'waiting';
  const title = document.createElement('span');
  title.className = 'drop-file-name';
  title.textContent = name;
  const bar = document.createElement('progress');
  bar.max = 100;
  bar.value = 0;
  bar.setAttribute('aria-label', 'Upload of ' + name);
  const words = document.createElement('span');
  words.className = 'drop-file-state';
  words.textContent = 'Waiting.';
  const extra = document.createElement('div');
  extra.className = 'drop-file-extra';
  item.append(title, bar, words, extra);
  ui.list.append(item);
  return {
    item,
    extra,
    /** @param {'waiting'|'sending'|'picking'|'stored'|'failed'|'cancelled'} kind @param {string} text */
    set(kind, text) {
      item.className = 'drop-file ' + kind;
      item.dataset.state = kind;
      words.textContent = text;
      extra.replaceChildren();
      // A bar without a value is the browser's "working" bar: the service is picking.
      if (kind === 'picking') bar.removeAttribute('value');
      else if (kind === 'stored') bar.value = 100;
      else if (kind === 'sending') bar.value = 0;
    },
    /** @param {number} percent */
    sent(percent) {
      bar.value = percent;
      words.textContent = 'Sending… ' + percent + ' %';
    },
  };
}

/** Which line the drop goes into, as chosen in the panel: '' for a new line. */
function targetLineId() {
  const open = state.openLine();
  return ui.targetOpen.checked && open !== null ? open.id : '';
}

/**
 * Shows the progress line: files done of the total and the file going ('' when none).
 * @param {number} done
 * @param {number} total
 * @param {string} current
 */
function showProgress(done, total, current) {
  ui.progress.hidden = false;
  ui.progressBar.max = Math.max(1, total);
  ui.progressBar.value = done;
  ui.progressText.textContent = progressText(done, total, current);
}

/**
 * Starts a piece of work Cancel can stop: the controls are disabled, Cancel shown.
 * @param {AbortController} [controller] one made earlier (the demo files' fetch)
 */
function beginWork(controller) {
  state.busy = true;
  state.cancel = controller ?? new AbortController();
  setControls();
  return state.cancel.signal;
}

function endWork() {
  state.busy = false;
  state.cancel = null;
  ui.progress.hidden = true;
  setControls();
}

/**
 * What the store held before an upload, so that after a cancel the page can tell whether
 * the service stored the file all the same: the lines' ids (a new line) or the line's latest
 * revision. null when it could not be read (then the page says it could not check).
 * @param {string} lineId '' for a new line
 * @returns {Promise<{ ids: string[] } | { revision: number } | null>}
 */
async function storeBefore(lineId) {
  if (lineId === '') {
    const listed = await listLines();
    return listed.ok && Array.isArray(listed.data) ? { ids: listed.data.map((l) => l.id) } : null;
  }
  const line = await fetchLine(lineId);
  return line.ok && typeof line.data.latestRevision === 'number' ? { revision: line.data.latestRevision } : null;
}

/**
 * After a cancel: the id of the line the cancelled file went into when the service had
 * stored it all the same, '' when it had not, null when that could not be checked.
 * @param {{ ids: string[] } | { revision: number } | null} before
 * @param {{ lineId: string, shotId: string, name: string }} target
 * @returns {Promise<string | null>}
 */
async function landedAfterCancel(before, target) {
  if (before === null) return null;
  if ('ids' in before) {
    const listed = await listLines();
    if (!listed.ok || !Array.isArray(listed.data)) return null;
    return landedNewLine(before.ids, listed.data, target.name) ?? '';
  }
  const line = await fetchLine(target.lineId);
  if (!line.ok) return null;
  return landedInLine(before.revision, line.data, target.shotId) ? target.lineId : '';
}

/**
 * Sends the files one after another and opens the line they went into. O(files) requests,
 * and one read before the first (what the store held, for the check after a cancel; later
 * files know it from the answer before them).
 * @param {File[]} files
 * @param {string} [lineName] name of a new line (default: the name field, else from the file names)
 * @param {AbortController} [controller] the demo button's, whose Cancel also stopped its fetch
 */
async function sendFiles(files, lineName, controller) {
  if (files.length === 0) return;
  if (state.busy && controller === undefined) {
    ui.status.textContent = 'Files are still being sent: drop these again when those listed are done.';
    return;
  }
  const signal = beginWork(controller);
  ui.list.replaceChildren();
  const seg2 = files.filter((f) => isSeg2Name(f.name));
  const shotIds = shotIdsFor(seg2.map((f) => f.name));
  let lineId = targetLineId();
  const name = lineName ?? (ui.name.value.trim() || lineNameFor(seg2.map((f) => f.name)));
  let lineTitle = lineId === '' ? name : (state.openLine()?.name ?? '');
  let stored = 0;
  let failed = 0;
  for (const file of files) {
    if (!isSeg2Name(file.name)) {
      fileRow(file.name).set('failed', 'Not sent: only SEG-2 files (.sg2, .seg2, .dat) are taken here. Pick tables and survey documents go under "Load a line".');
      failed += 1;
    }
  }
  ui.status.textContent = 'Sending ' + seg2.length + (seg2.length === 1 ? ' file…' : ' files…');
  const rows = seg2.map((f) => fileRow(f.name));
  /** @type {{ current: string, currentStored: boolean | null, notSent: number } | null} */
  let cancelled = null;
  /** @type {{ ids: string[] } | { revision: number } | null} What the store held before the file going (read once, then known). */
  let known = null;
  // One at a time: every upload is the next revision of the line (O(files) round trips).
  for (let i = 0; i < seg2.length; i++) {
    if (signal.aborted) {
      cancelled ??= { current: '', currentStored: false, notSent: 0 };
      rows[i].set('cancelled', 'Not sent: cancelled.');
      cancelled.notSent += 1;
      continue;
    }
    showProgress(i, seg2.length, seg2[i].name);
    const target = { lineId, shotId: shotIds[i], name };
    /** @type {{ ids: string[] } | { revision: number } | null} */
    const before = known ?? (await storeBefore(lineId));
    known = before;
    const outcome = await sendOne(rows[i], seg2[i], target, {}, signal);
    if (outcome === 'cancelled') {
      const landed = await landedAfterCancel(before, target);
      if (landed) {
        rows[i].set('stored', 'Stored: the service had finished this file when the cancel reached it.');
        lineId = landed;
      } else {
        rows[i].set('cancelled', landed === '' ? 'Cancelled: not stored.' : 'Cancelled: whether it was stored could not be checked.');
      }
      cancelled = { current: seg2[i].name, currentStored: landed === null ? null : landed !== '', notSent: 0 };
    } else if (outcome !== null) {
      lineId = outcome.id;
      lineTitle = outcome.name;
      known = { revision: outcome.revision };
      stored += 1;
    } else {
      failed += 1;
    }
  }
  state.lineId = lineId;
  if (cancelled !== null) {
    ui.status.textContent = cancelledText({ stored, lineName: lineTitle, ...cancelled });
  } else {
    ui.status.textContent =
      (stored === 0 ? 'No file was stored.' : stored + ' of ' + (stored + failed) + (stored + failed === 1 ? ' file' : ' files') + ' stored.') +
      (failed > 0 ? ' The problems are listed beside each file.' : '') +
      (stored > 0 ? ' The line is open: review its picks under the figures.' : '');
  }
  endWork();
  if (lineId !== '' && (stored > 0 || cancelled?.currentStored === true)) await state.showLine(lineId);
}

/**
 * Sends one file; on success the row says what was stored and the line's id and name are
 * returned; 'cancelled' when Cancel stopped it (the caller checks what the service kept);
 * else null, the row showing the service's words (and, when the file lacks positions,
 * fields to give them and send it again).
 * @param {ReturnType<typeof fileRow>} row
 * @param {File} file
 * @param {{ lineId: string, shotId: string, name: string }} target
 * @param {Record<string, number>} overrides positions given for this file
 * @param {AbortSignal} signal Cancel's
 * @returns {Promise<{ id: string, name: string, revision: number } | 'cancelled' | null>}
 */
async function sendOne(row, file, target, overrides, signal) {
  row.set('sending', 'Sending… 0 %');
  const path = uploadPath({ ...target, overrides });
  const progress = { onSent: (/** @type {number} */ loaded, /** @type {number} */ total) => row.sent(percentSent(loaded, total)), onPicking: () => row.set('picking', 'Picking first breaks…') };
  let result = await uploadGatherFile(path, file, progress, signal);
  // Someone stored a revision meanwhile: the service asks to send it again (once).
  if (!result.ok && result.failure.code === 'survey_changed') result = await uploadGatherFile(path, file, progress, signal);
  if (result.ok) {
    row.set('stored', storedFileText(result.data.picks, result.data.shotId));
    return { id: result.data.id, name: result.data.name, revision: result.data.revision };
  }
  if (result.failure.code === 'aborted') {
    row.set('cancelled', 'Cancelled: checking with the service…');
    return 'cancelled';
  }
  row.set('failed', errorText(result.failure));
  const asked = missingPositions(result.failure.path);
  if (asked.length > 0) askPositions(row, file, target, overrides, asked);
  if (result.failure.layoutChange) askLayout(row, file, target, overrides);
  return null;
}

/**
 * Runs one more upload of a file from its row (a second try the user asked for), then
 * opens the line it went into.
 * @param {ReturnType<typeof fileRow>} row
 * @param {File} file
 * @param {{ lineId: string, shotId: string, name: string, confirmLayout?: boolean }} target
 * @param {Record<string, number>} overrides
 */
async function sendAgain(row, file, target, overrides) {
  if (state.busy) {
    ui.status.textContent = 'Files are still being sent: send this one again when they are done.';
    return;
  }
  const signal = beginWork();
  showProgress(0, 1, file.name);
  const before = await storeBefore(target.lineId);
  const outcome = await sendOne(row, file, target, overrides, signal);
  let landed = /** @type {string | null} */ ('');
  if (outcome === 'cancelled') {
    landed = await landedAfterCancel(before, target);
    row.set(landed ? 'stored' : 'cancelled', landed ? 'Stored: the service had finished this file when the cancel reached it.' : 'Cancelled: not stored.');
    ui.status.textContent = cancelledText({ stored: 0, lineName: '', current: file.name, currentStored: landed === null ? null : landed !== '', notSent: 0 });
  }
  endWork();
  const id = outcome !== null && outcome !== 'cancelled' ? outcome.id : landed;
  if (id) {
    state.lineId = id;
    if (outcome !== 'cancelled') ui.status.textContent = 'Stored. The line is open: review its picks under the figures.';
    await state.showLine(id);
  }
}

/**
 * A file whose geophones are not the line's (409 layout_changed, the service's description
 * shown above): add it anyway (the layouts merged) or make a new line of it.
 * @param {ReturnType<typeof fileRow>} row
 * @param {File} file
 * @param {{ lineId: string, shotId: string, name: string }} target
 * @param {Record<string, number>} overrides
 */
function askLayout(row, file, target, overrides) {
  const anyway = document.createElement('button');
  anyway.type = 'button';
  anyway.className = 'button small';
  anyway.textContent = 'Add it anyway';
  anyway.addEventListener('click', () => void sendAgain(row, file, { ...target, confirmLayout: true }, overrides));
  const apart = document.createElement('button');
  apart.type = 'button';
  apart.className = 'button small';
  apart.textContent = 'Store it as a new line';
  apart.addEventListener('click', () => void sendAgain(row, file, { ...target, lineId: '', name: lineNameFor([file.name]) }, overrides));
  const actions = document.createElement('div');
  actions.className = 'drop-layout';
  actions.append(anyway, apart);
  row.extra.append(actions);
}

/**
 * Fields for the positions a file lacks, beside it, and "Send again": the file then joins
 * the line the drop went into (or makes it, when nothing was stored yet).
 * @param {ReturnType<typeof fileRow>} row
 * @param {File} file
 * @param {{ lineId: string, shotId: string, name: string }} target
 * @param {Record<string, number>} overrides
 * @param {{ key: string, label: string }[]} asked
 */
function askPositions(row, file, target, overrides, asked) {
  const form = document.createElement('form');
  form.className = 'drop-positions';
  const inputs = asked.map(({ key, label }) => {
    const wrap = document.createElement('label');
    wrap.textContent = label + ' ';
    const input = document.createElement('input');
    input.type = 'number';
    input.step = 'any';
    input.required = true;
    input.name = key;
    input.dataset.key = key;
    wrap.append(input);
    form.append(wrap);
    return input;
  });
  const again = document.createElement('button');
  again.type = 'submit';
  again.className = 'button small';
  again.textContent = 'Send again';
  form.append(again);
  form.addEventListener('submit', (event) => {
    event.preventDefault();
    /** @type {Record<string, number>} */
    const given = { ...overrides };
    for (const input of inputs) given[input.name] = Number(input.value);
    void sendAgain(row, file, { ...target, lineId: state.lineId }, given);
  });
  row.extra.append(form);
}

/**
 * The service's words, and where a file is broken (the byte offset), for the row.
 * @param {import('./api.js').Failure} failure
 */
function errorText(failure) {
  if (failure.layoutChange) return 'Not added: ' + failure.layoutChange + ' Add it anyway (the geophones of both are kept), or store it as a line of its own.';
  const problems = failure.problems.map((p) => p.message).filter((m) => m && m !== failure.message);
  const asked =
    failure.path === '/shotX' ? ' Give the shot position below and send the file again.'
      : failure.path === '/geophoneX0' ? ' Give the first geophone\'s x and the spacing below and send the file again.' : '';
  return 'Not stored: ' + failure.message + (problems.length > 0 ? ' ' + problems.join(' ') : '') + asked;
}

/** Demo A's five files, fetched from the service and sent like dropped ones. */
async function loadDemoGathers() {
  if (state.busy) return;
  const controller = new AbortController();
  beginWork(controller);
  ui.list.replaceChildren();
  ui.status.textContent = 'Fetching the demo files…';
  /** @type {File[]} */
  const files = [];
  for (const name of DEMO_GATHER_FILES) {
    showProgress(files.length, DEMO_GATHER_FILES.length, 'fetching ' + name);
    try {
      const response = await fetch('samples/' + name, { signal: controller.signal });
      if (!response.ok) throw new Error(String(response.status));
      files.push(new File([await response.blob()], name, { type: 'application/octet-stream' }));
    } catch {
      ui.status.textContent = controller.signal.aborted
        ? 'Cancelled while fetching the demo files. Nothing was stored.'
        : 'The demo file ' + name + ' could not be fetched from the service.';
      endWork();
      return;
    }
  }
  ui.targetNew.checked = true;
  syncNameField();
  await sendFiles(files, DEMO_GATHER_LINE_NAME, controller);
}

function setControls() {
  ui.cancel.hidden = !state.busy;
  ui.cancel.disabled = state.cancel === null || state.cancel.signal.aborted;
  ui.input.disabled = state.busy;
  ui.choose.classList.toggle('disabled', state.busy);
  ui.demo.disabled = state.busy;
  ui.zone.classList.toggle('busy', state.busy);
}

/**
 * The "into the open line" choice follows the line on show; it is chosen by default when
 * that line was made from seismograph files (the next files of the same line).
 */
export function updateDropTarget() {
  const open = state.openLine();
  ui.targetOpen.disabled = open === null;
  ui.targetOpenText.textContent = open === null ? 'into the open line (none open)' : 'into “' + open.name + '”';
  if (open === null) {
    ui.targetNew.checked = true;
  } else if (open.fromGathers) {
    ui.targetOpen.checked = true;
  }
  syncNameField();
}

/** The name field serves a new line only. */
function syncNameField() {
  ui.name.disabled = ui.targetOpen.checked;
}

/** @param {DragEvent} event */
function hasFiles(event) {
  return Array.from(event.dataTransfer?.types ?? []).includes('Files');
}

/**
 * Wires the panel.
 * @param {{ openLine: () => OpenLine, showLine: (id: string) => Promise<void> }} hooks
 *   openLine: the stored line on show at its latest revision, or null; showLine: open a stored line.
 */
export function initGatherDrop(hooks) {
  state.openLine = hooks.openLine;
  state.showLine = hooks.showLine;
  ui.input.addEventListener('change', () => {
    const files = Array.from(ui.input.files ?? []);
    ui.input.value = '';
    void sendFiles(files);
  });
  ui.demo.addEventListener('click', () => void loadDemoGathers());
  ui.cancel.addEventListener('click', () => {
    if (state.cancel === null || state.cancel.signal.aborted) return;
    state.cancel.abort();
    ui.progressText.textContent = 'Cancelling…';
    setControls();
  });
  ui.targetNew.addEventListener('change', syncNameField);
  ui.targetOpen.addEventListener('change', syncNameField);
  ui.zone.addEventListener('dragover', (event) => {
    if (!hasFiles(event)) return;
    event.preventDefault();
    if (event.dataTransfer) event.dataTransfer.dropEffect = 'copy';
    ui.zone.classList.add('over');
  });
  ui.zone.addEventListener('dragleave', () => ui.zone.classList.remove('over'));
  ui.zone.addEventListener('drop', (event) => {
    event.preventDefault();
    ui.zone.classList.remove('over');
    void sendFiles(Array.from(event.dataTransfer?.files ?? []));
  });
  // A file let go beside the zone would make the browser leave the page to show it.
  window.addEventListener('dragover', (event) => {
    if (hasFiles(event)) event.preventDefault();
  });
  window.addEventListener('drop', (event) => {
    if (hasFiles(event)) event.preventDefault();
  });
  updateDropTarget();
}
