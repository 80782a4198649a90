/**
 * Writes prisma/postgresql/schema.prisma from prisma/schema.prisma: same models, PostgreSQL provider,
 * its own generated client. Prisma cannot switch provider by environment variable, so the second
 * schema is derived, never edited by hand.
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';

export function postgresSchemaText(sqliteSchema: string): string {
  const header = '// GENERATED from prisma/schema.prisma by scripts/db/generate-pg-schema.ts. Do not edit.\n';
  return (
    header +
    sqliteSchema
      .replace('provider = "sqlite"', 'provider = "postgresql"')
      .replace('output   = "../src/generated/sqlite"', 'output   = "../../src/generated/postgresql"')
  );
}

export function writePostgresSchema(root = process.cwd()): string {
  const src = readFileSync(path.join(root, 'prisma', 'schema.prisma'), 'utf8');
  const outDir = path.join(root, 'prisma', 'postgresql');
  mkdirSync(outDir, { recursive: true });
  const out = path.join(outDir, 'schema.prisma');
  writeFileSync(out, postgresSchemaText(src));
  return out;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  console.log(`wrote ${path.relative(process.cwd(), writePostgresSchema())}`);
}
