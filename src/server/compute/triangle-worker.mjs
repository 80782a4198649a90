// Helper thread of the threaded least-squares triangle (see triangle-threads.ts). Plain JavaScript so
// Node loads it as it is; it loads the TypeScript kernel through tsx's loader API, as the job pool's
// worker does. Each message is one fit: the thread claims row blocks from a shared counter, writes each
// block's triangle into the shared output and marks it done, until no block is left.
import path from 'node:path';
import { parentPort } from 'node:worker_threads';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { tsImport } from 'tsx/esm/api';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '..', '..', '..');
const kernel = await tsImport(pathToFileURL(path.join(here, '..', '..', 'domain', 'analysis', 'tall-qr.ts')).href, {
  parentURL: import.meta.url,
  tsconfig: path.join(root, 'tsconfig.json'),
});

// Control cells shared with triangle-threads.ts.
const NEXT = 0;
const ACTIVE = 1;

parentPort.on('message', (job) => {
  const { x, y, n, p, blocks, ctrl, done, out } = job;
  const qq = (p + 1) * (p + 1);
  Atomics.store(ctrl, ACTIVE, 1);
  try {
    for (;;) {
      const b = Atomics.add(ctrl, NEXT, 1);
      if (b >= blocks) break;
      kernel.blockTriangle(x, y, n, p, b, out.subarray(b * qq, (b + 1) * qq));
      Atomics.store(done, b, 1);
    }
  } finally {
    Atomics.store(ctrl, ACTIVE, 0);
    Atomics.notify(ctrl, ACTIVE);
  }
});
parentPort.postMessage('ready');
