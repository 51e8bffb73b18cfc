/**
 * Durability of the store (issue 14): the service is SIGKILLed at random moments during a
 * stream of stores and revisions from several writers, restarted, and every write it had
 * acknowledged (201) must be there with what was sent; at the end SQLite's own integrity
 * check passes (PRAGMA integrity_check, sqlite.org/pragma.html) and no revision is
 * half-written (revisions of each line run 1..latest without a gap, each with its survey and
 * interpretation). Concurrent writers to one line lose no revision. DURABILITY_KILLS
 * raises the number of kills (20 by default).
 */
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { serviceProcessFixture, startServiceProcess } from '../helpers/service-process.js';
import { mulberry32 } from '../helpers/random.js';
import { STORE_FILE_NAME } from '../../server/store.js';

const KILLS = Number(process.env.DURABILITY_KILLS) || 20;
const WRITERS = 3;

interface Acknowledged {
  id: string;
  revision: number;
  name: string;
}

const fixture = serviceProcessFixture();

async function post(url: string, body: unknown): Promise<Response | null> {
  try {
    return await fetch(url, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) });
  } catch {
    return null; // the service was killed mid-request: not acknowledged
  }
}

/** Every acknowledged write reads back with the name that was sent. */
async function expectAllThere(base: string, ledger: readonly Acknowledged[]): Promise<void> {
  for (const w of ledger) {
    const res = await fetch(`${base}/api/v1/surveys/${w.id}?revision=${w.revision}`);
    expect(res.status, `${w.id} revision ${w.revision}`).toBe(200);
    const body = (await res.json()) as { name: string; revision: number; survey: { name: string } };
    expect(body.revision).toBe(w.revision);
    expect(body.survey.name).toBe(w.name);
  }
}

function expectStoreWhole(dataDir: string): void {
  const db = new Database(join(dataDir, STORE_FILE_NAME), { readonly: true });
  try {
    expect(db.pragma('integrity_check', { simple: true })).toBe('ok');
    const surveys = db.prepare('SELECT id, latest_revision AS latest FROM surveys').all() as { id: string; latest: number }[];
    for (const s of surveys) {
      const revisions = db.prepare('SELECT revision, survey_json, interpretation_json FROM revisions WHERE survey_id = ? ORDER BY revision').all(s.id) as { revision: number; survey_json: string; interpretation_json: string }[];
      expect(revisions.map((r) => r.revision)).toEqual(Array.from({ length: s.latest }, (_, k) => k + 1));
      for (const r of revisions) {
        expect(() => JSON.parse(r.survey_json)).not.toThrow();
        expect((JSON.parse(r.interpretation_json) as { stations: unknown[] }).stations.length).toBeGreaterThan(0);
      }
    }
  } finally {
    db.close();
  }
}

describe('the store survives the service being killed', () => {
  it(`keeps every acknowledged write over ${KILLS} kills during a stream of stores and revisions`, async () => {
    const dataDir = await fixture.dataDir('arcline-kill-');
    const rng = mulberry32(14);
    const ledger: Acknowledged[] = [];
    const lines: string[] = [];
    let attempted = 0;
    for (let kill = 0; kill < KILLS; kill++) {
      const service = await startServiceProcess(dataDir);
      await expectAllThere(service.base, ledger);
      let stopped = false;
      const writer = async (w: number): Promise<void> => {
        for (let n = 0; !stopped; n++) {
          const name = `kill ${kill} writer ${w} write ${n}`;
          const asRevision = lines.length > 0 && rng() < 0.6;
          const id = asRevision ? lines[Math.floor(rng() * lines.length)] : null;
          attempted++;
          const res = await post(id ? `${service.base}/api/v1/surveys/${id}/revisions` : `${service.base}/api/v1/surveys`, { ...fixture.flatLine(), name });
          if (res === null) return;
          if (res.status !== 201) {
            await res.body?.cancel();
            continue;
          }
          const body = (await res.json()) as { id: string; revision: number };
          ledger.push({ id: body.id, revision: body.revision, name });
          if (!id) lines.push(body.id);
        }
      };
      const before = ledger.length;
      const writers = Array.from({ length: WRITERS }, (_, w) => writer(w));
      // Kill once this round has had a write acknowledged, at a random moment after it, so the
      // kill lands among writes in flight however fast the machine is.
      for (let waited = 0; ledger.length === before && waited < 20_000; waited += 10) await new Promise((r) => setTimeout(r, 10));
      await new Promise((r) => setTimeout(r, rng() * 300));
      service.child.kill('SIGKILL');
      stopped = true;
      await service.exited;
      await Promise.all(writers);
    }
    const service = await startServiceProcess(dataDir);
    await expectAllThere(service.base, ledger);
    service.child.kill('SIGTERM');
    await service.exited;
    expectStoreWhole(dataDir);
    console.log(`durability: ${KILLS} kills, ${attempted} writes sent, ${ledger.length} acknowledged, all read back after restarts`);
    // The kills must have landed among writes, or this proves nothing.
    expect(ledger.length).toBeGreaterThanOrEqual(KILLS);
    expect(attempted).toBeGreaterThan(ledger.length);
  }, 600_000);

  it('loses no revision when several writers store revisions of one line at once', async () => {
    const dataDir = await fixture.dataDir('arcline-concurrent-');
    const service = await startServiceProcess(dataDir);
    try {
      const first = (await (await post(`${service.base}/api/v1/surveys`, { ...fixture.flatLine(), name: 'one line' }))!.json()) as { id: string };
      const each = 8;
      const results = await Promise.all(
        Array.from({ length: 4 }, (_, w) =>
          (async () => {
            const revisions: number[] = [];
            for (let n = 0; n < each; n++) {
              const res = (await post(`${service.base}/api/v1/surveys/${first.id}/revisions`, { ...fixture.flatLine(), name: `writer ${w} revision ${n}` }))!;
              expect(res.status).toBe(201);
              revisions.push(((await res.json()) as { revision: number }).revision);
            }
            return revisions;
          })(),
        ),
      );
      const all = results.flat().sort((a, b) => a - b);
      expect(all).toEqual(Array.from({ length: 4 * each }, (_, k) => k + 2));
      const latest = (await (await fetch(`${service.base}/api/v1/surveys/${first.id}`)).json()) as { latestRevision: number };
      expect(latest.latestRevision).toBe(4 * each + 1);
    } finally {
      service.child.kill('SIGTERM');
      await service.exited;
    }
    expectStoreWhole(dataDir);
  }, 120_000);
});
