/**
 * Migrations and the data model on a real database (the SQLite file or PostgreSQL database the
 * environment names; `npm test` runs this file on both): migrations apply, repeat harmlessly and refuse
 * an edited history; every model of prisma/schema.prisma round-trips through db(); every relation's
 * onDelete behaves as the schema declares it.
 */
import { randomUUID } from 'node:crypto';
import { appendFileSync, cpSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db, type Db } from '@/server/db/client';
import { databaseConfig, type DatabaseConfig } from '@/server/db/config';
import { migrate, migrationFiles } from '@/server/db/migrate';
import { freshDatabase, repoRoot, wipeDatabase } from './database';

const config = databaseConfig();
const migrationsDir = (root: string, c: DatabaseConfig) =>
  c.provider === 'sqlite' ? path.join(root, 'prisma', 'migrations') : path.join(root, 'prisma', 'postgresql', 'migrations');

/** A copy of the repository's prisma folder, to alter without touching the real one. */
function copyOfPrismaFolder(): string {
  const root = mkdtempSync(path.join(os.tmpdir(), 'saltus-migrations-'));
  cpSync(path.join(repoRoot, 'prisma'), path.join(root, 'prisma'), { recursive: true });
  return root;
}

describe(`migrate() on ${config.provider}`, () => {
  const copies: string[] = [];
  beforeAll(async () => {
    await wipeDatabase(config);
  });
  afterAll(async () => {
    for (const dir of copies) rmSync(dir, { recursive: true, force: true });
    await closeDb();
  });

  it('applies every committed migration, in name order, to an empty database', async () => {
    const files = migrationFiles(config, repoRoot);
    expect(files.length).toBeGreaterThan(0);
    const result = await migrate(config, repoRoot);
    expect(result.alreadyApplied).toBe(0);
    expect(result.applied).toEqual(files.map((f) => f.name));
  });

  it('changes nothing when run again', async () => {
    const files = migrationFiles(config, repoRoot);
    const result = await migrate(config, repoRoot);
    expect(result).toEqual({ applied: [], alreadyApplied: files.length });
  });

  it('refuses a migration whose migration.sql changed after it was applied, naming it', async () => {
    const root = copyOfPrismaFolder();
    copies.push(root);
    const [first] = migrationFiles(config, root);
    appendFileSync(path.join(migrationsDir(root, config), first.name, 'migration.sql'), '\n-- edited after the fact\n');
    await expect(migrate(config, root)).rejects.toThrow(new RegExp(`migration ${first.name} was changed after it was applied`));
  });

  it('refuses a database that has a migration this version does not know', async () => {
    const root = copyOfPrismaFolder();
    copies.push(root);
    const files = migrationFiles(config, root);
    const last = files[files.length - 1];
    rmSync(path.join(migrationsDir(root, config), last.name), { recursive: true });
    await expect(migrate(config, root)).rejects.toThrow(new RegExp(`has migration ${last.name}, which this version of Saltus does not know`));
  });

  it('applies only the new migration when a later version adds one', async () => {
    const root = copyOfPrismaFolder();
    copies.push(root);
    const name = '99991231000000_integration_probe';
    mkdirSync(path.join(migrationsDir(root, config), name));
    writeFileSync(path.join(migrationsDir(root, config), name, 'migration.sql'), 'CREATE TABLE "IntegrationProbe" ("id" INTEGER NOT NULL PRIMARY KEY);\n');
    const before = migrationFiles(config, repoRoot).length;
    expect(await migrate(config, root)).toEqual({ applied: [name], alreadyApplied: before });
    expect(await migrate(config, root)).toEqual({ applied: [], alreadyApplied: before + 1 });
  });
});

// ---------------------------------------------------------------------------------------------------
// The data model

const schemaText = readFileSync(path.join(repoRoot, 'prisma', 'schema.prisma'), 'utf8');

interface Relation {
  child: string;
  field: string; // the foreign-key column on the child
  parent: string;
  optional: boolean;
  onDelete: string;
}

/** Models and relations declared in prisma/schema.prisma. */
function parseSchema(text: string): { models: string[]; relations: Relation[] } {
  const models: string[] = [];
  const relations: Relation[] = [];
  let model: string | null = null;
  for (const line of text.split('\n')) {
    const start = /^model\s+(\w+)\s*\{/.exec(line);
    if (start) {
      model = start[1];
      models.push(model);
      continue;
    }
    if (/^\}/.test(line)) {
      model = null;
      continue;
    }
    const rel = /^\s*\w+\s+(\w+)(\?)?\s+@relation\(([^)]*)\)/.exec(line);
    if (model && rel) {
      const fields = /fields:\s*\[(\w+)\]/.exec(rel[3]);
      if (!fields) continue; // the other side of a relation
      const onDelete = /onDelete:\s*(\w+)/.exec(rel[3])?.[1] ?? (rel[2] ? 'SetNull' : 'Restrict');
      relations.push({ child: model, field: fields[1], parent: rel[1], optional: Boolean(rel[2]), onDelete });
    }
  }
  return { models, relations };
}

const schema = parseSchema(schemaText);

type Row = Record<string, unknown>;
interface Delegate {
  findUnique(args: { where: { id: string } }): Promise<Row | null>;
  findUniqueOrThrow(args: { where: { id: string } }): Promise<Row>;
  delete(args: { where: { id: string } }): Promise<Row>;
  count(args?: { where?: Row }): Promise<number>;
}
const delegateName = (model: string) => model[0].toLowerCase() + model.slice(1);
const delegate = (client: Db, model: string) => (client as unknown as Record<string, Delegate>)[delegateName(model)];

/** One row of every model, linked together as in a real campaign; returns each row's id and data. */
async function buildCampaign(client: Db): Promise<Record<string, { id: string; data: Row }>> {
  const rows: Record<string, { id: string; data: Row }> = {};
  const keep = <T extends { id: string }>(model: string, data: Row, row: T): T => {
    rows[model] = { id: row.id, data };
    return row;
  };
  const at = (iso: string) => new Date(iso);

  const campaignData = { name: 'Payload sweep on loose soil', objective: 'apex height against payload and leg stiffness', trialMinutes: 25 };
  const campaign = keep('Campaign', campaignData, await client.campaign.create({ data: campaignData }));
  const campaignId = campaign.id;

  const factorData = { campaignId, position: 0, name: 'surface', kind: 'categorical', valuesJson: JSON.stringify(['grass', 'ice', 'wet glass']), hardToChange: true, changeMinutes: 15 };
  keep('Factor', factorData, await client.factor.create({ data: factorData }));
  const responseData = { campaignId, position: 0, name: 'apex height', unit: 'mm', goal: 'maximize', lower: 0, upper: 400 };
  keep('Response', responseData, await client.response.create({ data: responseData }));
  const robotData = { campaignId, name: 'hopper A', serial: 'HX-0001', massGrams: 1.05, heightMm: 18.5, notes: 'spring leg v2' };
  const robot = keep('Robot', robotData, await client.robot.create({ data: robotData }));
  const rigData = { campaignId, name: 'bench 1', timeZone: 'Europe/Lisbon', workdays: '[1,2,3,4]', startTime: '08:30', endTime: '16:00' };
  const rig = keep('Rig', rigData, await client.rig.create({ data: rigData }));
  const designData = { campaignId, version: 1, method: 'full factorial', model: 'main effects', seed: 20261202, specJson: '{"factors":1}', diagnosticsJson: '{"dEfficiency":1}' };
  const design = keep('Design', designData, await client.design.create({ data: designData }));
  const runData = { campaignId, designId: design.id, runNumber: 1, plannedOrder: 3, valuesJson: '{"surface":"ice"}', codedJson: '[1]', block: 1, wholePlot: 2, source: 'design' };
  const run = keep('Run', runData, await client.run.create({ data: runData }));
  const slotData = { runId: run.id, rigId: rig.id, start: at('2026-12-03T09:00:00.000Z'), end: at('2026-12-03T09:25:00.000Z'), sequence: 1, scheduleVersion: 2 };
  keep('Slot', slotData, await client.slot.create({ data: slotData }));
  const trialData = {
    campaignId, runId: run.id, robotId: robot.id, rigId: rig.id, status: 'done', passed: true, operator: 'operator 1',
    notes: 'clean take-off', startedAt: at('2026-12-03T09:02:00.123Z'), finishedAt: at('2026-12-03T09:20:00.000Z'), idempotencyKey: randomUUID(),
  };
  const trial = keep('Trial', trialData, await client.trial.create({ data: trialData }));
  const observationData = { trialId: trial.id, name: 'apex height', value: 123.45, unit: 'mm', origin: 'typed' };
  keep('Observation', observationData, await client.observation.create({ data: observationData }));
  const trackData = { trialId: trial.id, fileName: 'take-1.csv', content: 't,z\n0,0\n0.01,1.2\n', mappingJson: '{"time":"t","height":"z"}', hopsJson: '[]' };
  keep('Track', trackData, await client.track.create({ data: trackData }));
  const amendmentData = { trialId: trial.id, field: 'apex height', oldValue: '132.45', newValue: '123.45', reason: 'digits swapped when typing', author: 'operator 1' };
  keep('Amendment', amendmentData, await client.amendment.create({ data: amendmentData }));
  const analysisData = { campaignId, response: 'apex height', termsJson: '["surface"]', requestJson: '{}', resultJson: '{"rSquared":0.5}' };
  keep('Analysis', analysisData, await client.analysis.create({ data: analysisData }));
  const suggestionData = { campaignId, strategy: 'expected improvement', valuesJson: '{"surface":"grass"}', reason: 'largest expected improvement', status: 'accepted', runId: run.id };
  keep('Suggestion', suggestionData, await client.suggestion.create({ data: suggestionData }));
  const userData = { email: `planner-${randomUUID()}@example.test`, name: 'Test Planner', role: 'planner', passwordHash: 'not-a-real-hash' };
  const user = keep('User', userData, await client.user.create({ data: userData }));
  const tokenData = { userId: user.id, name: 'rig tablet', role: 'operator', tokenHash: randomUUID() };
  keep('ApiToken', tokenData, await client.apiToken.create({ data: tokenData }));
  const sessionData = { userId: user.id, tokenHash: randomUUID(), expiresAt: new Date('2030-01-01T00:00:00Z'), userAgent: 'test tablet' };
  keep('Session', sessionData, await client.session.create({ data: sessionData }));
  const jobData = { kind: 'design-search', inputJson: '{"runs":12}', campaignId, createdBy: user.email };
  keep('Job', jobData, await client.job.create({ data: jobData }));
  const auditData = { actor: user.email, action: 'create', entity: 'Campaign', entityId: campaignId, afterJson: JSON.stringify(campaignData) };
  keep('AuditEvent', auditData, await client.auditEvent.create({ data: auditData }));
  return rows;
}

describe(`data model on ${config.provider}`, () => {
  let client: Db;
  beforeAll(async () => {
    await freshDatabase();
    client = await db();
  });
  afterAll(async () => {
    await closeDb();
  });

  it('finds models and relations in prisma/schema.prisma', () => {
    expect(schema.models.length).toBeGreaterThan(10);
    expect(schema.relations.length).toBeGreaterThan(10);
  });

  it('creates one row of every model and reads each back unchanged', async () => {
    const rows = await buildCampaign(client);
    const notCovered = schema.models.filter((m) => !(m in rows));
    expect(notCovered, 'models without a row in buildCampaign(): add them to this test').toEqual([]);
    for (const [model, { id, data }] of Object.entries(rows)) {
      const back = await delegate(client, model).findUniqueOrThrow({ where: { id } });
      expect(back, model).toMatchObject(data);
    }
  });

  it('reads relations back through include', async () => {
    const rows = await buildCampaign(client);
    const trial = await client.trial.findUniqueOrThrow({
      where: { id: rows.Trial.id },
      include: { observations: true, amendments: true, run: { include: { design: true, slots: true } }, robot: true, rig: true },
    });
    expect(trial.observations.map((o) => o.value)).toEqual([123.45]);
    expect(trial.amendments[0].reason).toBe('digits swapped when typing');
    expect(trial.run.design?.version).toBe(1);
    expect(trial.run.slots).toHaveLength(1);
    expect(trial.robot?.massGrams).toBe(1.05);
    expect(trial.rig?.name).toBe('bench 1');
  });

  it('enforces the unique keys (run number per campaign, trial idempotency key)', async () => {
    const rows = await buildCampaign(client);
    const run = rows.Run.data as { campaignId: string };
    await expect(client.run.create({ data: { campaignId: run.campaignId, runNumber: 1, plannedOrder: 9, valuesJson: '{}' } })).rejects.toThrow();
    const trial = rows.Trial.data as { campaignId: string; runId: string; idempotencyKey: string };
    await expect(
      client.trial.create({ data: { campaignId: trial.campaignId, runId: trial.runId, status: 'done', startedAt: new Date(), idempotencyKey: trial.idempotencyKey } }),
    ).rejects.toThrow();
  });

  for (const rel of schema.relations) {
    it(`deleting a ${rel.parent} ${rel.onDelete === 'Cascade' ? 'deletes' : rel.onDelete === 'SetNull' ? 'keeps' : 'is refused while it has'} its ${rel.child} rows (${rel.child}.${rel.field}, onDelete ${rel.onDelete})`, async () => {
      const rows = await buildCampaign(client);
      const parent = rows[rel.parent];
      const child = rows[rel.child];
      expect(parent, `no ${rel.parent} row built`).toBeDefined();
      expect(child, `no ${rel.child} row built`).toBeDefined();
      expect(child.data[rel.field], `${rel.child}.${rel.field} should point at the ${rel.parent}`).toBe(parent.id);
      const deleting = delegate(client, rel.parent).delete({ where: { id: parent.id } });
      const after = async () => delegate(client, rel.child).findUnique({ where: { id: child.id } });
      switch (rel.onDelete) {
        case 'Cascade':
          await deleting;
          expect(await after()).toBeNull();
          break;
        case 'SetNull':
          await deleting;
          expect(await after()).toMatchObject({ id: child.id, [rel.field]: null });
          break;
        case 'Restrict':
        case 'NoAction':
          await expect(deleting).rejects.toThrow();
          expect(await after()).toMatchObject({ id: child.id, [rel.field]: parent.id });
          break;
        default:
          throw new Error(`onDelete ${rel.onDelete} has no check here yet`);
      }
    });
  }

  it('deleting a campaign leaves none of its rows behind', async () => {
    const rows = await buildCampaign(client);
    await client.campaign.delete({ where: { id: rows.Campaign.id } });
    const global = new Set(['User', 'ApiToken', 'Session', 'Job', 'AuditEvent']);
    for (const model of schema.models.filter((m) => !global.has(m))) {
      expect(await delegate(client, model).findUnique({ where: { id: rows[model].id } }), model).toBeNull();
    }
    expect(await client.user.findUnique({ where: { id: rows.User.id } })).not.toBeNull();
    expect(await client.auditEvent.findUnique({ where: { id: rows.AuditEvent.id } })).not.toBeNull();
  });

  it('lists the migrations it ran in _prisma_migrations', async () => {
    const names = migrationFiles(config, repoRoot).map((f) => f.name);
    const recorded = await client.$queryRawUnsafe<{ migration_name: string }[]>('SELECT migration_name FROM _prisma_migrations ORDER BY migration_name');
    expect(recorded.map((r) => r.migration_name)).toEqual(names);
  });
});
