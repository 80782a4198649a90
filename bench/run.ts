/**
 * `npm run bench [filter]`: times every case in bench/cases/*.ts and prints ratios against reference
 * runs (system python3 with Debian's numpy / scipy / statsmodels / scikit-learn / pandas) where installed.
 */
import { readdirSync, existsSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { loadavg } from 'node:os';
import path from 'node:path';
import type { BenchCase } from './types';

const here = path.dirname(fileURLToPath(import.meta.url));
const filter = process.argv[2];
const SYSTEM_PYTHON = existsSync('/usr/bin/python3') ? '/usr/bin/python3' : 'python3';

function median(xs: number[]): number {
  const s = xs.slice().sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

function fmt(s: number): string {
  return s >= 1 ? `${s.toFixed(3)} s` : `${(s * 1000).toFixed(1)} ms`;
}

async function timeCase(c: BenchCase) {
  const prepared = c.setup ? await c.setup() : undefined;
  for (let i = 0; i < (c.warmup ?? 1); i++) await c.run(prepared);
  const times: number[] = [];
  const cpu: number[] = [];
  let last: unknown;
  for (let i = 0; i < (c.repeats ?? 5); i++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    last = await c.run(prepared);
    times.push((performance.now() - t0) / 1000);
    const dc = process.cpuUsage(c0);
    cpu.push((dc.user + dc.system) / 1e6);
  }
  return { seconds: median(times), cpuSeconds: median(cpu), extra: c.report ? c.report(prepared, last) : {} };
}

function load(): string {
  return loadavg()
    .map((l) => l.toFixed(2))
    .join(' ');
}

const referenceRuns = new Map<string, Record<string, unknown> | string>();

/** A reference script's result; each script (with its arguments) runs once per bench run. */
function runReference(ref: NonNullable<BenchCase['reference']>): Record<string, unknown> | string {
  const key = JSON.stringify([ref.script, ref.args ?? []]);
  const cached = referenceRuns.get(key);
  if (cached !== undefined) return cached;
  const result = runReferenceOnce(ref);
  referenceRuns.set(key, result);
  return result;
}

function runReferenceOnce(ref: NonNullable<BenchCase['reference']>): Record<string, unknown> | string {
  const script = path.join(here, 'reference', ref.script);
  const r = spawnSync(SYSTEM_PYTHON, [script, ...(ref.args ?? [])], {
    encoding: 'utf8',
    timeout: 600_000,
    env: { ...process.env, OMP_NUM_THREADS: process.env.OMP_NUM_THREADS ?? '2' },
  });
  if (r.status !== 0) {
    const why = (r.stderr || r.error?.message || '').split('\n').filter(Boolean).slice(-1)[0] ?? 'failed';
    return `reference not run (${why.trim()})`;
  }
  const line = r.stdout.trim().split('\n').pop() ?? '';
  try {
    return JSON.parse(line) as Record<string, unknown>;
  } catch {
    return `reference printed no JSON line`;
  }
}

async function main() {
  const files = readdirSync(path.join(here, 'cases')).filter((f) => f.endsWith('.ts')).sort();
  const results: string[] = [];
  console.log(`load average (1, 5, 15 min) at start: ${load()}`);
  for (const f of files) {
    const mod = (await import(pathToFileURL(path.join(here, 'cases', f)).href)) as { cases: BenchCase[] };
    for (const c of mod.cases) {
      if (filter && !c.name.includes(filter)) continue;
      const { seconds, cpuSeconds, extra } = await timeCase(c);
      let line = `${c.name.padEnd(58)} ${fmt(seconds).padStart(10)}`;
      if (c.target) line += `  target ${c.target}`;
      if (c.targetSeconds !== undefined) line += seconds <= c.targetSeconds ? ' [met]' : ' [MISSED]';
      // Processor time of this process (all its threads, the garbage collector's included): steadier
      // than wall time when other work shares the machine.
      line += `  cpu=${fmt(cpuSeconds)}  load=${load()}`;
      for (const [k, v] of Object.entries(extra)) line += `  ${k}=${typeof v === 'number' ? Number(v.toPrecision(6)) : v}`;
      if (c.reference) {
        const ref = runReference(c.reference);
        if (typeof ref === 'string') line += `\n    ${c.reference.label}: ${ref}`;
        else {
          const rs = Number(ref.seconds);
          const ratio = seconds / rs;
          line += `\n    ${c.reference.label}: ${fmt(rs)}  ratio ours/reference = ${ratio.toFixed(2)}`;
          if (c.reference.maxRatio !== undefined) line += ratio <= c.reference.maxRatio ? ` [met ≤ ${c.reference.maxRatio}]` : ` [MISSED ≤ ${c.reference.maxRatio}]`;
          for (const [k, v] of Object.entries(ref)) if (k !== 'seconds') line += `  ${k}=${typeof v === 'number' ? Number(v.toPrecision(6)) : String(v)}`;
          for (const other of c.reference.compare ?? []) {
            const os = Number(ref[other.key]);
            if (!(os > 0)) continue;
            const r2 = seconds / os;
            line += `\n    ${other.label}: ${fmt(os)}  ratio ours/reference = ${r2.toFixed(2)}`;
            if (other.maxRatio !== undefined) line += r2 <= other.maxRatio ? ` [met ≤ ${other.maxRatio}]` : ` [MISSED ≤ ${other.maxRatio}]`;
          }
        }
      }
      console.log(line);
      results.push(line);
    }
  }
  if (results.length === 0) console.log(filter ? `no bench case matches "${filter}"` : 'no bench cases found');
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
