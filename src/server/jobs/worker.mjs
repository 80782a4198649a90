// Worker-thread entry of the computation pool. Plain JavaScript so Node loads it as it is, in the
// production server and in tests alike; it loads the TypeScript task module through tsx's loader API
// (tsx is a runtime dependency), resolving the project's "@/..." paths from tsconfig.json.
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { tsImport } from 'tsx/esm/api';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '..', '..', '..');
const tasks = await tsImport(pathToFileURL(path.join(here, 'tasks.ts')).href, {
  parentURL: import.meta.url,
  tsconfig: path.join(root, 'tsconfig.json'),
});

/**
 * One task: { kind, input, port?, stop? }. `port` (a MessagePort) receives { fraction, message } as the
 * search advances; `stop` is an Int32Array over a SharedArrayBuffer whose first cell the main thread sets
 * to 1 to ask the search to end early with its best result so far.
 */
export default function run({ kind, input, port, stop }) {
  const hooks = {
    onProgress: port ? (fraction, message) => port.postMessage({ fraction, message }) : undefined,
    shouldStop: stop ? () => Atomics.load(stop, 0) === 1 : undefined,
  };
  try {
    return tasks.runTask(kind, input, hooks);
  } finally {
    if (port) port.close();
  }
}
