// Arcline page: load a line, interpret it, store it, open stored lines, share them.
// Wiring only; requests live in api.js, words in describe.js, DOM building in view.js.

import {
  fetchLine, interpretLine, lineFileUrls, listLines, previewFigure, readWriteToken, saveWriteToken, storeLine,
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
  token: $('write-token'),
  status: $('status'),
  errorBox: $('error-box'),
  storedList: $('stored-list'),
  storedEmpty: $('stored-empty'),
  refreshButton: $('refresh-button'),
  title: $('line-title'),
  meta: $('line-meta'),
  badge: $('line-badge'),
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
  document.body.classList.toggle('busy', busy);
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

/** Opens a stored line: its interpretation, figures, downloads and share link. */
async function openStoredLine(id, shareUrlFromStore) {
  setStatus('Opening the stored line…');
  const result = await fetchLine(id);
  if (!result.ok) {
    renderFailure(ui.errorBox, result.failure);
    setStatus('Could not open the line.');
    return false;
  }
  clearError();
  const { survey, interpretation } = result.data ?? {};
  const name = lineName(survey, interpretation, 'Stored line ' + id);
  openLineId = id;
  const stationCount = Array.isArray(interpretation?.stations) ? interpretation.stations.length : 0;
  const shotCount = Array.isArray(survey?.shots) ? survey.shots.length : 0;
  const created = result.data?.createdAt ? ' · stored ' + when(result.data.createdAt) : '';
  showInterpretation(name, interpretation, stationCount + ' geophones · ' + shotCount + ' shots' + created);
  ui.badge.textContent = 'Stored';
  ui.badge.className = 'badge stored';
  ui.badge.hidden = false;
  ui.unsavedNote.hidden = true;

  const urls = lineFileUrls(id);
  newFigureRound();
  showFigure(ui.sectionImage, urls.section, 'Depth section of ' + name);
  showFigure(ui.travelTimesImage, urls.travelTimes, 'Time–distance plot of ' + name);
  releasePreviewUrls();
  markFiguresAsPreview(ui.figures, false);
  ui.figures.hidden = false;

  const stem = fileStem(name);
  setDownload('download-section', urls.section, stem + '-section.svg');
  setDownload('download-traveltimes', urls.travelTimes, stem + '-traveltimes.svg');
  setDownload('download-stations', urls.stations, stem + '-stations.csv');
  setDownload('download-interpretation', urls.interpretation, stem + '-interpretation.json');
  ui.filesPanel.hidden = false;

  showShareLink(shareUrlFromStore ?? result.data?.shareUrl);
  markOpenInList();
  history.replaceState(null, '', '#line=' + encodeURIComponent(id));
  setStatus('Opened “' + name + '”.');
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
  markOpenInList();
  const stationCount = Array.isArray(interpretation.stations) ? interpretation.stations.length : 0;
  showInterpretation(name, interpretation, stationCount + ' geophones · ' + formatLabel(format));
  ui.badge.textContent = 'Not stored';
  ui.badge.className = 'badge unsaved';
  ui.badge.hidden = false;
  hideStoredParts();
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
  clearError();
  updateFormatHint();
  setStatus('Loaded ' + file.name + ' (' + formatLabel(currentFormat()) + '). Press Interpret or Store.');
}

function lineIdFromHash() {
  const match = /^#line=(.+)$/.exec(window.location.hash);
  return match ? decodeURIComponent(match[1]) : null;
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
  });
  ui.interpretButton.addEventListener('click', () => { void interpretInput(); });
  ui.storeButton.addEventListener('click', () => { void storeInput(); });
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
  const wanted = lineIdFromHash();
  const first = wanted ?? lines[0]?.id;
  if (first) await openStoredLine(first);
  else setStatus('No stored lines yet. Load a pick file to begin.');
  document.body.dataset.ready = 'true';
}

void start();
