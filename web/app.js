// Arcline page: load a line, interpret it, store it, open stored lines, share them.
// Wiring only; requests live in api.js, words in describe.js, DOM building in view.js.

import {
  fetchLine, interpretLine, lineFileUrls, listLines, previewFigure, readWriteToken, saveWriteToken, storeLine,
  storeRevision,
} from './api.js';
import { detectFormat, fileStem, formatLabel, pickTableName, when } from './describe.js';
import { el, markFiguresAsPreview, renderFailure, renderStationTable, renderSummary, renderWarnings } from './view.js';

const $ = (id) => {
  const node = document.getElementById(id);
  if (!node) throw new Error('Arcline page is missing #' + id);
  return node;
};

const ui = {
  fileInput: $('file-input'),
  text: $('survey-text'),
  formatName: $('format-name'),
  interpretButton: $('interpret-button'),
  storeButton: $('store-button'),
  reviseButton: $('revise-button'),
  token: $('write-token'),
  status: $('status'),
  errorBox: $('error-box'),
  storedList: $('stored-list'),
  storedEmpty: $('stored-empty'),
  refreshButton: $('refresh-button'),
  title: $('line-title'),
  meta: $('line-meta'),
  badge: $('line-badge'),
  revisionRow: $('revision-row'),
  revisionText: $('revision-text'),
  revisionPicker: $('revision-picker'),
  revisionSelect: $('revision-select'),
  filesPanel: $('files-panel'),
  sharePanel: $('share-panel'),
  shareUrl: $('share-url'),
  copyButton: $('copy-button'),
  shareOpen: $('share-open'),
  warnings: $('warnings'),
  warningList: $('warning-list'),
  figures: $('figures'),
  sectionImage: $('section-image'),
  travelTimesImage: $('traveltimes-image'),
  unsavedNote: $('unsaved-note'),
  summary: $('summary'),
  summaryList: $('summary-list'),
  stations: $('stations'),
  stationHead: $('station-head'),
  stationBody: $('station-body'),
  emptyNote: $('empty-note'),
};

/** What the input area holds: its format follows the file name until the text is edited. */
const input = { fileName: '' };
/** Id of the stored line on show, or null for an unsaved interpretation / nothing. */
let openLineId = null;
/**
 * The stored line opened last ({ id, name } of its latest revision), still known while a newly
 * loaded line is interpreted: that line can then be stored as its next revision.
 */
let revisionBase = null;
/** Exactly what was interpreted last ({ bodyText, format }), until the input is changed. */
let interpreted = null;
/** Counts stored-line openings, so an answer for an earlier one (a quick change of revision) is dropped. */
let openRound = 0;
/**
 * Figures on show: which round of drawing they belong to (a preview that answers after a
 * newer interpretation or a stored line took over is dropped), and the blob: URLs of
 * preview images, revoked as soon as they are replaced so their SVGs can be freed.
 */
const figures = { round: 0, blobUrls: [] };

function setStatus(text) {
  ui.status.textContent = text;
}

function clearError() {
  ui.errorBox.hidden = true;
  ui.errorBox.replaceChildren();
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

/** The survey as JSON when the input is JSON and parses; lends shot names to error messages. */
function parsedSurvey() {
  if (currentFormat() !== 'json') return undefined;
  try {
    return JSON.parse(ui.text.value);
  } catch {
    return undefined;
  }
}

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
  const offer = revisionBase !== null && interpreted !== null && openLineId === null;
  ui.reviseButton.hidden = !offer;
  if (offer) ui.reviseButton.textContent = 'Store as revision of ' + revisionBase.name;
}

/** The input changed after Interpret: what would be stored is no longer what is on show. */
function forgetInterpreted() {
  interpreted = null;
  updateReviseButton();
}

function lineName(survey, interpretation, fallback) {
  const name = survey?.name ?? interpretation?.name;
  return typeof name === 'string' && name.trim() ? name.trim() : fallback;
}

/** Shows an interpretation: title, warnings, summary and the station table. */
function showInterpretation(name, interpretation, metaText) {
  ui.title.textContent = name;
  ui.meta.textContent = metaText;
  ui.emptyNote.hidden = true;
  const stations = Array.isArray(interpretation?.stations) ? interpretation.stations : [];
  renderWarnings(ui.warnings, ui.warningList, interpretation?.qc?.warnings);
  renderSummary(ui.summaryList, interpretation ?? {});
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
  ui.figures.hidden = true;
  ui.filesPanel.hidden = true;
  ui.sharePanel.hidden = true;
  ui.sectionImage.removeAttribute('src');
  ui.travelTimesImage.removeAttribute('src');
  releasePreviewUrls();
  markFiguresAsPreview(ui.figures, false);
  ui.revisionRow.hidden = true;
}

function showFigureFailed(image) {
  image.hidden = true;
  image.removeAttribute('src');
  const note = image.parentElement?.querySelector('.figure-failed');
  if (note) note.hidden = false;
}

/**
 * Draws a line that is not stored: asks the service for both previews of the same text
 * that was interpreted and shows them as <img> from blob: URLs (the strict CSP allows
 * images from blob:; nothing the service sent is parsed into the page).
 */
async function showPreviews(bodyText, format, name) {
  const round = newFigureRound();
  const [section, travelTimes] = await Promise.all([
    previewFigure(bodyText, format, 'section'),
    previewFigure(bodyText, format, 'travelTimes'),
  ]);
  if (round !== figures.round) return;
  const urls = [];
  const place = (result, image, altText) => {
    if (!result.ok) {
      showFigureFailed(image);
      return result.failure;
    }
    const url = URL.createObjectURL(result.blob);
    urls.push(url);
    showFigure(image, url, altText);
    return null;
  };
  const failures = [
    place(section, ui.sectionImage, 'Preview, not stored: depth section of ' + name),
    place(travelTimes, ui.travelTimesImage, 'Preview, not stored: time–distance plot of ' + name),
  ].filter(Boolean);
  releasePreviewUrls();
  figures.blobUrls = urls;
  markFiguresAsPreview(ui.figures, true);
  ui.figures.hidden = false;
  if (failures.length) setStatus('The preview figures could not be drawn: ' + failures[0].message);
}

function showFigure(image, url, altText) {
  const failedNote = image.parentElement?.querySelector('.figure-failed');
  if (failedNote) failedNote.hidden = true;
  image.hidden = false;
  image.alt = altText;
  image.src = url;
}

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

function markOpenInList() {
  for (const button of ui.storedList.querySelectorAll('button[data-line-id]')) {
    if (button.dataset.lineId === openLineId) button.setAttribute('aria-current', 'true');
    else button.removeAttribute('aria-current');
  }
}

/**
 * Shows "revision N of M" and, when there is more than one, a select of all revisions
 * (option text built with textContent: names and dates come from the service).
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
 */
async function openStoredLine(id, shareUrlFromStore, revision) {
  const round = ++openRound;
  setStatus('Opening the stored line…');
  const result = await fetchLine(id, revision);
  if (round !== openRound) return false;
  if (!result.ok) {
    renderFailure(ui.errorBox, result.failure);
    setStatus('Could not open the line.');
    return false;
  }
  clearError();
  const { survey, interpretation } = result.data ?? {};
  const name = lineName(survey, interpretation, 'Stored line ' + id);
  openLineId = id;
  const shown = Number.isInteger(result.data?.revision) ? result.data.revision : 1;
  const latest = Number.isInteger(result.data?.latestRevision) ? result.data.latestRevision : shown;
  const revisions = Array.isArray(result.data?.revisions) ? result.data.revisions : [];
  const latestName = revisions.find((r) => r?.revision === latest)?.name;
  revisionBase = { id, name: typeof latestName === 'string' && latestName.trim() ? latestName.trim() : name };
  interpreted = null;
  updateReviseButton();
  const stationCount = Array.isArray(interpretation?.stations) ? interpretation.stations.length : 0;
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
  newFigureRound();
  showFigure(ui.sectionImage, urls.section, 'Depth section of ' + name);
  showFigure(ui.travelTimesImage, urls.travelTimes, 'Time–distance plot of ' + name);
  releasePreviewUrls();
  markFiguresAsPreview(ui.figures, false);
  ui.figures.hidden = false;

  const stem = fileStem(name) + (several ? '-r' + shown : '');
  setDownload('download-section', urls.section, stem + '-section.svg');
  setDownload('download-traveltimes', urls.travelTimes, stem + '-traveltimes.svg');
  setDownload('download-stations', urls.stations, stem + '-stations.csv');
  setDownload('download-interpretation', urls.interpretation, stem + '-interpretation.json');
  ui.filesPanel.hidden = false;

  showShareLink(shareUrlFromStore ?? result.data?.shareUrl);
  markOpenInList();
  history.replaceState(null, '', '#line=' + encodeURIComponent(id) + (shown !== latest ? '&revision=' + shown : ''));
  setStatus('Opened “' + name + '”' + (several ? ', revision ' + shown + ' of ' + latest : '') + '.');
  return true;
}

function setDownload(id, url, fileName) {
  const link = $(id);
  link.href = url;
  link.setAttribute('download', fileName);
}

async function refreshList() {
  const result = await listLines();
  if (!result.ok) {
    renderFailure(ui.errorBox, result.failure);
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
  renderFailure(ui.errorBox, {
    message: 'Nothing to send yet: choose a pick file or paste a survey first.', path: '', problems: [],
  });
  setStatus('');
  return false;
}

async function interpretInput() {
  if (!requireInput()) return;
  setBusy(true);
  setStatus('Interpreting…');
  const format = currentFormat();
  // The previews are drawn from exactly the text that was interpreted, even if it is edited meanwhile.
  const bodyText = ui.text.value;
  const result = await interpretLine(bodyText, format);
  setBusy(false);
  if (!result.ok) {
    renderFailure(ui.errorBox, result.failure, parsedSurvey());
    setStatus('The line was not interpreted: see the problems listed.');
    return;
  }
  clearError();
  const interpretation = result.data ?? {};
  const fromTable = format === 'csv' ? pickTableName(ui.text.value) : '';
  const name = lineName(parsedSurvey(), interpretation, fromTable || input.fileName || 'Pasted line');
  openLineId = null;
  // Offered for storing as a revision only while the input still holds what was interpreted.
  interpreted = ui.text.value === bodyText ? { bodyText, format } : null;
  markOpenInList();
  const stationCount = Array.isArray(interpretation.stations) ? interpretation.stations.length : 0;
  showInterpretation(name, interpretation, stationCount + ' geophones · ' + formatLabel(format));
  ui.badge.textContent = 'Not stored';
  ui.badge.className = 'badge unsaved';
  ui.badge.hidden = false;
  hideStoredParts();
  updateReviseButton();
  ui.unsavedNote.hidden = false;
  history.replaceState(null, '', window.location.pathname + window.location.search);
  const warningCount = Array.isArray(interpretation.qc?.warnings) ? interpretation.qc.warnings.length : 0;
  setStatus('Interpreted “' + name + '”: ' + stationCount + ' stations'
    + (warningCount ? ', ' + warningCount + ' warning' + (warningCount === 1 ? '' : 's') : '') + '.');
  await showPreviews(bodyText, format, name);
}

async function storeInput() {
  if (!requireInput()) return;
  setBusy(true);
  setStatus('Storing…');
  const result = await storeLine(ui.text.value, currentFormat());
  setBusy(false);
  if (!result.ok) {
    renderFailure(ui.errorBox, result.failure, parsedSurvey());
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
  if (opened) setStatus('Stored. The share link is ready to copy.');
}

/** Stores exactly the text that was interpreted as the next revision of the line opened before. */
async function reviseInput() {
  const base = revisionBase;
  const sent = interpreted;
  if (!base || !sent) return;
  setBusy(true);
  setStatus('Storing as a revision of “' + base.name + '”…');
  const result = await storeRevision(base.id, sent.bodyText, sent.format);
  setBusy(false);
  if (!result.ok) {
    renderFailure(ui.errorBox, result.failure, parsedSurvey());
    setStatus('The revision was not stored.');
    return;
  }
  clearError();
  const revision = Number.isInteger(result.data?.revision) ? result.data.revision : undefined;
  await refreshList();
  const opened = await openStoredLine(base.id, result.data?.shareUrl, revision);
  if (opened) setStatus('Stored as revision ' + (revision ?? '') + ' of “' + base.name + '”.');
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
  try {
    ui.text.value = await file.text();
  } catch {
    renderFailure(ui.errorBox, { message: 'The file “' + file.name + '” could not be read.', path: '', problems: [] });
    return;
  }
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

function imageFailed(event) {
  const image = event.currentTarget;
  if (!image.getAttribute('src')) return;
  image.hidden = true;
  const note = image.parentElement?.querySelector('.figure-failed');
  if (note) note.hidden = false;
}

function wire() {
  ui.fileInput.addEventListener('change', () => { void loadChosenFile(); });
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
  ui.travelTimesImage.addEventListener('error', imageFailed);
  updateFormatHint();
}

async function start() {
  wire();
  const lines = await refreshList();
  const wanted = lineFromHash();
  const first = wanted?.id ?? lines[0]?.id;
  if (first) await openStoredLine(first, undefined, wanted?.revision);
  else setStatus('No stored lines yet. Load a pick file to begin.');
  document.body.dataset.ready = 'true';
}

void start();
