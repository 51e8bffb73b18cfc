// Talks to the Arcline HTTP API v1 (shared/api-v1.md). Every call resolves to
// { ok: true, data } or { ok: false, failure }, where failure is
// { status, code, message, path, problems[] } — the page never sees a thrown fetch error.

const TOKEN_KEY = 'arcline.writeToken';

/** The write token kept for this tab (sessionStorage), or '' when none. */
export function readWriteToken() {
  try {
    return sessionStorage.getItem(TOKEN_KEY) ?? '';
  } catch {
    return '';
  }
}

export function saveWriteToken(token) {
  try {
    if (token) sessionStorage.setItem(TOKEN_KEY, token);
    else sessionStorage.removeItem(TOKEN_KEY);
  } catch {
    // Storage may be disabled; the token then lives only in the input field.
  }
}

/** Content type of a survey body in the given format ('json' or 'csv'). */
function contentTypeOf(format) {
  return format === 'csv' ? 'text/csv; charset=utf-8' : 'application/json';
}

async function request(path, init) {
  let response;
  try {
    response = await fetch(path, { ...init, headers: { Accept: 'application/json', ...(init?.headers ?? {}) } });
  } catch {
    return {
      ok: false,
      failure: failure(0, 'unreachable', 'The Arcline service did not answer. Check that it is running and reachable.'),
    };
  }
  let body = null;
  const text = await response.text();
  if (text) {
    try {
      body = JSON.parse(text);
    } catch {
      body = null;
    }
  }
  if (response.ok) return { ok: true, status: response.status, data: body };
  return { ok: false, failure: failureFromBody(response.status, body) };
}

function failure(status, code, message, path = '', problems = []) {
  return { status, code, message, path, problems };
}

/** Turns the contract's error body into one shape; fills in words for bare statuses. */
function failureFromBody(status, body) {
  const error = body && typeof body === 'object' ? body.error : null;
  const problems = Array.isArray(body?.problems)
    ? body.problems.filter((p) => p && typeof p === 'object').map((p) => ({
      path: typeof p.path === 'string' ? p.path : '',
      code: typeof p.code === 'string' ? p.code : '',
      message: typeof p.message === 'string' ? p.message : String(p.message ?? ''),
    }))
    : [];
  if (error && typeof error === 'object') {
    return failure(
      status,
      typeof error.code === 'string' ? error.code : 'error',
      typeof error.message === 'string' && error.message ? error.message : statusWords(status),
      typeof error.path === 'string' ? error.path : '',
      problems,
    );
  }
  return failure(status, 'http-' + status, statusWords(status), '', problems);
}

function statusWords(status) {
  if (status === 401 || status === 403) {
    return 'The service refused to store this line without a valid write token. Enter the token under "Write token".';
  }
  if (status === 404) return 'That line is not in the store (it may have been removed).';
  if (status === 413) return 'The file is too large for the service.';
  if (status >= 500) return 'The service failed while handling this request (status ' + status + ').';
  return 'The service answered with status ' + status + '.';
}

/** POST /api/v1/interpretations — interprets, stores nothing. */
export function interpretLine(bodyText, format) {
  return request('api/v1/interpretations', {
    method: 'POST',
    headers: { 'Content-Type': contentTypeOf(format) },
    body: bodyText,
  });
}

/** Headers of a write: the body's type, and the write token when one is set. */
function writeHeaders(format) {
  const headers = { 'Content-Type': contentTypeOf(format) };
  const token = readWriteToken();
  if (token) headers.Authorization = 'Bearer ' + token;
  return headers;
}

/** POST /api/v1/surveys — stores the line; sends the write token when one is set. */
export function storeLine(bodyText, format) {
  return request('api/v1/surveys', { method: 'POST', headers: writeHeaders(format), body: bodyText });
}

/**
 * POST /api/v1/surveys/:id/revisions — stores the corrected line as the next revision of a
 * stored line (nothing is overwritten); sends the write token when one is set.
 */
export function storeRevision(id, bodyText, format) {
  return request('api/v1/surveys/' + encodeURIComponent(id) + '/revisions', {
    method: 'POST', headers: writeHeaders(format), body: bodyText,
  });
}

/** GET /api/v1/surveys — [{id, name, createdAt}]. */
export function listLines() {
  return request('api/v1/surveys', { method: 'GET' });
}

/** `?revision=N` for a revision number, '' for the latest. */
function revisionQuery(revision) {
  return Number.isInteger(revision) && revision >= 1 ? '?revision=' + revision : '';
}

/** GET /api/v1/surveys/:id[?revision=N] — {survey, interpretation, revision, latestRevision, revisions, ...}. */
export function fetchLine(id, revision) {
  return request('api/v1/surveys/' + encodeURIComponent(id) + revisionQuery(revision), { method: 'GET' });
}

/** Relative URLs of the files of a stored line; of one revision when `revision` is given. */
export function lineFileUrls(id, revision) {
  const base = 'api/v1/surveys/' + encodeURIComponent(id) + '/';
  const query = revisionQuery(revision);
  return {
    section: base + 'section.svg' + query,
    travelTimes: base + 'traveltimes.svg' + query,
    stations: base + 'stations.csv' + query,
    interpretation: base + 'interpretation.json' + query,
  };
}

/** The figures the service can draw of a line that is not stored, by the page's name for them. */
export const PREVIEW_KINDS = { section: 'section.svg', travelTimes: 'traveltimes.svg' };

/**
 * POST /api/v1/previews/{section,traveltimes}.svg — draws a line without storing it.
 * Resolves to { ok: true, blob } (an image/svg+xml Blob for an <img> through a blob: URL)
 * or { ok: false, failure } with the same failure shape as every other call.
 */
export async function previewFigure(bodyText, format, kind) {
  const file = PREVIEW_KINDS[kind];
  if (!file) return { ok: false, failure: failure(0, 'unknown_figure', 'The page asked for an unknown figure: ' + kind + '.') };
  let response;
  try {
    response = await fetch('api/v1/previews/' + file, {
      method: 'POST',
      headers: { 'Content-Type': contentTypeOf(format), Accept: 'image/svg+xml, application/json' },
      body: bodyText,
    });
  } catch {
    return {
      ok: false,
      failure: failure(0, 'unreachable', 'The Arcline service did not answer. Check that it is running and reachable.'),
    };
  }
  const type = response.headers.get('Content-Type') ?? '';
  if (response.ok && type.startsWith('image/svg+xml')) {
    // The Blob keeps the SVG type, so the <img> decodes it as an image (scripts never run there).
    return { ok: true, status: response.status, blob: new Blob([await response.arrayBuffer()], { type: 'image/svg+xml' }) };
  }
  let body = null;
  try {
    body = JSON.parse(await response.text());
  } catch {
    body = null;
  }
  if (response.ok) {
    return { ok: false, failure: failure(response.status, 'not_an_image', 'The service answered the preview with something other than an SVG drawing.') };
  }
  return { ok: false, failure: failureFromBody(response.status, body) };
}
