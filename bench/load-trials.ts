/**
 * `npm run load -- [baseUrl] [clients] [seconds] [--token <token>] [--think <ms>]`: a bounded logging load
 * on a running Saltus, loopback only. N concurrent clients each log trials through
 * POST /api/v1/campaigns/{id}/trials/log (one idempotency key per entry) against a campaign of its own,
 * for a fixed time; then every acknowledged key is checked to be stored exactly once. Prints throughput
 * and latency percentiles.
 *
 * Without --think each client sends its next entry as soon as the last is answered (a closed loop: the
 * mean latency is then clients ÷ throughput); with --think each client pauses about that long between
 * entries (0.5 to 1.5 times, starting at a random moment), like operators between trials. The API token
 * (role operator or above) comes from --token or the environment variable SALTUS_TOKEN and is sent as
 * `Authorization: Bearer <token>` on every request.
 */
import { randomUUID } from 'node:crypto';

const args = process.argv.slice(2);
let token = process.env.SALTUS_TOKEN ?? '';
let thinkMs = 0;
const positional: string[] = [];
for (let i = 0; i < args.length; i++) {
  const a = args[i]!;
  if (a === '--token') token = args[++i] ?? '';
  else if (a.startsWith('--token=')) token = a.slice('--token='.length);
  else if (a === '--think') thinkMs = Number(args[++i] ?? 0);
  else if (a.startsWith('--think=')) thinkMs = Number(a.slice('--think='.length));
  else positional.push(a);
}
const base = positional[0] ?? 'http://127.0.0.1:3000';
const clients = Math.max(1, Math.min(Number(positional[1] ?? 50), 200));
const seconds = Math.max(1, Math.min(Number(positional[2] ?? 60), 300));
thinkMs = Math.max(0, Math.min(Number.isFinite(thinkMs) ? thinkMs : 0, 60_000));
const auth: Record<string, string> = token ? { authorization: `Bearer ${token}` } : {};

const host = new URL(base).hostname;
if (!['127.0.0.1', 'localhost', '::1', '[::1]'].includes(host)) {
  console.error('load: refusing to send load anywhere but this machine (127.0.0.1 / localhost)');
  process.exit(2);
}

async function post(path: string, body: unknown, headers: Record<string, string> = {}) {
  const res = await fetch(base + path, { method: 'POST', headers: { 'content-type': 'application/json', ...auth, ...headers }, body: JSON.stringify(body) });
  return { status: res.status, json: (await res.json().catch(() => null)) as Record<string, unknown> | null };
}

const pause = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

async function get<T>(path: string): Promise<T> {
  const res = await fetch(base + path, { headers: auth });
  if (!res.ok) throw new Error(`GET ${path}: HTTP ${res.status} ${(await res.text()).slice(0, 300)}`);
  return (await res.json()) as T;
}

async function main() {
  const c = await post('/api/v1/campaigns', {
    name: `Load test ${new Date().toISOString()}`,
    objective: 'synthetic logging load; safe to delete',
    factors: [{ name: 'payload', kind: 'continuous', low: 0, high: 2 }],
    responses: [{ name: 'apex_height', unit: 'mm', goal: 'maximize' }],
    rigs: [{ name: 'Load rig' }],
  });
  if (c.status === 401 || c.status === 403) throw new Error(`the server refused the token (HTTP ${c.status}); pass --token <token> or set SALTUS_TOKEN to a planner or admin token`);
  if (c.status !== 201) throw new Error(`could not create the load campaign: ${JSON.stringify(c.json)}`);
  const id = String(c.json!.id);
  await post(`/api/v1/campaigns/${id}/designs`, { method: 'full-factorial', seed: 1 });
  const runs = await get<{ runs: { id: string }[] }>(`/api/v1/campaigns/${id}/runs`);
  const runIds = runs.runs.map((r) => r.id);
  const latencies: number[] = [];
  const acknowledged = new Set<string>();
  let errors = 0;
  const deadline = Date.now() + seconds * 1000;
  const started = Date.now();
  await Promise.all(
    Array.from({ length: clients }, async (_, k) => {
      // Operators do not act in step: each client starts at a random moment of the first pause.
      if (thinkMs > 0) await pause(Math.random() * thinkMs);
      let i = 0;
      while (Date.now() < deadline && i < 100_000) {
        const key = randomUUID();
        const t0 = performance.now();
        const r = await post(
          `/api/v1/campaigns/${id}/trials/log`,
          { runId: runIds[(k + i) % runIds.length], observations: { apex_height: 150 + ((k * 7 + i) % 90) }, status: 'done', repeat: true, operator: `client ${k}` },
          { 'Idempotency-Key': key },
        ).catch(() => ({ status: 0, json: null }));
        latencies.push(performance.now() - t0);
        if (r.status === 201 || r.status === 200) acknowledged.add(key);
        else errors++;
        i++;
        if (thinkMs > 0) await pause(thinkMs * (0.5 + Math.random()));
      }
    }),
  );
  const elapsed = (Date.now() - started) / 1000;
  latencies.sort((a, b) => a - b);
  const q = (p: number) => latencies[Math.min(latencies.length - 1, Math.floor(p * latencies.length))]!;
  const trials = await get<{ trials: { idempotencyKey: string | null }[] }>(`/api/v1/campaigns/${id}/trials`);
  const stored = new Map<string, number>();
  for (const t of trials.trials) if (t.idempotencyKey) stored.set(t.idempotencyKey, (stored.get(t.idempotencyKey) ?? 0) + 1);
  const missing = [...acknowledged].filter((k) => stored.get(k) !== 1).length;
  console.log(
    `load: ${clients} clients${thinkMs ? ` (think ${thinkMs} ms)` : ''} for ${elapsed.toFixed(1)} s: ${latencies.length} requests, ${(latencies.length / elapsed).toFixed(1)} req/s; ` +
      `latency p50 ${q(0.5).toFixed(1)} ms, p95 ${q(0.95).toFixed(1)} ms, p99 ${q(0.99).toFixed(1)} ms; errors ${errors}; ` +
      `acknowledged ${acknowledged.size}, stored exactly once ${acknowledged.size - missing}, missing or duplicated ${missing}`,
  );
  process.exit(errors === 0 && missing === 0 ? 0 : 1);
}

main().catch((e) => {
  console.error(`load: ${e instanceof Error ? e.message : String(e)}`);
  process.exit(1);
});
