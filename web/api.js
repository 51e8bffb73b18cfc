// Talks to the Arcline HTTP API v1 (shared/api-v1.md). Every call resolves to
// { ok: true, data } or { ok: false, failure }, where failure is
// { status, code, message, path, problems[] } — the page never sees a thrown fetch error.
//
// The types below say what the contract promises each answer holds; the page still checks
// shapes where a wrong one would break it, because a proxy or an older service may answer.

/**
 * @typedef {import('./describe.js').BodyFormat} BodyFormat
 * @typedef {import('../engine/output/interpretation.js').Interpretation} Interpretation
 * @typedef {import('../engine/survey/survey.js').Survey} Survey
 */

/**
 * One problem of a rejected body, as the contract's error body lists it.
 * @typedef {{ path: string, code: string, message: string }} Problem
 */

/**
 * Every failed call, whatever went wrong (network, status, error body).
 * @typedef {object} Failure
 * @property {number} status HTTP status; 0 when the service did not answer.
 * @property {string} code
 * @property {string} message A sentence for the status line or the error box.
 * @property {string} path JSON pointer of the offending value, or ''.
 * @property {Problem[]} problems
 * @property {string} [layoutChange] On a 409 layout_changed: the service's own sentence saying
 *   what changes (error.layoutChange.description), which the page shows as it is.
 */

/**
 * @template T
 * @typedef {{ ok: true, status: number, data: T } | { ok: false, failure: Failure }} Result
 */

/** @typedef {{ id: string, name?: string, createdAt?: string }} ListedLine */
/** @typedef {{ revision: number, name?: string, createdAt?: string }} RevisionEntry */

/**
 * GET /api/v1/surveys/:id.
 * @typedef {object} StoredLine
 * @property {string} id
 * @property {string} [name]
 * @property {string} [createdAt]
 * @property {number} [revision]
 * @property {number} [latestRevision]
 * @property {RevisionEntry[]} [revisions]
 * @property {string | null} [shareUrl] null when the request could not write (no or wrong token)
 * @property {Survey} [survey]
 * @property {Interpretation} [interpretation]
 * @property {{ shotId: string, revision: number }[]} [gathers] the shot gathers uploaded into the line
 */

/** POST /api/v1/surveys and …/revisions. @typedef {{ id: string, shareUrl?: string, revision?: number }} StoreAnswer */

/**
 * POST /api/v1/previews: one interpretation and both drawings of it, as SVG text; every sheet
 * of the section (a long line is paged; sectionSvg is the first).
 * @typedef {{ interpretation: Interpretation, sectionSvg: string, sectionSheets: string[], travelTimesSvg: string, grmSvg?: string }} PreviewBundle
 */

/**
 * GET /api/v1/surveys/:id/methods.json and POST /api/v1/previews/methods: the line by every
 * method, where they differ by more than their combined 1σ, and the overlay figure (SVG text).
 * @typedef {import('../engine/compare/method-comparison.js').MethodComparisonSummary} MethodComparisonSummary
 * @typedef {{ comparison: MethodComparisonSummary, methodsSvg: string }} MethodsAnswer
 */

/** GET /api/v1/surveys/:id/section-sheets.json. @typedef {{ sheetCount: number, sheets?: string[] }} SectionSheets */

/**
 * What fetch() is given: always a method and headers, a body for writes.
 * @typedef {{ method: string, headers: Record<string, string>, body?: string }} RequestSpec
 */

const TOKEN_KEY = 'arcline.writeToken';

/**
 * The write token kept for this tab (sessionStorage), or '' when none.
 * @returns {string}
 */
export function readWriteToken() {
  try {
    return sessionStorage.getItem(TOKEN_KEY) ?? '';
  } catch {
    return '';
  }
}

/** @param {string} token */
export function saveWriteToken(token) {
  try {
    if (token) sessionStorage.setItem(TOKEN_KEY, token);
    else sessionStorage.removeItem(TOKEN_KEY);
  } catch {
    // Storage may be disabled; the token then lives only in the input field.
  }
}

/**
 * Content type of a survey body in the given format.
 * @param {BodyFormat} format
 * @returns {string}
 */
export function contentTypeOf(format) {
  return format === 'csv' ? 'text/csv; charset=utf-8' : 'application/json';
}

/**
 * A POST of a survey body (JSON or pick table). With a token (writes only), the
 * `Authorization: Bearer` header the service's write guard reads.
 * @param {string} bodyText
 * @param {BodyFormat} format
 * @param {string} [token]
 * @returns {RequestSpec}
 */
export function surveyPost(bodyText, format, token = '') {
  /** @type {Record<string, string>} */
  const headers = { 'Content-Type': contentTypeOf(format), Accept: 'application/json' };
  if (token) headers.Authorization = 'Bearer ' + token;
  return { method: 'POST', headers, body: bodyText };
}

/** @type {RequestSpec} */
const GET = Object.freeze({ method: 'GET', headers: { Accept: 'application/json' } });

/**
 * A GET that carries the write token when one is set: the service shows a stored line's
 * share link only to a request that could write (on loopback without a token, to every
 * request), so the writer's page sees it and a reader's page does not.
 * @param {string} [token]
 * @returns {RequestSpec}
 */
export function writerGet(token = '') {
  /** @type {Record<string, string>} */
  const headers = { Accept: 'application/json' };
  if (token) headers.Authorization = 'Bearer ' + token;
  return { method: 'GET', headers };
}

/**
 * One call; the answer's JSON is taken as the contract type T the caller names (checked
 * where the page depends on it, e.g. readPreviewBundle).
 * @template T
 * @param {string} path
 * @param {RequestSpec} spec
 * @returns {Promise<Result<T>>}
 */
async function request(path, spec) {
  let response;
  try {
    response = await fetch(path, spec);
  } catch {
    return { ok: false, failure: unreachable() };
  }
  /** @type {unknown} */
  let body = null;
  const text = await response.text();
  if (text) {
    try {
      body = JSON.parse(text);
    } catch {
      body = null;
    }
  }
  if (response.ok) return { ok: true, status: response.status, data: /** @type {T} */ (body) };
  return { ok: false, failure: failureFromBody(response.status, body) };
}

/** @returns {Failure} */
function unreachable() {
  return failure(0, 'unreachable', 'The Arcline service did not answer. Check that it is running and reachable.');
}

/**
 * @param {number} status
 * @param {string} code
 * @param {string} message
 * @param {string} [path]
 * @param {Problem[]} [problems]
 * @returns {Failure}
 */
function failure(status, code, message, path = '', problems = []) {
  return { status, code, message, path, problems };
}

/**
 * @param {unknown} value
 * @returns {value is Record<string, unknown>}
 */
function isRecord(value) {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/**
 * Turns the contract's error body into one shape; fills in words for bare statuses.
 * @param {number} status
 * @param {unknown} body
 * @returns {Failure}
 */
export function failureFromBody(status, body) {
  const error = isRecord(body) ? body.error : null;
  const listed = isRecord(body) && Array.isArray(body.problems) ? body.problems : [];
  /** @type {Problem[]} */
  const problems = listed.filter(isRecord).map((p) => ({
    path: typeof p.path === 'string' ? p.path : '',
    code: typeof p.code === 'string' ? p.code : '',
    message: typeof p.message === 'string' ? p.message : String(p.message ?? ''),
  }));
  if (isRecord(error)) {
    const found = failure(
      status,
      typeof error.code === 'string' ? error.code : 'error',
      typeof error.message === 'string' && error.message ? error.message : statusWords(status),
      typeof error.path === 'string' ? error.path : '',
      problems,
    );
    const change = isRecord(error.layoutChange) ? error.layoutChange.description : undefined;
    if (typeof change === 'string' && change) found.layoutChange = change;
    return found;
  }
  return failure(status, 'http-' + status, statusWords(status), '', problems);
}

/**
 * @param {number} status
 * @returns {string}
 */
export function statusWords(status) {
  if (status === 401 || status === 403) {
    return 'The service refused to store this line without a valid write token. Enter the token under "Write token".';
  }
  if (status === 404) return 'That line is not in the store (it may have been removed).';
  if (status === 413) return 'The file is too large for the service.';
  if (status === 409) return 'The service refused the request because it conflicts with the stored line.';
  if (status >= 500) return 'The service failed while handling this request (status ' + status + ').';
  return 'The service answered with status ' + status + '.';
}

/**
 * The answer of POST /api/v1/previews when it has the promised shape, else null.
 * @param {unknown} data
 * @returns {PreviewBundle | null}
 */
export function readPreviewBundle(data) {
  if (!isRecord(data) || !isRecord(data.interpretation) || !Array.isArray(data.interpretation.stations)) return null;
  if (typeof data.sectionSvg !== 'string' || typeof data.travelTimesSvg !== 'string') return null;
  // An answer without the sheets (an older service) is one sheet: the section it sent.
  const listed = Array.isArray(data.sectionSheets) ? data.sectionSheets.filter((s) => typeof s === 'string') : [];
  const sectionSheets = listed.length > 0 ? listed : [data.sectionSvg];
  return /** @type {PreviewBundle} */ ({ ...data, sectionSheets });
}

/**
 * POST /api/v1/previews — interprets once, stores nothing, and answers the interpretation
 * with both drawings of it: what the page shows after Interpret, from one request.
 * @param {string} bodyText
 * @param {BodyFormat} format
 * @returns {Promise<Result<PreviewBundle>>}
 */
export async function previewLine(bodyText, format) {
  /** @type {Result<unknown>} */
  const result = await request('api/v1/previews', surveyPost(bodyText, format));
  if (!result.ok) return result;
  const bundle = readPreviewBundle(result.data);
  if (bundle === null) {
    return { ok: false, failure: failure(result.status, 'unexpected_answer', 'The service answered the preview in a shape the page does not know.') };
  }
  return { ok: true, status: result.status, data: bundle };
}

/**
 * The answer of the method comparison when it has the promised shape, else null.
 * @param {unknown} data
 * @returns {MethodsAnswer | null}
 */
export function readMethodsAnswer(data) {
  if (!isRecord(data) || typeof data.methodsSvg !== 'string' || !isRecord(data.comparison)) return null;
  if (!Array.isArray(data.comparison.runs) || !Array.isArray(data.comparison.differences)) return null;
  return /** @type {MethodsAnswer} */ (data);
}

/**
 * The line by every method: of a stored line (its methods.json URL from lineFileUrls) or of
 * the text interpreted last (POST /api/v1/previews/methods, nothing stored).
 * @param {{ url: string } | { bodyText: string, format: BodyFormat }} source
 * @returns {Promise<Result<MethodsAnswer>>}
 */
export async function compareMethods(source) {
  /** @type {Result<unknown>} */
  const result = 'url' in source ? await request(source.url, GET) : await request('api/v1/previews/methods', surveyPost(source.bodyText, source.format));
  if (!result.ok) return result;
  const answer = readMethodsAnswer(result.data);
  if (answer === null) {
    return { ok: false, failure: failure(result.status, 'unexpected_answer', 'The service answered the method comparison in a shape the page does not know.') };
  }
  return { ok: true, status: result.status, data: answer };
}

/**
 * POST /api/v1/surveys — stores the line; sends the write token when one is set.
 * @param {string} bodyText
 * @param {BodyFormat} format
 * @returns {Promise<Result<StoreAnswer>>}
 */
export function storeLine(bodyText, format) {
  return request('api/v1/surveys', surveyPost(bodyText, format, readWriteToken()));
}

/**
 * The query that tells the service a revision's new geophone layout is meant; without it the
 * service answers 409 (LAYOUT_CHANGED_STATUS) to a body whose layout differs from the line's.
 */
export const LAYOUT_CHANGE_CONFIRMATION = 'layoutChange=confirm';

/** The status of a revision refused because its geophone layout differs from the line's. */
export const LAYOUT_CHANGED_STATUS = 409;

/**
 * The path of POST …/revisions, with the layout-change confirmation when the user agreed to it.
 * @param {string} id
 * @param {boolean} [confirmLayoutChange]
 * @returns {string}
 */
export function revisionsPath(id, confirmLayoutChange = false, author = '') {
  const query = [confirmLayoutChange ? LAYOUT_CHANGE_CONFIRMATION : '', author ? 'author=' + encodeURIComponent(author) : ''].filter(Boolean).join('&');
  return 'api/v1/surveys/' + encodeURIComponent(id) + '/revisions' + (query ? '?' + query : '');
}

/**
 * POST /api/v1/surveys/:id/revisions — stores the corrected line as the next revision of a
 * stored line (nothing is overwritten); sends the write token when one is set. The layout
 * change is confirmed only when the user said it is meant.
 * @param {string} id
 * @param {string} bodyText
 * @param {BodyFormat} format
 * @param {boolean} [confirmLayoutChange]
 * @param {string} [author] who stores it (recorded with the revision)
 * @returns {Promise<Result<StoreAnswer>>}
 */
export function storeRevision(id, bodyText, format, confirmLayoutChange = false, author = '') {
  return request(revisionsPath(id, confirmLayoutChange, author), surveyPost(bodyText, format, readWriteToken()));
}

/**
 * A stored gather decimated for display (min/max per time column).
 * @typedef {{ channel: number, x: number, peak: number, min: number[], max: number[] }} DecimatedTrace
 * The picker's own answer for the file (the page shows a pick's confidence where the line's pick is still this one).
 * @typedef {{ times: (number|null)[], confidence: number[], status: string[] }} AutomaticPicks
 * @typedef {{ shotId: string, fromMs: number, toMs: number, columns: number, columnMs: number, traces: DecimatedTrace[], automatic?: AutomaticPicks }} DecimatedGather
 */

/**
 * GET /api/v1/surveys/:id/gathers/:shotId/traces?columns=…&fromMs=…&toMs=…
 * @param {string} id
 * @param {string} shotId
 * @param {{ columns: number, fromMs?: number, toMs?: number }} window
 * @returns {Promise<Result<DecimatedGather>>}
 */
export function fetchGatherTraces(id, shotId, window) {
  const query = ['columns=' + window.columns];
  if (window.fromMs !== undefined) query.push('fromMs=' + window.fromMs);
  if (window.toMs !== undefined) query.push('toMs=' + window.toMs);
  return request('api/v1/surveys/' + encodeURIComponent(id) + '/gathers/' + encodeURIComponent(shotId) + '/traces?' + query.join('&'), GET);
}

/**
 * POST /api/v1/surveys/gathers and …/:id/gathers (201): the stored revision and the picker's
 * answer for the file.
 * @typedef {object} GatherStored
 * @property {string} id
 * @property {string} name
 * @property {number} revision
 * @property {string} shotId
 * @property {boolean} replaced
 * @property {{ times: (number|null)[], confidence: number[] }} picks
 */

/**
 * One SEG-2 file sent as its raw bytes (application/octet-stream) to a gather upload route,
 * with the write token when one is set. XMLHttpRequest rather than fetch: its upload events
 * say how much of the body has gone, which fetch does not. `onSent(loaded, total)` is called
 * as the body goes out, `onPicking()` once all of it is sent (the service then reads, picks
 * and interprets). `signal` (an AbortController's) stops the request: the answer is then the
 * failure `aborted` (status 0). The service stores nothing for a request it had not finished
 * when the connection closed; one it had finished is stored all the same (the page checks).
 * @param {string} path relative, from uploadPath (drop-files.js)
 * @param {Blob} file
 * @param {{ onSent: (loaded: number, total: number) => void, onPicking: () => void }} progress
 * @param {AbortSignal} [signal]
 * @returns {Promise<Result<GatherStored>>}
 */
export function uploadGatherFile(path, file, progress, signal) {
  return new Promise((resolve) => {
    const stopped = () => resolve({ ok: false, failure: failure(0, 'aborted', 'The upload was stopped before the service answered.') });
    if (signal?.aborted) {
      stopped();
      return;
    }
    const xhr = new XMLHttpRequest();
    signal?.addEventListener('abort', () => xhr.abort(), { once: true });
    xhr.open('POST', path);
    xhr.setRequestHeader('Content-Type', 'application/octet-stream');
    xhr.setRequestHeader('Accept', 'application/json');
    const token = readWriteToken();
    if (token) xhr.setRequestHeader('Authorization', 'Bearer ' + token);
    xhr.upload.addEventListener('progress', (event) => progress.onSent(event.loaded, event.lengthComputable ? event.total : file.size));
    xhr.upload.addEventListener('load', () => progress.onPicking());
    xhr.addEventListener('error', () => resolve({ ok: false, failure: unreachable() }));
    xhr.addEventListener('abort', stopped);
    xhr.addEventListener('load', () => {
      /** @type {unknown} */
      let body = null;
      try {
        body = xhr.responseText ? JSON.parse(xhr.responseText) : null;
      } catch {
        body = null;
      }
      if (xhr.status >= 200 && xhr.status < 300) resolve({ ok: true, status: xhr.status, data: /** @type {GatherStored} */ (body) });
      else resolve({ ok: false, failure: failureFromBody(xhr.status, body) });
    });
    xhr.send(file);
  });
}

/**
 * GET /api/v1/surveys — [{id, name, createdAt}].
 * @returns {Promise<Result<ListedLine[]>>}
 */
export function listLines() {
  return request('api/v1/surveys', GET);
}

/**
 * GET /api/v1/surveys/:id/section-sheets.json — how many sheets the stored section is paged over.
 * @param {string} url  lineFileUrls(…).sectionSheets
 * @returns {Promise<Result<SectionSheets>>}
 */
export function fetchSectionSheets(url) {
  return request(url, GET);
}

/**
 * The URL of sheet k (1-based) of a section: the first sheet is the section's own URL.
 * @param {string} sectionUrl  lineFileUrls(…).section
 * @param {number} sheet
 * @returns {string}
 */
export function sectionSheetUrl(sectionUrl, sheet) {
  if (sheet <= 1) return sectionUrl;
  return sectionUrl + (sectionUrl.includes('?') ? '&' : '?') + 'sheet=' + sheet;
}

/**
 * `?revision=N` for a revision number, '' for the latest.
 * @param {number | undefined} revision
 * @returns {string}
 */
export function revisionQuery(revision) {
  return Number.isInteger(revision) && Number(revision) >= 1 ? '?revision=' + revision : '';
}

/**
 * GET /api/v1/surveys/:id[?revision=N] — {survey, interpretation, revision, latestRevision, revisions, shareUrl, ...};
 * sends the write token when one is set (shareUrl is null for a reader without it).
 * @param {string} id
 * @param {number} [revision]
 * @returns {Promise<Result<StoredLine>>}
 */
export function fetchLine(id, revision) {
  return request('api/v1/surveys/' + encodeURIComponent(id) + revisionQuery(revision), writerGet(readWriteToken()));
}

/**
 * `url` with the paper and section scale of the exported files added to its query: none
 * for the defaults (A4, scale chosen by the service), `paper=A3` and `scale=N` otherwise.
 * @param {string} url
 * @param {{ paper: string, scale: string }} sheet
 * @param {boolean} withScale  false for the time–distance plot, which has no scale
 * @returns {string}
 */
export function withSheetQuery(url, sheet, withScale) {
  const params = [];
  if (sheet.paper === 'A3') params.push('paper=A3');
  const n = Number(sheet.scale);
  if (withScale && sheet.scale.trim() !== '' && Number.isInteger(n) && n > 0) params.push('scale=' + n);
  if (params.length === 0) return url;
  return url + (url.includes('?') ? '&' : '?') + params.join('&');
}

/**
 * Relative URLs of the files of a stored line; of one revision when `revision` is given.
 * @param {string} id
 * @param {number} [revision]
 * @returns {{ section: string, sectionSheets: string, travelTimes: string, grm: string, methods: string, stations: string, interpretation: string,
 *   sectionPdf: string, sectionPng: string, travelTimesPdf: string, travelTimesPng: string }}
 */
export function lineFileUrls(id, revision) {
  const base = 'api/v1/surveys/' + encodeURIComponent(id) + '/';
  const query = revisionQuery(revision);
  return {
    section: base + 'section.svg' + query,
    sectionSheets: base + 'section-sheets.json' + query,
    travelTimes: base + 'traveltimes.svg' + query,
    grm: base + 'grm.svg' + query,
    methods: base + 'methods.json' + query,
    stations: base + 'stations.csv' + query,
    interpretation: base + 'interpretation.json' + query,
    sectionPdf: base + 'section.pdf' + query,
    sectionPng: base + 'section.png' + query,
    travelTimesPdf: base + 'traveltimes.pdf' + query,
    travelTimesPng: base + 'traveltimes.png' + query,
  };
}
