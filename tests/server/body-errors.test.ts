// Errors where the user looks (issue 11 item 9, the service's side): a pick table's problems
// name its line and column; an oversized body says the limit; a file sent by mistake (a SEG-2
// shot record, a workbook) is named for what it is and where it belongs, and none of its
// bytes come back; the message is a headline and each problem is listed once, in words.
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../server/app.js';
import { binaryBody } from '../../server/binary-body.js';

const demoCsvText = readFileSync(new URL('../../samples/demo-line.csv', import.meta.url), 'utf8');
const demoJsonText = readFileSync(new URL('../../samples/demo-line.json', import.meta.url), 'utf8');

/**
 * A SEG-2 file as Pullan (1990) lays it out: the file descriptor block (block id 0x3a55 in
 * the file's byte order, revision 1, trace pointer sub-block size, number of traces, string
 * terminator and the header strings), then trace descriptor blocks (id 0x4422) with samples.
 * Enough of the format to be recognised; the samples are arbitrary bytes.
 */
function seg2File(traces: number, littleEndian: boolean): Buffer {
  const pointerBytes = 4 * traces;
  const strings = Buffer.from('\u0000\u0000ACQUISITION_DATE 05/12/2026\u0000\u0000INSTRUMENT marker-7\u0000', 'latin1');
  const descriptor = Buffer.alloc(32 + pointerBytes);
  const u16 = (value: number, at: number): void => void (littleEndian ? descriptor.writeUInt16LE(value, at) : descriptor.writeUInt16BE(value, at));
  u16(0x3a55, 0);
  u16(1, 2);
  u16(pointerBytes, 4);
  u16(traces, 6);
  descriptor[8] = 1; // string terminator length
  descriptor[9] = 0;
  const trace = Buffer.alloc(32 + 400);
  if (littleEndian) trace.writeUInt16LE(0x4422, 0);
  else trace.writeUInt16BE(0x4422, 0);
  for (let i = 32; i < trace.length; i++) trace[i] = (i * 37) % 256;
  return Buffer.concat([descriptor, strings, ...Array.from({ length: traces }, () => trace)]);
}

/** Sends a Buffer as it is (superagent's types say a serializer returns a string; node's http takes a Buffer too). */
const rawBytes = ((body: Buffer) => body) as unknown as (body: unknown) => string;

let app: FastifyInstance;
let small: FastifyInstance;

beforeAll(async () => {
  app = await buildApp({ dataDir: ':memory:' });
  small = await buildApp({ dataDir: ':memory:', bodyLimitBytes: 2048 });
  await Promise.all([app.ready(), small.ready()]);
});
afterAll(async () => {
  await Promise.all([app.close(), small.close()]);
});

/** The answer's text holds none of the file's header strings and no replacement characters (nothing echoed). */
function expectNothingEchoed(text: string): void {
  expect(text).not.toContain('ACQUISITION_DATE');
  expect(text).not.toContain('marker-7');
  expect(text).not.toContain('\ufffd');
  expect(text).not.toMatch(/[\u0000-\u0008\u000e-\u001f]/);
}

describe('a SEG-2 shot record sent as the body', () => {
  it.each([
    ['little-endian, as a pick table', true, 'text/csv'],
    ['big-endian, as JSON', false, 'application/json'],
    ['little-endian, as application/octet-stream', true, 'application/octet-stream'],
  ])('%s: 400 seg2_file saying what it is and where it goes, echoing nothing', async (_what, littleEndian, type) => {
    const before = app.store.countRows();
    // serialize: superagent would otherwise turn a Buffer sent as JSON into {"type":"Buffer",…}.
    const res = await request(app.server).post('/api/v1/surveys').set('Content-Type', type).serialize(rawBytes).send(seg2File(24, littleEndian));
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('seg2_file');
    // Pullan (1990): bytes 6–7 of the file descriptor block hold the number of traces.
    expect(res.body.error.message).toContain('SEG-2 seismograph file (a shot record of 24 traces)');
    expect(res.body.error.message).toContain('Content-Type: application/octet-stream');
    expect(res.body.error.message).toContain('POST /api/v1/gathers/picks');
    expect(res.body.error.message).toContain('text/csv');
    expectNothingEchoed(res.text);
    expect(app.store.countRows()).toEqual(before);
  });

  it('is recognised without a Content-Type as well', async () => {
    const res = await request(app.server).post('/api/v1/interpretations').unset('Content-Type').send(seg2File(12, true));
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('seg2_file');
    expect(res.body.error.message).toContain('12 traces');
  });
});

describe('other files sent by mistake', () => {
  it('a workbook (ZIP) is named and the user told to save the sheet as CSV', async () => {
    const xlsx = Buffer.concat([Buffer.from([0x50, 0x4b, 0x03, 0x04]), Buffer.from('xl/worksheets/sheet1.xml marker-7'), Buffer.alloc(64)]);
    const res = await request(app.server).post('/api/v1/interpretations').set('Content-Type', 'text/csv').send(xlsx);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('binary_body');
    expect(res.body.error.message).toContain('ZIP archive');
    expect(res.body.error.message).toContain('as CSV');
    expectNothingEchoed(res.text);
  });

  it('UTF-16 text (a spreadsheet\'s "Unicode text") is named', async () => {
    const utf16 = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(demoCsvText, 'utf16le')]);
    const res = await request(app.server).post('/api/v1/interpretations').set('Content-Type', 'text/csv').send(utf16);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('binary_body');
    expect(res.body.error.message).toContain('UTF-16');
  });

  it('any other bytes with a NUL are binary, not text', async () => {
    const bytes = Buffer.from(Array.from({ length: 300 }, (_, i) => (i * 101) % 256));
    const res = await request(app.server).post('/api/v1/previews').set('Content-Type', 'application/json').serialize(rawBytes).send(bytes);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('binary_body');
    expectNothingEchoed(res.text);
  });

  it('text of an unsupported type is still unsupported_content_type, and good bodies still pass', async () => {
    const plain = await request(app.server).post('/api/v1/interpretations').set('Content-Type', 'text/plain').send('picks');
    expect(plain.status).toBe(400);
    expect(plain.body.error.code).toBe('unsupported_content_type');
    const csv = await request(app.server).post('/api/v1/interpretations').set('Content-Type', 'text/csv').send(demoCsvText);
    expect(csv.status).toBe(200);
    const json = await request(app.server).post('/api/v1/interpretations').set('Content-Type', 'application/json').send(demoJsonText);
    expect(json.status).toBe(200);
  });

  it('binaryBody reads only the signature: Latin-1 text with a degree sign is still text', () => {
    expect(binaryBody(Buffer.from('# name: Line 3, 45\u00b0 bend\nshot_id\n', 'latin1'))).toBeNull();
    expect(binaryBody(Buffer.from('%PDF-1.7\n'))?.kind).toBe('pdf');
    expect(binaryBody(Buffer.from([0x3a, 0x55]))?.kind).toBe('seg2');
  });
});

describe('an oversized body', () => {
  it('answers 413 saying the size sent and the limit', async () => {
    const body = `${'#'.repeat(3000)}\n`;
    const res = await request(small.server).post('/api/v1/interpretations').set('Content-Type', 'text/csv').send(body);
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('body_too_large');
    expect(res.body.error.message).toContain('The body is 2.9 KB (3,001 bytes)');
    expect(res.body.error.message).toContain('at most 2 KB (2,048 bytes) per request');
  });

  it('says the default limit, 5 MB', async () => {
    const res = await request(app.server).post('/api/v1/interpretations').set('Content-Type', 'text/csv').send('#'.repeat(5 * 1024 * 1024 + 10));
    expect(res.status).toBe(413);
    expect(res.body.error.message).toContain('at most 5 MB (5,242,880 bytes)');
  });
});

describe('pick-table problems name the line and column', () => {
  const lines = demoCsvText.split('\n');
  const header = lines.findIndex((l) => l.startsWith('shot_id'));
  const columns = lines[header].split(',');
  const timeColumn = columns.indexOf('time_ms') + 1;

  it('a negative time found by the survey rules is placed on its CSV line and column, not a JSON path', async () => {
    const edited = [...lines];
    const row = header + 4; // 0-based index → CSV line row + 1
    const fields = edited[row].split(',');
    fields[timeColumn - 1] = '-3';
    edited[row] = fields.join(',');
    const res = await request(app.server).post('/api/v1/interpretations').set('Content-Type', 'text/csv').send(edited.join('\n'));
    expect(res.status).toBe(400);
    const { error } = res.body;
    expect(error.code).toBe('invalid_pick_table');
    expect(error.path).toBe(`/csv/line/${row + 1}/time_ms`);
    expect(error.problems[0]).toMatchObject({ code: 'negative-time', line: row + 1, column: timeColumn });
    expect(error.problems[0].message.startsWith(`line ${row + 1}, column ${timeColumn} (time_ms): `)).toBe(true);
    expect(JSON.stringify(error)).not.toContain('/shots/');
  });

  it('the message is a headline naming the lines; each problem appears once, in problems', async () => {
    const edited = [...lines];
    for (const row of [header + 2, header + 9]) {
      const fields = edited[row].split(',');
      fields[timeColumn - 1] = 'soon';
      edited[row] = fields.join(',');
    }
    const res = await request(app.server).post('/api/v1/interpretations').set('Content-Type', 'text/csv').send(edited.join('\n'));
    expect(res.status).toBe(400);
    const { error } = res.body;
    expect(error.code).toBe('invalid_pick_table');
    expect(error.message).toBe(`The pick table has 2 problems, on lines ${header + 3} and ${header + 10}.`);
    expect(error.problems).toHaveLength(2);
    for (const problem of error.problems) {
      expect(problem.message).toContain("'soon' is not a number");
      expect(error.message).not.toContain(problem.message);
    }
    expect(error.message).not.toMatch(/listed in/);
  });

  it('a survey document gets a headline too, and its problems keep their JSON paths', async () => {
    const survey = JSON.parse(demoJsonText);
    survey.shots[0].times[3] = -5;
    const res = await request(app.server).post('/api/v1/interpretations').send(survey);
    expect(res.body.error.message).toBe('The survey has 1 problem.');
    expect(res.body.error.problems).toEqual([expect.objectContaining({ path: '/shots/0/times/3', code: 'negative-time' })]);
  });
});
