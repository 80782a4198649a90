/**
 * Crash while logging, on the built app: 20 concurrent clients log toward 1,000 trials through the rig
 * log route (one idempotency key per entry); halfway the server's whole process group is killed with
 * SIGKILL (no shutdown of any kind); the server is started again on the same SQLite file. Then every
 * acknowledged entry is stored exactly once (by its key), no trial is half-written (each has all its
 * observations with the values sent), each trial has exactly one audit event carrying the same values
 * and no audit event points at a missing trial. Finally the entries that were never acknowledged are
 * sent again with their keys, and the campaign holds exactly 1,000 trials.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, describe, expect, it } from 'vitest';
import { startApp, type RunningApp } from './harness';

const TOTAL = 1000;
const CLIENTS = 20;
/** Kill the server once this many entries are acknowledged. */
const KILL_AFTER = 400;

interface Entry {
  key: string;
  runId: string;
  observations: { apex_height: number; energy: number };
}

describe('a server killed while logging loses no acknowledged trial', () => {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'saltus-crash-'));
  const dbFile = path.join(dir, 'crash.db');
  const apps: RunningApp[] = [];

  afterAll(async () => {
    for (const app of apps) await app.stop();
    rmSync(dir, { recursive: true, force: true });
  });

  async function post(app: RunningApp, url: string, body: unknown, headers: Record<string, string> = {}) {
    const res = await app.fetch(`${app.baseUrl}${url}`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', ...headers },
      body: JSON.stringify(body),
      signal: AbortSignal.timeout(20_000),
    });
    return { status: res.status, json: (await res.json().catch(() => null)) as Record<string, unknown> | null };
  }

  it('kill -9 halfway through 1,000 trials, restart, every acknowledged trial there exactly once, the rest replayed', async () => {
    const first = await startApp({ seed: false, databaseFile: dbFile });
    apps.push(first);
    const created = await post(first, '/api/v1/campaigns', {
      name: 'Crash check (invented)',
      factors: [{ name: 'payload', kind: 'continuous', unit: 'g', low: 0, high: 2 }],
      responses: [
        { name: 'apex_height', unit: 'mm', goal: 'maximize' },
        { name: 'energy', unit: 'mJ', goal: 'minimize' },
      ],
      rigs: [{ name: 'Crash rig' }],
    });
    expect(created.status, JSON.stringify(created.json)).toBe(201);
    const campaignId = String(created.json!.id);
    expect((await post(first, `/api/v1/campaigns/${campaignId}/designs`, { method: 'full-factorial', seed: 1 })).status).toBeLessThan(300);
    const runs = (await (await first.fetch(`${first.baseUrl}/api/v1/campaigns/${campaignId}/runs`)).json()) as { runs: { id: string }[] };
    const runIds = runs.runs.map((r) => r.id);
    expect(runIds.length).toBeGreaterThan(0);

    const entries: Entry[] = Array.from({ length: TOTAL }, (_, k) => ({
      key: `crash-entry-${String(k).padStart(5, '0')}`,
      runId: runIds[k % runIds.length]!,
      observations: { apex_height: 150 + (k % 80), energy: 2 + (k % 10) / 10 },
    }));
    const send = (app: RunningApp, e: Entry) =>
      post(
        app,
        `/api/v1/campaigns/${campaignId}/trials/log`,
        { runId: e.runId, observations: e.observations, status: 'done', repeat: true, operator: 'crash client', notes: e.key },
        { 'Idempotency-Key': e.key },
      );

    // Phase 1: 20 clients log until the server dies under them.
    const acknowledged = new Set<string>();
    let next = 0;
    let killing: Promise<void> | null = null;
    await Promise.all(
      Array.from({ length: CLIENTS }, async () => {
        while (next < TOTAL) {
          const e = entries[next++]!;
          try {
            const r = await send(first, e);
            if (r.status !== 201 && r.status !== 200) throw new Error(`entry ${e.key}: HTTP ${r.status} ${JSON.stringify(r.json)}`);
            acknowledged.add(e.key);
          } catch (err) {
            if (killing) return; // the server is gone: this entry is unacknowledged
            throw err;
          }
          if (acknowledged.size >= KILL_AFTER && !killing) killing = first.crash();
        }
      }),
    );
    await killing;
    expect(acknowledged.size).toBeGreaterThanOrEqual(KILL_AFTER);
    expect(acknowledged.size).toBeLessThan(TOTAL);

    // Phase 2: the server comes back on the same file.
    const second = await startApp({ seed: false, databaseFile: dbFile });
    apps.push(second);
    const byKey = new Map(entries.map((e) => [e.key, e]));

    const inspect = () => {
      const conn = new Database(dbFile, { readonly: true });
      try {
        expect(conn.pragma('journal_mode', { simple: true })).toBe('wal');
        const trials = conn
          .prepare('SELECT "id", "idempotencyKey" AS key, "status", "version", "notes" FROM "Trial" WHERE "campaignId" = ?')
          .all(campaignId) as { id: string; key: string; status: string; version: number; notes: string }[];
        const observations = conn
          .prepare('SELECT o."trialId", o."name", o."value" FROM "Observation" o JOIN "Trial" t ON t."id" = o."trialId" WHERE t."campaignId" = ?')
          .all(campaignId) as { trialId: string; name: string; value: number }[];
        const events = conn
          .prepare(`SELECT "entityId", "afterJson" FROM "AuditEvent" WHERE "entity" = 'trial' AND "action" = 'log-trial'`)
          .all() as { entityId: string; afterJson: string }[];
        return { trials, observations, events };
      } finally {
        conn.close();
      }
    };

    const check = () => {
      const { trials, observations, events } = inspect();
      const count = new Map<string, number>();
      for (const t of trials) count.set(t.key, (count.get(t.key) ?? 0) + 1);
      // Every acknowledged entry exactly once; no key twice.
      for (const key of acknowledged) expect(count.get(key), key).toBe(1);
      for (const [key, n] of count) expect(n, key).toBe(1);
      // Nothing half-written: each stored trial is finished with every value it was sent.
      const obsOf = new Map<string, Record<string, number>>();
      for (const o of observations) obsOf.set(o.trialId, { ...obsOf.get(o.trialId), [o.name]: o.value });
      const eventsOf = new Map<string, string[]>();
      for (const ev of events) eventsOf.set(ev.entityId, [...(eventsOf.get(ev.entityId) ?? []), ev.afterJson]);
      const ids = new Set(trials.map((t) => t.id));
      for (const t of trials) {
        const sent = byKey.get(t.key)!;
        expect(sent, t.key).toBeDefined();
        expect(t.status).toBe('done');
        expect(t.version).toBe(2);
        expect(t.notes).toBe(t.key);
        expect(obsOf.get(t.id), t.key).toEqual(sent.observations);
        const ev = eventsOf.get(t.id) ?? [];
        expect(ev, `audit of ${t.key}`).toHaveLength(1);
        expect((JSON.parse(ev[0]!) as { observations: unknown }).observations).toEqual(sent.observations);
      }
      // No audit event of a trial that is not there.
      for (const ev of events) expect(ids.has(ev.entityId), ev.entityId).toBe(true);
      return trials;
    };

    const afterCrash = check();
    const storedUnacknowledged = afterCrash.filter((t) => !acknowledged.has(t.key)).length;
    console.log(
      `crash test: ${acknowledged.size} acknowledged before the kill, ${afterCrash.length} stored after restart ` +
        `(${storedUnacknowledged} stored whose answer was lost), ${TOTAL - acknowledged.size} to replay`,
    );

    // Phase 3: the clients send every unacknowledged entry again with its key.
    const pending = entries.filter((e) => !acknowledged.has(e.key));
    let cursor = 0;
    const replayStatus = new Map<number, number>();
    await Promise.all(
      Array.from({ length: CLIENTS }, async () => {
        while (cursor < pending.length) {
          const e = pending[cursor++]!;
          const r = await send(second, e);
          expect([200, 201], `${e.key}: ${JSON.stringify(r.json)}`).toContain(r.status);
          replayStatus.set(r.status, (replayStatus.get(r.status) ?? 0) + 1);
          acknowledged.add(e.key);
        }
      }),
    );
    // A replay of an entry stored before the kill is answered as a replay (200), never stored twice.
    expect(replayStatus.get(200) ?? 0).toBe(storedUnacknowledged);
    const final = check();
    expect(final).toHaveLength(TOTAL);
    expect(acknowledged.size).toBe(TOTAL);
  });
});
