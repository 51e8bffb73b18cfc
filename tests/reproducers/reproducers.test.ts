/**
 * Every input that once broke the engine or the service, found by the property tests
 * (tests/property) or the HTTP fuzzer (npm run fuzz:http), kept here as a file and replayed:
 * the engine gives finite numbers or the validator names problems, and the service answers
 * it with a 2xx or a coded 4xx, never a 5xx (api-v1.md). A new reproducer is a JSON file in
 * this folder: either a survey document, or {"method", "url", "contentType", "body"}
 * (body as text, bodyEncoding "latin1" for bytes) for a request, whose URL may name the
 * demo line stored for the replay as {id}, its share token as {token} and a shot as {shotId}.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { validateSurvey } from '../../engine/survey/validate.js';
import { interpret } from '../../engine/pipeline/interpret.js';
import { firstNonFinite } from '../property/line-arbitraries.js';
import { memoryApp } from '../helpers/memory-app.js';

const folder = fileURLToPath(new URL('.', import.meta.url));
const files = readdirSync(folder).filter((f) => f.endsWith('.json')).sort();
const server = memoryApp();

interface RequestReproducer {
  method: 'GET' | 'POST' | 'PUT' | 'DELETE' | 'PATCH';
  url: string;
  contentType?: string;
  headers?: Record<string, string>;
  body?: string;
  /** How the body text maps to bytes: latin1 (one byte per character, as the fuzzer writes) or utf8 (default). */
  bodyEncoding?: 'latin1' | 'utf8';
}

let demo: { id: string; token: string; shotId: string } | null = null;

/** The demo line stored once, so that reproducers' {id}, {token} and {shotId} name a real line. */
async function storedDemo(): Promise<{ id: string; token: string; shotId: string }> {
  if (demo) return demo;
  const body = readFileSync(`${folder}/../../samples/demo-line.json`, 'utf8');
  const res = await server.app.inject({ method: 'POST', url: '/api/v1/surveys', headers: { 'content-type': 'application/json' }, payload: body });
  const stored = res.json() as { id: string; shareUrl: string };
  demo = { id: stored.id, token: stored.shareUrl.split('/').pop()!, shotId: (JSON.parse(body) as { shots: { id: string }[] }).shots[0].id };
  return demo;
}

function isRequest(doc: unknown): doc is RequestReproducer {
  return typeof doc === 'object' && doc !== null && 'url' in doc && 'method' in doc;
}

describe('reproducers of past failures', () => {
  it('the folder holds reproducers', () => {
    expect(files.length).toBeGreaterThan(0);
  });
  for (const file of files) {
    const doc: unknown = JSON.parse(readFileSync(`${folder}/${file}`, 'utf8'));
    it(`${file}: never a 5xx from the service`, async () => {
      const ids = await storedDemo();
      const request = isRequest(doc)
        ? { ...doc, url: doc.url.split('{id}').join(ids.id).split('{token}').join(ids.token).split('{shotId}').join(ids.shotId) }
        : { method: 'POST' as const, url: '/api/v1/interpretations', contentType: 'application/json', body: JSON.stringify(doc) };
      const res = await server.app.inject({
        method: request.method,
        url: request.url,
        headers: { ...(request.contentType ? { 'content-type': request.contentType } : {}), ...(request.headers ?? {}) },
        payload: request.body === undefined ? undefined : Buffer.from(request.body, 'bodyEncoding' in request && request.bodyEncoding === 'latin1' ? 'latin1' : 'utf8'),
      });
      expect(res.statusCode, res.body.slice(0, 300)).toBeLessThan(500);
      if (res.statusCode >= 400) expect(res.json().error.code).toMatch(/^[a-z0-9_]+$/);
    });
    if (!isRequest(doc)) {
      it(`${file}: the engine gives finite numbers or the validator names problems`, () => {
        const checked = validateSurvey(doc);
        if (checked.survey === null) {
          expect(checked.problems.length).toBeGreaterThan(0);
          return;
        }
        expect(firstNonFinite(interpret(checked.survey))).toBeNull();
      });
    }
  }
});

describe('a level refracted branch (two picks at one time)', () => {
  it('is reported with velocity null, drawn without a velocity label, and the stored line renders', async () => {
    const doc = JSON.parse(readFileSync(`${folder}/level-refracted-branch.json`, 'utf8'));
    const result = interpret(validateSurvey(doc).survey!);
    const level = result.shots.flatMap((s) => [s.left, s.right]).flatMap((side) => side?.refracted ?? []).filter((l) => l.velocity === null);
    expect(level.length).toBeGreaterThan(0);
    const stored = await server.app.inject({ method: 'POST', url: '/api/v1/surveys', payload: doc });
    expect(stored.statusCode).toBe(201);
    const svg = await server.app.inject({ method: 'GET', url: `/api/v1/surveys/${stored.json().id}/traveltimes.svg` });
    expect(svg.statusCode).toBe(200);
    expect(svg.body).toContain('data-velocity="level"');
    expect(svg.body).not.toMatch(/NaN|Infinity/);
  });
});
