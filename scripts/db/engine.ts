/**
 * Drives Prisma's schema engine compiled to WebAssembly through the project's own driver adapters,
 * so that migrations can be created without the native engine download (which is not reachable on
 * every machine). Used only by the developer command `npm run db:new-migration`.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';

export type Provider = 'sqlite' | 'postgresql';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type Engine = any;

// eslint-disable-next-line @typescript-eslint/no-explicit-any
let runtimePromise: Promise<any> | undefined;

/** Instantiate the Wasm runtime once per process; engines share it. */
async function wasmRuntime() {
  runtimePromise ??= (async () => {
    const g = globalThis as { PRISMA_WASM_PANIC_REGISTRY?: { set_message(m: string): void } };
    g.PRISMA_WASM_PANIC_REGISTRY ??= { set_message: (m: string) => console.error(`schema engine panic: ${m}`) };
    const require = createRequire(import.meta.url);
    const runtimePath = require.resolve('@prisma/schema-engine-wasm/schema_engine_bg');
    const runtime = await import(runtimePath);
    const wasmBytes = readFileSync(path.join(path.dirname(runtimePath), 'schema_engine_bg.wasm'));
    const { instance } = await WebAssembly.instantiate(wasmBytes, { './schema_engine_bg.js': runtime });
    runtime.__wbg_set_wasm(instance.exports);
  (instance.exports as { __wbindgen_start?: () => void }).__wbindgen_start?.();
    return runtime;
  })();
  return runtimePromise;
}

export async function loadSchemaEngine(provider: Provider, url: string, schemaPath: string): Promise<Engine> {
  const runtime = await wasmRuntime();
  const { bindMigrationAwareSqlAdapterFactory } = await import('@prisma/driver-adapter-utils');
  let factory: unknown;
  if (provider === 'sqlite') {
    const { PrismaBetterSqlite3 } = await import('@prisma/adapter-better-sqlite3');
    factory = new PrismaBetterSqlite3({ url });
  } else {
    const { PrismaPg } = await import('@prisma/adapter-pg');
    factory = new PrismaPg({ connectionString: url });
  }
  const datamodel = readFileSync(schemaPath, 'utf8');
  return runtime.SchemaEngine.new(
    { datamodels: [[schemaPath, datamodel]] },
    () => {},
    bindMigrationAwareSqlAdapterFactory(factory as never),
  );
}
