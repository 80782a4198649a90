/**
 * Jobs: the request thread stays responsive while a heavy computation runs in the worker pool. A
 * loopback HTTP server answers a health probe every 20 ms while a surrogate batch (GP fit with
 * hyperparameters on n = 500, d = 6, then one suggestion) runs through the pool; the timed figure is the
 * whole computation, the report gives the probes' latency during it (the figure that matters: an inline
 * fit would hold every probe for the whole fit).
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import type { SuggestionRequest } from '../../src/domain/surrogate';
import { runInPool } from '../../src/server/jobs/pool';
import type { BenchCase } from '../types';
import { benchData } from './surrogate';

function request(): SuggestionRequest {
  const { x, y } = benchData(500, 6);
  const names = ['a', 'b', 'c', 'd', 'e', 'f'];
  return {
    factors: names.map((name) => ({ name, kind: 'continuous', low: -1, high: 1 })),
    data: x.map((row, i) => ({ ...Object.fromEntries(row.map((v, j) => [names[j]!, v])), y: y[i]! })),
    response: 'y',
    goal: 'maximize',
    count: 1,
    seed: 1,
  };
}

const quantile = (xs: number[], q: number) => {
  const s = xs.slice().sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(q * s.length))] ?? NaN;
};

let last = { probes: 0, p50: NaN, p99: NaN, max: NaN };

async function probeDuring(work: Promise<unknown>): Promise<void> {
  const server = http.createServer((_req, res) => {
    res.writeHead(200, { 'content-type': 'application/json' });
    res.end('{"status":"ok"}');
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}/api/health`;
  let done = false;
  void work.finally(() => (done = true));
  const latencies: number[] = [];
  while (!done) {
    const t0 = performance.now();
    await (await fetch(url)).text();
    latencies.push(performance.now() - t0);
    await new Promise((r) => setTimeout(r, 20));
  }
  await work;
  await new Promise((r) => server.close(r));
  last = { probes: latencies.length, p50: quantile(latencies, 0.5), p99: quantile(latencies, 0.99), max: Math.max(...latencies) };
}

export const cases: BenchCase[] = [
  {
    name: 'jobs: health probe latency while a GP n=500 d=6 surrogate batch runs in the worker pool',
    target: 'probes answered throughout (p99 well below the fit time)',
    setup: request,
    run: (prepared) => probeDuring(runInPool('suggestions', prepared)),
    warmup: 1,
    repeats: 1,
    report: () => ({
      probes: last.probes,
      probeP50Ms: Number(last.p50.toFixed(1)),
      probeP99Ms: Number(last.p99.toFixed(1)),
      probeMaxMs: Number(last.max.toFixed(1)),
    }),
  },
];
