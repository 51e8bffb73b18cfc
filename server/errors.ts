/**
 * The one catalogue of errors the service answers with, and the one handler that turns
 * every failure (ours, Fastify's content-type / body-size / JSON / schema errors, and
 * anything unexpected) into the contract's body (api-v1.md):
 *   {"error": {"code": "…", "message": "…", "path": "/shots/2/times/7", "problems": [...]}}
 * Bad input never gives a 500; an unexpected failure gives a 500 with a generic message
 * and is logged with its stack.
 */
import { storeFailureOf } from './store-failures.js';
import type { FastifyError, FastifyReply, FastifyRequest } from 'fastify';
import type { Problem } from '../engine/survey/problem.js';
import type { LayoutChange } from './revision-layout.js';
import { SURVEY_LIMITS } from '../engine/survey/survey.js';

interface CatalogueEntry {
  status: number;
  message: string;
}

export const ERROR_CATALOGUE = {
  invalid_json: { status: 400, message: 'The body is not valid JSON: check brackets, commas and quotes.' },
  empty_body: {
    status: 400,
    message: 'The request has no body: send the survey as application/json or a pick table as text/csv.',
  },
  unsupported_content_type: {
    status: 400,
    message: 'Send the survey as application/json or a pick table as text/csv, and say which in the Content-Type header.',
  },
  seg2_file: {
    status: 400,
    message: 'This body is a SEG-2 seismograph file: send it to POST /api/v1/gathers/picks as application/octet-stream for its first breaks. Here, send the first-break picks as a pick table (text/csv) or a survey (application/json).',
  },
  invalid_seg2: { status: 400, message: 'The SEG-2 file cannot be read.' },
  binary_body: {
    status: 400,
    message: 'This body is a binary file, not a survey or a pick table. Send the picks as a pick table (text/csv) or a survey (application/json).',
  },
  invalid_survey: { status: 400, message: 'The survey has problems.' },
  invalid_pick_table: { status: 400, message: 'The pick table has problems.' },
  invalid_request: { status: 400, message: 'The request is not valid.' },
  body_too_large: { status: 413, message: 'The body is too large.' },
  layout_changed: {
    status: 409,
    message: 'This revision has another geophone layout than the stored line; nothing was stored.',
  },
  survey_changed: {
    status: 409,
    message: 'Another revision of this line was stored while the file was being read; nothing was stored. Send the file again.',
  },
  write_token_required: {
    status: 401,
    message: 'This service needs a write token: send "Authorization: Bearer <token>".',
  },
  write_token_invalid: { status: 401, message: 'The write token is not the one this service was given.' },
  cross_origin_write: {
    status: 403,
    message: 'This write came from a page of another site (its Origin or Referer names another host than this service); it was refused. Write from the Arcline page itself, or from a script that sends no Origin header.',
  },
  host_not_allowed: {
    status: 421,
    message: 'This service does not answer to that host name. Use the address it was started on, or add the name to ARCLINE_ALLOWED_HOSTS.',
  },
  not_found: { status: 404, message: 'Nothing here.' },
  survey_not_found: { status: 404, message: 'No stored survey has this id.' },
  revision_not_found: { status: 404, message: 'This survey has no such revision.' },
  gather_not_found: { status: 404, message: 'No shot gather with this shot id was uploaded into this line (up to this revision).' },
  share_not_found: { status: 404, message: 'This share link does not exist or has been revoked.' },
  rate_limited: { status: 429, message: 'Too many writes from this address; try again in a minute. Nothing was stored.' },
  service_busy: {
    status: 503,
    message: 'The service is busy with other computations and its queue is full; try again in a few seconds.',
  },
  compute_time_limit: { status: 422, message: "The computation took longer than this service's time limit and was stopped; nothing was stored." },
  client_closed: { status: 499, message: 'The client closed the connection; the computation was stopped.' },
  store_full: { status: 507, message: 'The data folder of the store is full; nothing was stored. Ask whoever runs the service to free disk space.' },
  store_read_only: { status: 503, message: 'The store cannot be written just now (its data folder is read-only); nothing was stored. Ask whoever runs the service.' },
  store_unavailable: { status: 503, message: 'The store cannot be read or written just now (a disk error); nothing was stored. Ask whoever runs the service.' },
  internal_error: { status: 500, message: 'Something went wrong on the server; the error has been logged.' },
} as const satisfies Record<string, CatalogueEntry>;

export type ErrorCode = keyof typeof ERROR_CATALOGUE;

/** Retry-After of a 503 from a full compute queue, s: about one demo-line batch. Our choice. */
export const RETRY_AFTER_S = 2;

/**
 * The contract's error body. `problems` (every problem found, not only the first) is
 * given both inside `error` and beside it, so clients reading either place find it.
 */
export interface ErrorBody {
  error: { code: string; message: string; path: string; problems?: Problem[]; layoutChange?: LayoutChange; byteOffset?: number };
  problems?: Problem[];
}

/** A coded error a route throws; the handler below answers it with its catalogue status. */
export class AppError extends Error {
  readonly code: ErrorCode;
  readonly statusCode: number;
  readonly path: string;
  readonly problems: Problem[] | undefined;
  readonly layoutChange: LayoutChange | undefined;
  /** For a file that cannot be read: the byte where the problem is. */
  readonly byteOffset: number | undefined;

  constructor(code: ErrorCode, details: { message?: string; path?: string; problems?: Problem[]; layoutChange?: LayoutChange; byteOffset?: number } = {}) {
    super(details.message ?? ERROR_CATALOGUE[code].message);
    this.name = 'AppError';
    this.code = code;
    this.statusCode = ERROR_CATALOGUE[code].status;
    this.path = details.path ?? '';
    this.problems = details.problems;
    this.layoutChange = details.layoutChange;
    this.byteOffset = details.byteOffset;
  }

  toBody(): ErrorBody {
    const error: ErrorBody['error'] = { code: this.code, message: this.message, path: this.path };
    if (this.layoutChange !== undefined) error.layoutChange = this.layoutChange;
    if (this.byteOffset !== undefined) error.byteOffset = this.byteOffset;
    if (this.problems === undefined) return { error };
    error.problems = this.problems;
    return { error, problems: this.problems };
  }
}

/** "6", "6 and 9", "6, 9 and 12"; more than `shown` items end in "and N others". */
function listInWords(items: number[], shown = 5): string {
  if (items.length > shown) return `${items.slice(0, shown).join(', ')} and ${items.length - shown} others`;
  if (items.length === 1) return String(items[0]);
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

/**
 * The headline of a list of problems: how many, and on which lines of a pick table. It
 * repeats none of them, so a client showing the message above the list shows each problem
 * once (issue 11 item 9); the problems themselves are in `problems`, each in words.
 */
export function problemsHeadline(subject: string, problems: readonly Problem[]): string {
  const counted = problems.filter((p) => p.code !== 'too-many-problems');
  const capped = counted.length < problems.length;
  const lines = [...new Set(counted.map((p) => p.line).filter((line): line is number => line !== undefined))].sort((a, b) => a - b);
  if (capped) return `${subject} has more than ${counted.length} problems; the first ${counted.length} are listed.`;
  const count = counted.length === 1 ? '1 problem' : `${counted.length} problems`;
  const where = lines.length === 0 ? '' : `, on line${lines.length === 1 ? '' : 's'} ${listInWords(lines)}`;
  return `${subject} has ${count}${where}.`;
}

/**
 * The error for a list of problems from the validator or the pick-table reader: a headline
 * as the message, the first problem's path (the contract's single path), every problem in
 * `problems`.
 */
export function problemsError(code: 'invalid_survey' | 'invalid_pick_table', problems: Problem[]): AppError {
  const first = problems[0];
  if (first === undefined) return new AppError(code);
  const subject = code === 'invalid_pick_table' ? 'The pick table' : 'The survey';
  return new AppError(code, { message: problemsHeadline(subject, problems), path: first.path, problems });
}

/** JSON pointer for a schema-validation error (Ajv's instancePath is already one). */
function schemaErrorPath(error: FastifyError): string {
  const first = error.validation?.[0];
  if (first === undefined) return '';
  const missing = (first.params as { missingProperty?: string } | undefined)?.missingProperty;
  return missing ? `${first.instancePath}/${missing}` : first.instancePath;
}

/** A size in words, as a file manager shows it (MB = 1024 × 1024 bytes), with the exact bytes. */
function sizeInWords(bytes: number): string {
  const exact = `${bytes.toLocaleString('en-GB')} bytes`;
  if (bytes >= 1024 * 1024) return `${Number((bytes / (1024 * 1024)).toFixed(1))} MB (${exact})`;
  if (bytes >= 1024) return `${Number((bytes / 1024).toFixed(1))} KB (${exact})`;
  return exact;
}

/** The 413 answer: the limit, and the body's size when its Content-Length said it. */
export function bodyTooLarge(limitBytes: number | undefined, sentBytes: number | undefined): AppError {
  const sent = sentBytes !== undefined && Number.isFinite(sentBytes) && sentBytes > 0 ? `The body is ${sizeInWords(sentBytes)}; ` : 'The body is too large: ';
  const limit = limitBytes !== undefined ? `this service takes at most ${sizeInWords(limitBytes)} per request.` : "it is over this service's limit per request.";
  return new AppError('body_too_large', {
    message: `${sent}${limit} Nothing was stored. Send the pick table or survey document of one line (up to ${SURVEY_LIMITS.maxGeophones} geophones and ${SURVEY_LIMITS.maxShots} shots), not a record of traces or a whole workbook.`,
  });
}

function bodyTooLargeFor(request: FastifyRequest | undefined): AppError {
  const limit = request?.routeOptions?.bodyLimit;
  const length = Number(request?.headers['content-length']);
  return bodyTooLarge(typeof limit === 'number' ? limit : undefined, Number.isFinite(length) ? length : undefined);
}

/** Maps any thrown value to a coded AppError; unknown failures become internal_error. */
export function toAppError(error: unknown, request?: FastifyRequest): { appError: AppError; unexpected: boolean } {
  if (error instanceof AppError) return { appError: error, unexpected: false };
  const fastifyError = error as Partial<FastifyError> | null;
  if (fastifyError?.validation) {
    const context = fastifyError.validationContext ?? 'request';
    const first = fastifyError.validation[0];
    const field = first?.instancePath ? first.instancePath.slice(1) : '';
    const what = context === 'querystring' && field ? `query parameter "${field}"` : `${context}${field ? ` ${field}` : ''}`;
    // An enum's message names the allowed values (spellings that differ only in case once).
    const allowed = (first?.params as { allowedValues?: unknown[] } | undefined)?.allowedValues;
    const firstSpellings = (allowed ?? []).map(String).filter((v, i, all) => all.findIndex((w) => w.toLowerCase() === v.toLowerCase()) === i);
    const values = allowed ? `: ${firstSpellings.join(', ')}` : '';
    return {
      appError: new AppError('invalid_request', {
        message: `The ${what} ${first?.message ?? 'is not valid'}${values}.`,
        path: schemaErrorPath(fastifyError as FastifyError),
      }),
      unexpected: false,
    };
  }
  switch (fastifyError?.code) {
    case 'FST_ERR_CTP_BODY_TOO_LARGE':
      return { appError: bodyTooLargeFor(request), unexpected: false };
    case 'FST_ERR_CTP_INVALID_MEDIA_TYPE':
      return { appError: new AppError('unsupported_content_type'), unexpected: false };
    case 'FST_ERR_CTP_EMPTY_JSON_BODY':
      return { appError: new AppError('empty_body'), unexpected: false };
    case 'FST_ERR_CTP_INVALID_JSON_BODY':
      return { appError: new AppError('invalid_json'), unexpected: false };
    case 'FST_ERR_CTP_INVALID_CONTENT_LENGTH':
      return {
        appError: new AppError('invalid_request', { message: "The body's length does not match its Content-Length header." }),
        unexpected: false,
      };
    case 'FST_ERR_BAD_URL':
    case 'FST_ERR_ASYNC_CONSTRAINT':
      return {
        appError: new AppError('invalid_request', { message: 'The URL is not valid: check its percent-encoding.' }),
        unexpected: false,
      };
    default:
      break;
  }
  const failure = storeFailureOf(error);
  if (failure !== null) {
    const code = failure === 'full' ? 'store_full' : failure === 'read-only' ? 'store_read_only' : 'store_unavailable';
    // Logged as unexpected: whoever runs the service must see it.
    return { appError: new AppError(code), unexpected: true };
  }
  const status = fastifyError?.statusCode;
  if (typeof status === 'number' && status === 413) {
    return { appError: bodyTooLargeFor(request), unexpected: false };
  }
  if (typeof status === 'number' && status >= 400 && status < 500) {
    // Fastify's other client errors (bad URL encoding, content-length mismatch, …):
    // still bad input, so a 400 with the catalogue's code, never a 500.
    return { appError: new AppError('invalid_request'), unexpected: false };
  }
  return { appError: new AppError('internal_error'), unexpected: true };
}

/** Fastify error handler: every error leaves as the contract's coded body. */
export function handleError(error: unknown, request: FastifyRequest, reply: FastifyReply): void {
  const { appError, unexpected } = toAppError(error, request);
  if (unexpected) request.log.error({ err: error }, 'unexpected error');
  else request.log.info({ code: appError.code, path: appError.path }, 'request rejected');
  if (appError.code === 'write_token_required' || appError.code === 'write_token_invalid') {
    reply.header('WWW-Authenticate', 'Bearer realm="arcline"');
  }
  if (appError.code === 'service_busy') reply.header('Retry-After', String(RETRY_AFTER_S));
  reply.status(appError.statusCode).type('application/json; charset=utf-8').send(appError.toBody());
}

/** Fastify not-found handler: unknown routes (and every write under /share) answer 404 coded. */
export function handleNotFound(request: FastifyRequest, reply: FastifyReply): void {
  const appError = new AppError('not_found', { message: `Nothing at ${request.method} ${request.url.split('?')[0]}.` });
  reply.status(404).type('application/json; charset=utf-8').send(appError.toBody());
}
