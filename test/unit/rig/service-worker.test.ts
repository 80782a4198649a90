/**
 * The rig page's service worker (public/rig-sw.js) run in a plain JavaScript context with stand-ins
 * for the worker globals: its cache is named by the build in its URL, and when a new build's worker
 * activates it deletes the rig shell caches of other builds (and nothing else), takes over the open
 * pages, and never touches IndexedDB, where the tablet's outbox lives.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import vm from 'node:vm';
import { describe, expect, it } from 'vitest';

const source = readFileSync(path.join('public', 'rig-sw.js'), 'utf8');

type Handler = (event: unknown) => void;

function loadWorker(scriptUrl: string, cacheNames: string[]) {
  const handlers = new Map<string, Handler>();
  const stores = new Map<string, Map<string, unknown>>(cacheNames.map((n) => [n, new Map()]));
  const log: string[] = [];
  const touched: string[] = [];
  const caches = {
    keys: async () => [...stores.keys()],
    delete: async (name: string) => {
      log.push(`delete ${name}`);
      return stores.delete(name);
    },
    open: async (name: string) => {
      if (!stores.has(name)) stores.set(name, new Map());
      const store = stores.get(name)!;
      return { match: async (k: string) => store.get(String(k)), put: async (k: string, v: unknown) => void store.set(String(k), v) };
    },
  };
  const self = {
    location: new URL(scriptUrl),
    addEventListener: (type: string, h: Handler) => handlers.set(type, h),
    skipWaiting: () => log.push('skipWaiting'),
    clients: { claim: async () => void log.push('claim') },
  };
  // Any use of IndexedDB would be recorded here.
  const indexedDB = new Proxy({}, { get: (_t, p) => (touched.push(String(p)), undefined) });
  vm.runInNewContext(source, { self, caches, indexedDB, URL, Response, fetch: async () => new Response('x') });
  async function fire(type: string, event: Record<string, unknown> = {}) {
    let pending: Promise<unknown> = Promise.resolve();
    handlers.get(type)!({ ...event, waitUntil: (p: Promise<unknown>) => (pending = p) });
    await pending;
  }
  return { fire, stores, log, touched, handlers };
}

describe('rig service worker', () => {
  it('installs at once, and on activation deletes the shell caches of other builds only, then takes over the pages', async () => {
    const w = loadWorker('https://rig.example/rig-sw.js?build=b2', ['saltus-rig-shell-b1', 'saltus-rig-shell-v1', 'saltus-rig-shell-b2', 'someone-else']);
    await w.fire('install');
    await w.fire('activate');
    expect(w.log).toEqual(['skipWaiting', 'delete saltus-rig-shell-b1', 'delete saltus-rig-shell-v1', 'claim']);
    expect([...w.stores.keys()].sort()).toEqual(['saltus-rig-shell-b2', 'someone-else']);
    expect(w.touched).toEqual([]);
  });

  it('names its cache by the build in its URL (unsafe characters dropped; dev without one)', async () => {
    const w = loadWorker('https://rig.example/rig-sw.js?build=a%2Fb%20c', []);
    await w.fire('message', { data: { type: 'cache', urls: [] }, source: null });
    expect([...w.stores.keys()]).toEqual(['saltus-rig-shell-abc']);
    const dev = loadWorker('https://rig.example/rig-sw.js', []);
    await dev.fire('message', { data: { type: 'cache', urls: [] }, source: null });
    expect([...dev.stores.keys()]).toEqual(['saltus-rig-shell-dev']);
  });

  it('leaves non-GET requests (log entries) to the network', () => {
    const w = loadWorker('https://rig.example/rig-sw.js?build=b2', []);
    let answered = false;
    w.handlers.get('fetch')!({ request: { method: 'POST', url: 'https://rig.example/api/v1/campaigns/c/trials/log' }, respondWith: () => (answered = true) });
    expect(answered).toBe(false);
  });
});
