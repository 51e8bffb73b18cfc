// Arcline page: load a line, interpret it, store it, open stored lines, share them.
// Wiring only; requests live in api.js, words in describe.js, DOM building in view.js.

import {
  LAYOUT_CHANGED_STATUS, fetchLine, fetchSectionSheets, lineFileUrls, listLines, previewLine, readWriteToken, saveWriteToken, sectionSheetUrl,
  storeLine, storeRevision, withSheetQuery,
} from './api.js';
import { showGatherReview } from './gather-review.js';
import { initGatherDrop, updateDropTarget } from './gather-drop.js';
import { setCompareSource, setupMethodCompare } from './method-compare.js';
import { binaryKind, detectFormat, fileStem, formatLabel, pickTableName, when } from './describe.js';
import {
  el, markFiguresAsPreview, renderAllowance, renderFailure, renderLineNotes, renderStationTable, renderSummary, renderWarnings,
} from './view.js';

/**
 * @typedef {import('./api.js').Failure} Failure
 * @typedef {import('./api.js').PreviewBundle} PreviewBundle
 * @typedef {import('./api.js').RevisionEntry} RevisionEntry
 * @typedef {import('./describe.js').BodyFormat} BodyFormat
 * @typedef {import('./describe.js').SurveyNames} SurveyNames
 * @typedef {import('../engine/output/interpretation.js').Interpretation} Interpretation
 */

/**
 * The element with this id, checked to be of the expected kind: a renamed or retyped element
 * in index.html fails loudly on load instead of misbehaving later.
 * @template {HTMLElement} T
 * @param {string} id
 * @param {{ new (): T, prototype: T }} kind
 * @returns {T}
 */
function $(id, kind) {
  const node = document.getElementById(id);
  if (!(node instanceof kind)) throw new Error('Arcline page is missing #' + id + ' (or it is not a ' + kind.name + ')');
  return node;
}

const ui = {
  fileInput: $('file-input', HTMLInputElement),
  text: $('survey-text', HTMLTextAreaElement),
  formatName: $('format-name', HTMLElement),
  interpretButton: $('interpret-button', HTMLButtonElement),
  storeButton: $('store-button', HTMLButtonElement),
  reviseButton: $('revise-button', HTMLButtonElement),
  token: $('write-token', HTMLInputElement),
  status: $('status', HTMLElement),
  errorBox: $('error-box', HTMLElement),
  storedList: $('stored-list', HTMLElement),
  storedEmpty: $('stored-empty', HTMLElement),
  refreshButton: $('refresh-button', HTMLButtonElement),
  title: $('line-title', HTMLElement),
  meta: $('line-meta', HTMLElement),
  badge: $('line-badge', HTMLElement),
  revisionRow: $('revision-row', HTMLElement),
  revisionText: $('revision-text', HTMLElement),
  revisionPicker: $('revision-picker', HTMLElement),
  revisionSelect: $('revision-select', HTMLSelectElement),
  filesPanel: $('files-panel', HTMLElement),
  sharePanel: $('share-panel', HTMLElement),
  shareUrl: $('share-url', HTMLInputElement),
  copyButton: $('copy-button', HTMLButtonElement),
  shareOpen: $('share-open', HTMLAnchorElement),
  warnings: $('warnings', HTMLElement),
  warningList: $('warning-list', HTMLElement),
  figures: $('figures', HTMLElement),
  sectionImage: $('section-image', HTMLImageElement),
  sectionFrame: $('section-frame', HTMLElement),
  sheetChooser: $('sheet-chooser', HTMLElement),
  sheetLabel: $('sheet-label', HTMLElement),
  sheetButtons: $('sheet-buttons', HTMLElement),
  travelTimesImage: $('traveltimes-image', HTMLImageElement),
  grmFigure: $('grm-figure', HTMLElement),
  grmImage: $('grm-image', HTMLImageElement),
  unsavedNote: $('unsaved-note', HTMLElement),
  summary: $('summary', HTMLElement),
  summaryList: $('summary-list', HTMLElement),
  stations: $('stations', HTMLElement),
  stationHead: $('station-head', HTMLTableRowElement),
  stationBody: $('station-body', HTMLTableSectionElement),
  emptyNote: $('empty-note', HTMLElement),
  lineNotes: $('line-notes', HTMLElement),
  failedNote: $('failed-note', HTMLElement),
  allowance: $('allowance', HTMLElement),
  allowanceHeadline: $('allowance-headline', HTMLElement),
  allowanceDetail: $('allowance-detail', HTMLElement),
  allowanceReasoning: $('allowance-reasoning', HTMLElement),
  layoutDialog: $('layout-dialog', HTMLDialogElement),
  layoutChangeText: $('layout-dialog-change', HTMLElement),
  layoutNewLine: $('layout-new-line', HTMLButtonElement),
  layoutConfirm: $('layout-confirm', HTMLButtonElement),
  layoutCancel: $('layout-cancel', HTMLButtonElement),
};

/** What the input area holds: its format follows the file name until the text is edited. */
const input = { fileName: '' };
/**
 * Id of the stored line on show, or null for an unsaved interpretation / nothing.
 * @type {string | null}
 */
let openLineId = null;
/**
 * The stored line opened last ({ id, name } of its latest revision), still known while a newly
 * loaded line is interpreted: that line can then be stored as its next revision, after a
 * question if the service finds another geophone layout.
 * @type {{ id: string, name: string } | null}
 */
let revisionBase = null;
/**
 * Exactly what was interpreted last, until the input is changed.
 * @type {{ bodyText: string, format: BodyFormat } | null}
 */
let interpreted = null;
/** Counts stored-line openings, so an answer for an earlier one (a quick change of revision) is dropped. */
let openRound = 0;
/**
 * Figures on show: which round of drawing they belong to (a preview that answers after a
 * newer interpretation or a stored line took over is dropped), and the blob: URLs of
 * preview images, revoked as soon as they are replaced so their SVGs can be freed.
 */
/** @type {{ round: number, blobUrls: string[] }} */
const figures = { round: 0, blobUrls: [] };

/** @param {string} text */
function setStatus(text) {
  ui.status.textContent = text;
}

function clearError() {
  ui.errorBox.hidden = true;
  ui.errorBox.replaceChildren();
}

/**
 * Shows a failure beside the input and brings it into view.
 * @param {Pick<Failure, 'message' | 'path' | 'problems'>} failure
 * @param {string} [what] What did not happen, e.g. "The line was not interpreted".
 */
function showError(failure, what) {
  renderFailure(ui.errorBox, failure, parsedSurvey(), what);
  ui.errorBox.scrollIntoView({ block: 'nearest' });
}

function currentFormat() {
  return detectFormat(ui.text.value, input.fileName);
}

function updateFormatHint() {
  const hasText = ui.text.value.trim() !== '';
  ui.formatName.textContent = hasText
    ? formatLabel(currentFormat()) + (input.fileName ? ' from ' + input.fileName : '')
    : 'nothing loaded yet';
}

/**
 * The survey as JSON when the input is JSON and parses; lends shot names to error messages.
 * @returns {(SurveyNames & { name?: unknown }) | undefined} Unvalidated: whatever the text holds.
 */
function parsedSurvey() {
  if (currentFormat() !== 'json') return undefined;
  try {
    return JSON.parse(ui.text.value);
  } catch {
    return undefined;
  }
}

/** @param {boolean} busy */
function setBusy(busy) {
  ui.interpretButton.disabled = busy;
  ui.storeButton.disabled = busy;
  ui.reviseButton.disabled = busy;
  document.body.classList.toggle('busy', busy);
}

/**
 * "Store as revision of …" is offered only while an interpretation of loaded text is on show
 * and a stored line was open before it.
 */
function updateReviseButton() {
  const base = interpreted !== null && openLineId === null ? revisionBase : null;
  ui.reviseButton.hidden = base === null;
  if (base !== null) ui.reviseButton.textContent = 'Store as revision of ' + base.name;
}

/** The input changed after Interpret: what would be stored is no longer what is on show. */
function forgetInterpreted() {
  interpreted = null;
  updateReviseButton();
}

/**
 * The line's name from the survey, else the fallback.
 * @param {{ name?: unknown } | null | undefined} survey
 * @param {string} fallback
 * @returns {string}
 */
function lineName(survey, fallback) {
  const name = survey?.name;
  return typeof name === 'string' && name.trim() ? name.trim() : fallback;
}

/**
 * Shows an interpretation: title, warnings, summary and the station table.
 * @param {string} name
 * @param {Interpretation} interpretation
 * @param {string} metaText
 */
function showInterpretation(name, interpretation, metaText) {
  ui.title.textContent = name;
  ui.meta.textContent = metaText;
  ui.emptyNote.hidden = true;
  ui.failedNote.hidden = true;
  const stations = Array.isArray(interpretation.stations) ? interpretation.stations : [];
  renderLineNotes(ui.lineNotes, interpretation);
  renderAllowance({ box: ui.allowance, headline: ui.allowanceHeadline, detail: ui.allowanceDetail, reasoning: ui.allowanceReasoning }, interpretation);
  renderWarnings(ui.warnings, ui.warningList, interpretation.qc?.warnings);
  renderSummary(ui.summaryList, interpretation);
  ui.summary.hidden = false;
  renderStationTable(ui.stationHead, ui.stationBody, stations);
  ui.stations.hidden = false;
}

/** Starts a new round of figures; pending previews of earlier rounds are then ignored. */
function newFigureRound() {
  figures.round += 1;
  return figures.round;
}

/** Revokes the blob: URLs of the preview images (call after their <img> got a new src). */
function releasePreviewUrls() {
  for (const url of figures.blobUrls) URL.revokeObjectURL(url);
  figures.blobUrls = [];
}

function hideStoredParts() {
  newFigureRound();
  removeExtraSheets();
  ui.figures.hidden = true;
  ui.filesPanel.hidden = true;
  ui.sharePanel.hidden = true;
  ui.sectionImage.removeAttribute('src');
  ui.travelTimesImage.removeAttribute('src');
  ui.grmImage.removeAttribute('src');
  ui.grmFigure.hidden = true;
  setCompareSource(null, '');
  releasePreviewUrls();
  markFiguresAsPreview(ui.figures, false);
  ui.revisionRow.hidden = true;
}

/**
 * The input could not be interpreted: whatever line was on show goes (its numbers are not
 * those of the input any more), the header says so and points to the problems beside the input.
 * The stored line stays in the list, one click away.
 */
function showNotInterpreted() {
  hideStoredParts();
  openLineId = null;
  interpreted = null;
  updateReviseButton();
  markOpenInList();
  ui.title.textContent = 'Not interpreted';
  ui.meta.textContent = 'The input has problems; they are listed beside it.';
  ui.badge.textContent = 'Not interpreted';
  ui.badge.className = 'badge failed';
  ui.badge.hidden = false;
  for (const part of [ui.lineNotes, ui.allowance, ui.warnings, ui.unsavedNote, ui.summary, ui.stations, ui.emptyNote]) part.hidden = true;
  ui.summaryList.replaceChildren();
  ui.stationHead.replaceChildren();
  ui.stationBody.replaceChildren();
  ui.failedNote.hidden = false;
  history.replaceState(null, '', window.location.pathname + window.location.search);
}

/**
 * Whether a failed request was refused for what the input holds (bad survey, pick table,
 * size, type), rather than for the token, the network or the service.
 * @param {Failure} failure
 * @returns {boolean}
 */
function inputRefused(failure) {
  return [400, 413, 415, 422].includes(failure.status);
}

/**
 * The "could not be drawn" note beside a figure's image.
 * @param {HTMLImageElement} image
 * @returns {HTMLElement | null}
 */
function failedNoteOf(image) {
  const note = image.parentElement?.querySelector('.figure-failed');
  return note instanceof HTMLElement ? note : null;
}

/** @param {HTMLImageElement} image */
function showFigureFailed(image) {
  image.hidden = true;
  image.removeAttribute('src');
  const note = failedNoteOf(image);
  if (note) note.hidden = false;
}

/**
 * Shows the drawings of a line that is not stored, from the SVG text of the same answer
 * that carried its interpretation. Each SVG becomes an image/svg+xml Blob shown in an <img>
 * through a blob: URL: an SVG in an image runs no script and is never parsed into the page,
 * and the strict CSP allows images from blob:.
 * @param {PreviewBundle} bundle
 * @param {string} name
 */
function showPreviews(bundle, name) {
  newFigureRound();
  /** @type {string[]} */
  const urls = [];
  /**
   * @param {string} svg
   * @param {HTMLImageElement} image
   * @param {string} altText
   */
  const place = (svg, image, altText) => {
    if (svg.trim() === '') {
      showFigureFailed(image);
      return;
    }
    const url = URL.createObjectURL(new Blob([svg], { type: 'image/svg+xml' }));
    urls.push(url);
    showFigure(image, url, altText);
  };
  removeExtraSheets();
  const sheets = bundle.sectionSheets.length > 0 ? bundle.sectionSheets : [bundle.sectionSvg];
  if (sheets.every((svg) => svg.trim() !== '')) {
    const sheetUrls = sheets.map((svg) => URL.createObjectURL(new Blob([svg], { type: 'image/svg+xml' })));
    urls.push(...sheetUrls);
    placeSectionSheets(sheetUrls, 'Preview, not stored: depth section of ' + name);
  } else {
    showFigureFailed(ui.sectionImage);
  }
  place(bundle.travelTimesSvg, ui.travelTimesImage, 'Preview, not stored: time–distance plot of ' + name);
  // The GRM functions only for a line interpreted by GRM (the bundle has them then).
  ui.grmFigure.hidden = typeof bundle.grmSvg !== 'string';
  if (typeof bundle.grmSvg === 'string') place(bundle.grmSvg, ui.grmImage, 'Preview, not stored: GRM functions of ' + name);
  else ui.grmImage.removeAttribute('src');
  releasePreviewUrls();
  figures.blobUrls = urls;
  markFiguresAsPreview(ui.figures, true);
  ui.figures.hidden = false;
}

/**
 * @param {HTMLImageElement} image
 * @param {string} url
 * @param {string} altText
 */
function showFigure(image, url, altText) {
  const failedNote = failedNoteOf(image);
  if (failedNote) failedNote.hidden = true;
  image.hidden = false;
  image.alt = altText;
  image.src = url;
}

/** The section's images after the first (#section-image is sheet 1), in sheet order. */
function extraSheetImages() {
  return Array.from(ui.sectionFrame.querySelectorAll('img.section-sheet'));
}

/** Back to one sheet: the images of sheets 2…n go, the chooser hides. */
function removeExtraSheets() {
  for (const image of extraSheetImages()) image.remove();
  ui.sectionImage.classList.remove('sheet-off');
  ui.sheetButtons.replaceChildren();
  ui.sheetChooser.hidden = true;
}

/**
 * Shows every sheet of the depth section: sheet 1 in #section-image, sheets 2…n as images
 * beside it (one in view at a time, chosen by the sheet buttons; printing gives them all).
 * A line that fits one sheet shows that sheet and no chooser.
 * @param {string[]} urls One per sheet, in order along the line.
 * @param {string} altText
 */
function placeSectionSheets(urls, altText) {
  removeExtraSheets();
  const n = urls.length;
  const alt = (/** @type {number} */ k) => altText + (n > 1 ? ', sheet ' + k + ' of ' + n : '');
  // Sheet 1 may be on show already (a stored line): not loaded again.
  if (ui.sectionImage.getAttribute('src') !== urls[0]) showFigure(ui.sectionImage, urls[0], alt(1));
  else ui.sectionImage.alt = alt(1);
  const failedNote = failedNoteOf(ui.sectionImage);
  for (let k = 2; k <= n; k++) {
    const image = el('img', 'section-sheet');
    image.dataset.sheet = String(k);
    image.alt = alt(k);
    image.src = urls[k - 1];
    ui.sectionFrame.insertBefore(image, failedNote);
  }
  if (n > 1) {
    ui.sheetButtons.replaceChildren(...urls.map((_, i) => {
      const button = el('button', 'button small sheet-button', String(i + 1));
      button.type = 'button';
      button.dataset.sheet = String(i + 1);
      button.setAttribute('aria-label', 'Sheet ' + (i + 1) + ' of ' + n);
      button.addEventListener('click', () => chooseSheet(i + 1));
      return button;
    }));
    ui.sheetChooser.hidden = false;
  }
  chooseSheet(1);
}

/**
 * Puts sheet k of the section in view (the others stay on the page for printing).
 * @param {number} k 1-based
 */
function chooseSheet(k) {
  const images = [ui.sectionImage, ...extraSheetImages()];
  const n = images.length;
  images.forEach((image, i) => image.classList.toggle('sheet-off', i + 1 !== k));
  ui.sheetLabel.textContent = 'Sheet ' + k + ' of ' + n;
  // A stored line's SVG download is the sheet in view (the PDF holds them all).
  if (!ui.filesPanel.hidden) setSectionDownload(k, n);
  for (const button of ui.sheetButtons.querySelectorAll('button')) {
    if (button instanceof HTMLElement) button.setAttribute('aria-pressed', String(button.dataset.sheet === String(k)));
  }
}

/**
 * A stored line's section may run over several sheets: asks the service how many, then shows
 * them all (sheet 1 is on show already). Dropped when other figures took over meanwhile.
 * @param {string} sectionUrl
 * @param {string} sheetsUrl
 * @param {string} altText
 * @param {number} round
 */
async function showStoredSheets(sectionUrl, sheetsUrl, altText, round) {
  const result = await fetchSectionSheets(sheetsUrl);
  if (round !== figures.round || !result.ok) return;
  const count = Number(result.data?.sheetCount);
  if (!Number.isInteger(count) || count <= 1) return;
  placeSectionSheets(Array.from({ length: count }, (_, i) => sectionSheetUrl(sectionUrl, i + 1)), altText);
}

/**
 * Figures first: side by side on a wide screen (style.css), so both are in view under the
 * line's title; Enlarge gives one figure the whole width, above the other.
 * @param {HTMLButtonElement} button
 */
function toggleEnlarged(button) {
  const figure = document.getElementById(button.dataset.enlarge ?? '');
  if (!figure) return;
  const enlarge = !figure.classList.contains('enlarged');
  for (const other of ui.figures.querySelectorAll('button.enlarge')) {
    if (!(other instanceof HTMLButtonElement)) continue;
    const target = document.getElementById(other.dataset.enlarge ?? '');
    const on = enlarge && other === button;
    target?.classList.toggle('enlarged', on);
    other.setAttribute('aria-pressed', String(on));
    other.textContent = on ? 'Side by side' : 'Enlarge';
  }
  if (enlarge) figure.scrollIntoView({ block: 'nearest' });
}

/** @param {unknown} shareUrl */
function showShareLink(shareUrl) {
  if (typeof shareUrl !== 'string' || !shareUrl) {
    ui.sharePanel.hidden = true;
    return;
  }
  const absolute = new URL(shareUrl, window.location.href).href;
  ui.shareUrl.value = absolute;
  ui.shareOpen.href = absolute;
  ui.sharePanel.hidden = false;
}

/** The stored line on show, for the seismograph-file drop: its name and whether it was made from files. */
/** @type {{ id: string, name: string, fromGathers: boolean } | null} */
let openLineInfo = null;

function markOpenInList() {
  updateDropTarget();
  for (const button of ui.storedList.querySelectorAll('button[data-line-id]')) {
    if (!(button instanceof HTMLElement)) continue;
    if (button.dataset.lineId === openLineId) button.setAttribute('aria-current', 'true');
    else button.removeAttribute('aria-current');
  }
}

/**
 * Shows "revision N of M" and, when there is more than one, a select of all revisions
 * (option text built with textContent: names and dates come from the service).
 * @param {number} shown
 * @param {number} latest
 * @param {readonly RevisionEntry[]} revisions
 */
function showRevisions(shown, latest, revisions) {
  ui.revisionText.textContent = 'revision ' + shown + ' of ' + latest;
  ui.revisionRow.hidden = false;
  const list = Array.isArray(revisions) ? revisions.filter((r) => r && Number.isInteger(r.revision)) : [];
  ui.revisionPicker.hidden = latest <= 1 || list.length <= 1;
  ui.revisionSelect.replaceChildren(...list.map((r) => {
    const option = el('option', '', 'Revision ' + r.revision + (r.revision === latest ? ' (latest)' : '')
      + (r.createdAt ? ' · ' + when(r.createdAt) : ''));
    option.value = String(r.revision);
    option.selected = r.revision === shown;
    return option;
  }));
}

/**
 * Opens a stored line: its interpretation, figures, downloads and share link; the latest
 * revision, or the one asked for.
 * @param {string} id
 * @param {string} [shareUrlFromStore]
 * @param {number} [revision]
 * @returns {Promise<boolean>} Whether the line is on show.
 */
async function openStoredLine(id, shareUrlFromStore, revision) {
  const round = ++openRound;
  setStatus('Opening the stored line…');
  const result = await fetchLine(id, revision);
  if (round !== openRound) return false;
  if (!result.ok) {
    showError(result.failure, 'The stored line could not be opened');
    setStatus('Could not open the line.');
    return false;
  }
  clearError();
  const { survey, interpretation } = result.data ?? {};
  if (!interpretation || !Array.isArray(interpretation.stations)) {
    renderFailure(ui.errorBox, { message: 'The service sent this line without its interpretation.', path: '', problems: [] });
    setStatus('Could not open the line.');
    return false;
  }
  const name = lineName(survey, 'Stored line ' + id);
  openLineId = id;
  openLineInfo = { id, name: revisionBaseName(result.data?.revisions, integerOr(result.data?.latestRevision, 1), name), fromGathers: Array.isArray(result.data?.gathers) && result.data.gathers.length > 0 };
  const shown = integerOr(result.data?.revision, 1);
  const latest = integerOr(result.data?.latestRevision, shown);
  const revisions = Array.isArray(result.data?.revisions) ? result.data.revisions : [];
  const latestName = revisions.find((r) => r?.revision === latest)?.name;
  revisionBase = { id, name: typeof latestName === 'string' && latestName.trim() ? latestName.trim() : name };
  interpreted = null;
  updateReviseButton();
  const stationCount = interpretation.stations.length;
  const shotCount = Array.isArray(survey?.shots) ? survey.shots.length : 0;
  const created = result.data?.createdAt ? ' · stored ' + when(result.data.createdAt) : '';
  showInterpretation(name, interpretation, stationCount + ' geophones · ' + shotCount + ' shots' + created);
  ui.badge.textContent = 'Stored';
  ui.badge.className = 'badge stored';
  ui.badge.hidden = false;
  ui.unsavedNote.hidden = true;
  showRevisions(shown, latest, revisions);

  // Once a line has several revisions its files name the one on show, so a later revision
  // stored meanwhile cannot swap the figures under the header.
  const several = latest > 1;
  const urls = lineFileUrls(id, several ? shown : undefined);
  const figureRound = newFigureRound();
  removeExtraSheets();
  showFigure(ui.sectionImage, urls.section, 'Depth section of ' + name);
  showFigure(ui.travelTimesImage, urls.travelTimes, 'Time–distance plot of ' + name);
  ui.grmFigure.hidden = interpretation.method !== 'grm';
  if (interpretation.method === 'grm') showFigure(ui.grmImage, urls.grm, 'GRM functions of ' + name);
  else ui.grmImage.removeAttribute('src');
  releasePreviewUrls();
  markFiguresAsPreview(ui.figures, false);
  ui.figures.hidden = false;
  void showStoredSheets(urls.section, urls.sectionSheets, 'Depth section of ' + name, figureRound);
  setCompareSource({ url: urls.methods }, name);

  const stem = fileStem(name) + (several ? '-r' + shown : '');
  exportFiles = { urls, stem };
  setSectionDownload(1, 1);
  setDownload('download-traveltimes', urls.travelTimes, stem + '-traveltimes.svg');
  setDownload('download-stations', urls.stations, stem + '-stations.csv');
  setDownload('download-interpretation', urls.interpretation, stem + '-interpretation.json');
  setExportDownloads();
  ui.filesPanel.hidden = false;

  showShareLink(shareUrlFromStore ?? result.data?.shareUrl);
  if (result.data) showGatherReview(result.data, (storedId, storedRevision) => void refreshAfterPicks(storedId, storedRevision));
  markOpenInList();
  history.replaceState(null, '', '#line=' + encodeURIComponent(id) + (shown !== latest ? '&revision=' + shown : ''));
  setStatus('Opened “' + name + '”' + (several ? ', revision ' + shown + ' of ' + latest : '') + '.');
  return true;
}

/**
 * @param {unknown} value
 * @param {number} fallback
 * @returns {number}
 */
function integerOr(value, fallback) {
  return typeof value === 'number' && Number.isInteger(value) ? value : fallback;
}

/** @type {{ urls: ReturnType<typeof lineFileUrls>, stem: string } | null} */
let exportFiles = null;

/** The PDF and PNG links of the open line, with the paper and section scale chosen beside them. */
function setExportDownloads() {
  if (!exportFiles) return;
  const { urls, stem } = exportFiles;
  const sheet = { paper: $('export-paper', HTMLSelectElement).value, scale: $('export-scale', HTMLInputElement).value };
  setDownload('download-section-pdf', withSheetQuery(urls.sectionPdf, sheet, true), stem + '-section.pdf');
  setDownload('download-section-png', withSheetQuery(urls.sectionPng, sheet, true), stem + '-section.png');
  setDownload('download-traveltimes-pdf', withSheetQuery(urls.travelTimesPdf, sheet, false), stem + '-traveltimes.pdf');
  setDownload('download-traveltimes-png', urls.travelTimesPng, stem + '-traveltimes.png');
}

/**
 * The section's SVG download: sheet k of n of the open stored line, named so.
 * @param {number} k
 * @param {number} n
 */
function setSectionDownload(k, n) {
  if (!exportFiles) return;
  const { urls, stem } = exportFiles;
  setDownload('download-section', sectionSheetUrl(urls.section, k), stem + (n > 1 ? '-section-sheet' + k : '-section') + '.svg');
  $('download-section', HTMLAnchorElement).textContent = n > 1 ? 'Depth section (SVG, sheet ' + k + ' of ' + n + ')' : 'Depth section (SVG)';
}

/**
 * @param {string} id
 * @param {string} url
 * @param {string} fileName
 */
function setDownload(id, url, fileName) {
  const link = $(id, HTMLAnchorElement);
  link.href = url;
  link.setAttribute('download', fileName);
}

/**
 * After corrected picks were stored (web/gather-review.js): the list and the line at the
 * new revision, whose figures the service drew from the re-interpretation.
 * @param {string} id
 * @param {number} revision
 */
async function refreshAfterPicks(id, revision) {
  await refreshList();
  await openStoredLine(id, undefined, revision);
}

async function refreshList() {
  const result = await listLines();
  if (!result.ok) {
    showError(result.failure, 'The stored lines could not be listed');
    return [];
  }
  const lines = (Array.isArray(result.data) ? result.data : [])
    .filter((line) => line && typeof line.id === 'string')
    // Newest first; ISO timestamps sort as text.
    .sort((a, b) => String(b.createdAt ?? '').localeCompare(String(a.createdAt ?? '')));
  ui.storedList.replaceChildren(...lines.map((line) => {
    const button = el('button', 'stored-item');
    button.type = 'button';
    button.dataset.lineId = line.id;
    button.append(
      el('span', 'stored-name', typeof line.name === 'string' && line.name ? line.name : 'Unnamed line'),
      el('span', 'stored-date', when(line.createdAt)),
    );
    button.addEventListener('click', () => { void openStoredLine(line.id); });
    const item = el('li');
    item.append(button);
    return item;
  }));
  ui.storedEmpty.hidden = lines.length > 0;
  markOpenInList();
  return lines;
}

function requireInput() {
  if (ui.text.value.trim() !== '') return true;
  // Said differently when a file was chosen: asking to choose one would be wrong.
  const message = input.fileName
    ? 'The file “' + input.fileName + '” is empty: there is nothing in it to interpret. Choose another pick file or paste a survey.'
    : 'Nothing to send yet: choose a pick file or paste a survey first.';
  showError({ message, path: '', problems: [] });
  setStatus('');
  return false;
}

/**
 * Interpret: one request (POST /api/v1/previews) answers the interpretation and both of its
 * drawings, so one click costs the service one interpretation and the figures always show
 * the numbers in the table.
 */
async function interpretInput() {
  if (!requireInput()) return;
  setBusy(true);
  setStatus('Interpreting…');
  const format = currentFormat();
  // What is shown (and offered as a revision) is exactly the text sent, even if it is edited meanwhile.
  const bodyText = ui.text.value;
  // A stored line opened while this request runs takes over; its answer is then dropped.
  const round = newFigureRound();
  const result = await previewLine(bodyText, format);
  setBusy(false);
  if (round !== figures.round) return;
  if (!result.ok) {
    showError(result.failure, 'The line was not interpreted');
    showNotInterpreted();
    setStatus('The line was not interpreted: see the problems listed.');
    return;
  }
  clearError();
  const { interpretation } = result.data;
  const fromTable = format === 'csv' ? pickTableName(bodyText) : '';
  const name = lineName(parsedSurvey(), fromTable || input.fileName || 'Pasted line');
  openLineId = null;
  // Offered for storing as a revision only while the input still holds what was interpreted.
  interpreted = ui.text.value === bodyText ? { bodyText, format } : null;
  markOpenInList();
  const stationCount = interpretation.stations.length;
  showInterpretation(name, interpretation, stationCount + ' geophones · ' + formatLabel(format));
  ui.badge.textContent = 'Not stored';
  ui.badge.className = 'badge unsaved';
  ui.badge.hidden = false;
  hideStoredParts();
  updateReviseButton();
  ui.unsavedNote.hidden = false;
  history.replaceState(null, '', window.location.pathname + window.location.search);
  showPreviews(result.data, name);
  setCompareSource({ bodyText, format }, name);
  const warningCount = Array.isArray(interpretation.qc?.warnings) ? interpretation.qc.warnings.length : 0;
  setStatus('Interpreted “' + name + '”: ' + stationCount + ' stations'
    + (warningCount ? ', ' + warningCount + ' warning' + (warningCount === 1 ? '' : 's') : '') + '.');
}

async function storeInput() {
  if (!requireInput()) return;
  await storeNewLine(ui.text.value, currentFormat(), { busy: 'Storing…', done: 'Stored. The share link is ready to copy.', markRefusedInput: true });
}

/**
 * Stores a body as a line of its own and opens it. `markRefusedInput`: a refusal of the input
 * itself also withdraws the shown results (the Store button's case).
 * @param {string} bodyText
 * @param {BodyFormat} format
 * @param {{ busy: string, done: string, markRefusedInput: boolean }} words
 */
async function storeNewLine(bodyText, format, words) {
  setBusy(true);
  setStatus(words.busy);
  const result = await storeLine(bodyText, format);
  setBusy(false);
  if (!result.ok) {
    showError(result.failure, 'The line was not stored');
    if (words.markRefusedInput && inputRefused(result.failure)) showNotInterpreted();
    setStatus('The line was not stored.');
    return;
  }
  clearError();
  const id = result.data?.id;
  if (typeof id !== 'string' && typeof id !== 'number') {
    setStatus('The service stored the line but did not say under which id.');
    return;
  }
  await refreshList();
  const opened = await openStoredLine(String(id), result.data?.shareUrl);
  if (opened) setStatus(words.done);
}

/**
 * Asks what to do with a file whose geophone layout differs from the stored line's: store it
 * as a new line, store it as a revision anyway (the service is then told the change is meant),
 * or nothing. Esc and Cancel answer 'cancel'.
 * @param {string} change What changes: the service's own sentence, shown as it is.
 * @param {string} baseName
 * @returns {Promise<'new-line' | 'confirm' | 'cancel'>}
 */
function askAboutLayout(change, baseName) {
  ui.layoutChangeText.textContent = change;
  ui.layoutConfirm.textContent = 'Store as revision of “' + baseName + '” anyway';
  return new Promise((resolve) => {
    const listening = new AbortController();
    /** @param {'new-line' | 'confirm' | 'cancel'} answer */
    const answer = (answer) => {
      listening.abort();
      if (ui.layoutDialog.open) ui.layoutDialog.close();
      resolve(answer);
    };
    const { signal } = listening;
    ui.layoutNewLine.addEventListener('click', () => answer('new-line'), { signal });
    ui.layoutConfirm.addEventListener('click', () => answer('confirm'), { signal });
    ui.layoutCancel.addEventListener('click', () => answer('cancel'), { signal });
    ui.layoutDialog.addEventListener('cancel', () => answer('cancel'), { signal });
    ui.layoutDialog.showModal();
    // The safe choice has the focus: Enter never stores another line under this one's link by accident.
    ui.layoutNewLine.focus();
  });
}

/**
 * Stores exactly the text that was interpreted as the next revision of the line opened
 * before. The service judges whether the geophone layout is the line's (api-v1.md): another
 * layout answers 409 layout_changed and stores nothing. The page then asks, showing the
 * service's own description of the change (one text, from one place), and tells the service
 * the change is meant only when the user says so; a new line is offered instead.
 */
async function reviseInput() {
  const base = revisionBase;
  const sent = interpreted;
  if (!base || !sent) return;
  setBusy(true);
  setStatus('Storing as a revision of “' + base.name + '”…');
  let result = await storeRevision(base.id, sent.bodyText, sent.format, false);
  setBusy(false);
  if (!result.ok && result.failure.status === LAYOUT_CHANGED_STATUS) {
    setStatus('Nothing stored yet: this file has another geophone layout.');
    const choice = await askAboutLayout(result.failure.layoutChange ?? result.failure.message, base.name);
    if (choice === 'cancel') {
      setStatus('Nothing stored.');
      return;
    }
    if (choice === 'new-line') {
      await storeAsNewLine(sent);
      return;
    }
    setBusy(true);
    setStatus('Storing as a revision of “' + base.name + '”…');
    result = await storeRevision(base.id, sent.bodyText, sent.format, true);
    setBusy(false);
  }
  if (!result.ok) {
    showError(result.failure, 'The revision was not stored');
    setStatus('The revision was not stored.');
    return;
  }
  clearError();
  const revision = typeof result.data?.revision === 'number' && Number.isInteger(result.data.revision) ? result.data.revision : undefined;
  await refreshList();
  const opened = await openStoredLine(base.id, result.data?.shareUrl, revision);
  if (opened) setStatus('Stored as revision ' + (revision ?? '') + ' of “' + base.name + '”.');
}

/**
 * Stores the interpreted text as a line of its own (the answer to a layout change).
 * @param {{ bodyText: string, format: BodyFormat }} sent
 */
async function storeAsNewLine(sent) {
  await storeNewLine(sent.bodyText, sent.format, { busy: 'Storing as a new line…', done: 'Stored as a new line. The share link is ready to copy.', markRefusedInput: false });
}

async function copyShareLink() {
  const link = ui.shareUrl.value;
  if (!link) return;
  try {
    if (!navigator.clipboard) throw new Error('no clipboard');
    await navigator.clipboard.writeText(link);
    setStatus('Share link copied.');
  } catch {
    // Plain http on the office network has no clipboard API: select the text instead.
    ui.shareUrl.focus();
    ui.shareUrl.select();
    let copied = false;
    try {
      copied = document.execCommand('copy');
    } catch {
      copied = false;
    }
    setStatus(copied ? 'Share link copied.' : 'Share link selected: press Ctrl+C (⌘C) to copy it.');
  }
}

async function loadChosenFile() {
  const file = ui.fileInput.files?.[0];
  if (!file) return;
  let text;
  try {
    // A binary file (a seismograph record, a workbook) would fill the text box with garbage:
    // say what it is instead, and leave the input as it was.
    const kind = binaryKind(new Uint8Array(await file.slice(0, 4096).arrayBuffer()));
    if (kind !== null) {
      // A seismograph file has its own way in: the drop zone above picks its first breaks.
      const instead = kind === 'a SEG-2 seismograph record'
        ? 'Put the seismograph files of the line under “Seismograph files” above (drop them or choose them there): their first breaks are picked for you.'
        : 'Pick the first breaks first and export them in one of these forms.';
      showError({
        message: 'The file “' + file.name + '” is ' + kind + ', not a pick file. Here Arcline reads first-break picks: '
          + 'a JSON survey or a CSV pick table (see the README for both). ' + instead,
        path: '', problems: [],
      });
      ui.fileInput.value = '';
      setStatus('');
      return;
    }
    text = await file.text();
  } catch {
    showError({ message: 'The file “' + file.name + '” could not be read.', path: '', problems: [] });
    return;
  }
  ui.text.value = text;
  input.fileName = file.name;
  forgetInterpreted();
  clearError();
  updateFormatHint();
  setStatus('Loaded ' + file.name + ' (' + formatLabel(currentFormat()) + '). Press Interpret or Store.');
}

/** The line (and revision, if one is named) in the address: `#line=<id>[&revision=<n>]`. */
function lineFromHash() {
  const params = new URLSearchParams(window.location.hash.replace(/^#/, ''));
  const id = params.get('line');
  if (!id) return null;
  const revision = Number(params.get('revision'));
  return { id, revision: Number.isInteger(revision) && revision >= 1 ? revision : undefined };
}

/** @param {Event} event */
function imageFailed(event) {
  const image = event.currentTarget;
  if (!(image instanceof HTMLImageElement) || !image.getAttribute('src')) return;
  showFigureFailed(image);
}

function wire() {
  ui.fileInput.addEventListener('change', () => { void loadChosenFile(); });
  $('export-paper', HTMLSelectElement).addEventListener('change', setExportDownloads);
  $('export-scale', HTMLInputElement).addEventListener('input', setExportDownloads);
  ui.text.addEventListener('input', () => {
    // Edited text is judged by its content, not by the name of the file it came from.
    input.fileName = '';
    updateFormatHint();
    forgetInterpreted();
  });
  ui.interpretButton.addEventListener('click', () => { void interpretInput(); });
  ui.storeButton.addEventListener('click', () => { void storeInput(); });
  ui.reviseButton.addEventListener('click', () => { void reviseInput(); });
  ui.revisionSelect.addEventListener('change', () => {
    const revision = Number(ui.revisionSelect.value);
    if (openLineId && Number.isInteger(revision)) void openStoredLine(openLineId, undefined, revision);
  });
  ui.refreshButton.addEventListener('click', () => { void refreshList(); });
  ui.copyButton.addEventListener('click', () => { void copyShareLink(); });
  ui.token.value = readWriteToken();
  ui.token.addEventListener('input', () => saveWriteToken(ui.token.value.trim()));
  ui.sectionImage.addEventListener('error', imageFailed);
  for (const button of ui.figures.querySelectorAll('button.enlarge')) {
    if (button instanceof HTMLButtonElement) button.addEventListener('click', () => toggleEnlarged(button));
  }
  ui.travelTimesImage.addEventListener('error', imageFailed);
  ui.grmImage.addEventListener('error', imageFailed);
  setupMethodCompare({
    button: $('methods-button', HTMLButtonElement),
    status: $('methods-status', HTMLElement),
    frame: $('methods-frame', HTMLElement),
    image: $('methods-image', HTMLImageElement),
    table: $('methods-table', HTMLTableElement),
    body: $('methods-body', HTMLTableSectionElement),
  });
  updateFormatHint();
}

/**
 * The name of the line's latest revision (what a new revision joins), else `fallback`.
 * @param {RevisionEntry[] | undefined} revisions
 * @param {number} latest
 * @param {string} fallback
 */
function revisionBaseName(revisions, latest, fallback) {
  const named = Array.isArray(revisions) ? revisions.find((r) => r?.revision === latest)?.name : undefined;
  return typeof named === 'string' && named.trim() ? named.trim() : fallback;
}

async function start() {
  wire();
  initGatherDrop({
    openLine: () => (openLineId !== null && openLineInfo?.id === openLineId ? openLineInfo : null),
    showLine: async (id) => {
      await refreshList();
      await openStoredLine(id);
    },
  });
  const lines = await refreshList();
  const wanted = lineFromHash();
  const first = wanted?.id ?? lines[0]?.id;
  if (first) await openStoredLine(first, undefined, wanted?.revision);
  else setStatus('No stored lines yet. Load a pick file to begin.');
  document.body.dataset.ready = 'true';
}

void start();
