/**
 * Storage of one checked rig-log entry: the trial (already finished), its observations and its audit
 * event, in one transaction. On SQLite the entry runs as prepared statements on Prisma's own
 * connection inside a group commit (entries that arrive together share one transaction and one WAL
 * sync; each is answered after that commit). On PostgreSQL it is one Prisma transaction per entry
 * (the server groups concurrent commits itself). Both answer the same outcomes:
 *   - stored: the trial as written (with observations);
 *   - exists: a trial with this idempotency key is already stored (the caller answers it as a replay);
 *   - a DomainError: the run is not in the campaign, or (without `repeat`) the run was already logged.
 */
import { DomainError, invalidInput } from '@/domain/errors';
import { db, sqliteConnection, type SqliteConnection } from '@/server/db/client';
import { groupCommitter } from '@/server/db/group-commit';
import { newRowId } from '@/server/db/ids';
import { audit } from './audit';

/** A checked entry, ready to store. */
export interface LogWrite {
  campaignId: string;
  runId: string;
  rigId: string | null;
  robotId: string | null;
  operator: string;
  status: string;
  passed: boolean | null;
  failureReason: string;
  notes: string;
  startedAt: Date;
  finishedAt: Date;
  idempotencyKey: string;
  /** store even when the run already has a logged trial */
  repeat: boolean;
  observations: { name: string; value: number; unit: string }[];
  actor: string;
  now: Date;
}

export interface StoredObservation {
  id: string;
  trialId: string;
  name: string;
  value: number;
  unit: string;
  origin: string;
}

export interface StoredLogTrial {
  id: string;
  campaignId: string;
  runId: string;
  robotId: string | null;
  rigId: string | null;
  status: string;
  passed: boolean | null;
  failureReason: string;
  operator: string;
  notes: string;
  startedAt: Date;
  finishedAt: Date | null;
  idempotencyKey: string | null;
  version: number;
  createdAt: Date;
  observations: StoredObservation[];
}

export type LogOutcome = { kind: 'stored'; trial: StoredLogTrial } | { kind: 'exists' };

/** What the operator entered, in the shape both sides of a conflict are shown in. */
export interface LoggedValues {
  runId: string;
  status: string;
  passed: boolean | null;
  failureReason: string;
  notes: string;
  observations: Record<string, number>;
}

/** Version a trial has right after a combined log: 1 at start, +1 at finish. */
export const VERSION_AFTER_LOG = 2;

export function sentValues(w: Pick<LogWrite, 'runId' | 'status' | 'passed' | 'failureReason' | 'notes' | 'observations'>): LoggedValues {
  return {
    runId: w.runId,
    status: w.status,
    passed: w.passed,
    failureReason: w.failureReason,
    notes: w.notes,
    observations: Object.fromEntries(w.observations.map((o) => [o.name, o.value])),
  };
}

function runNotFound() {
  return invalidInput('runId', 'no such run in this campaign; pick a run from the queue');
}

function alreadyLogged(earlier: { id: string; version: number; stored: LoggedValues; amendments: unknown[] }, w: LogWrite) {
  return new DomainError('conflict', 'this run was already logged on another device; compare both versions, then keep theirs or store yours as a repeat trial', 'runId', {
    trialId: earlier.id,
    currentVersion: earlier.version,
    stored: earlier.stored,
    sent: sentValues(w),
    amendments: earlier.amendments,
  });
}

function auditAfter(w: LogWrite) {
  return {
    runId: w.runId,
    rigId: w.rigId ?? undefined,
    robotId: w.robotId ?? undefined,
    startedAt: w.startedAt,
    finishedAt: w.finishedAt,
    status: w.status,
    passed: w.passed,
    observations: Object.fromEntries(w.observations.map((o) => [o.name, o.value])),
  };
}

/** The audit action of a combined log entry. */
export const LOG_TRIAL_ACTION = 'log-trial';

// ---------------------------------------------------------------------------------------------------
// SQLite: prepared statements on Prisma's connection, inside a group commit.

/** DateTime as Prisma's better-sqlite3 adapter writes it (ISO 8601 with +00:00). */
const sqliteTime = (d: Date) => d.toISOString().replace('Z', '+00:00');

function prepareStatements(conn: SqliteConnection) {
  const p = (sql: string) => conn.prepare(sql).safeIntegers(false);
  return {
    keyStored: p('SELECT 1 AS found FROM "Trial" WHERE "idempotencyKey" = ?').pluck(),
    runInCampaign: p('SELECT 1 AS found FROM "Run" WHERE "id" = ? AND "campaignId" = ?').pluck(),
    earlier: p(
      `SELECT "id", "runId", "status", "passed", "failureReason", "notes", "version" FROM "Trial"
       WHERE "campaignId" = ? AND "runId" = ? AND "status" IN ('done', 'failed') ORDER BY "startedAt" DESC LIMIT 1`,
    ),
    observationsOf: p('SELECT "name", "value" FROM "Observation" WHERE "trialId" = ?'),
    amendmentsOf: p('SELECT "field", "oldValue", "newValue", "reason" FROM "Amendment" WHERE "trialId" = ?'),
    insertTrial: p(
      `INSERT INTO "Trial" ("id", "campaignId", "runId", "robotId", "rigId", "status", "passed", "failureReason", "operator",
        "notes", "startedAt", "finishedAt", "idempotencyKey", "version", "createdAt")
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    ),
    insertObservation: p('INSERT INTO "Observation" ("id", "trialId", "name", "value", "unit", "origin") VALUES (?, ?, ?, ?, ?, ?)'),
    insertAudit: p(
      'INSERT INTO "AuditEvent" ("id", "at", "actor", "action", "entity", "entityId", "beforeJson", "afterJson") VALUES (?, ?, ?, ?, ?, ?, ?, ?)',
    ),
  };
}

type Statements = ReturnType<typeof prepareStatements>;
const statementCache = new WeakMap<SqliteConnection, Statements>();

function statements(conn: SqliteConnection): Statements {
  let s = statementCache.get(conn);
  if (!s) {
    s = prepareStatements(conn);
    statementCache.set(conn, s);
  }
  return s;
}

/** One entry inside the group transaction (synchronous; a throw rolls back this entry only). */
function writeSqlite(conn: SqliteConnection, w: LogWrite): LogOutcome {
  const s = statements(conn);
  if (s.keyStored.get(w.idempotencyKey)) return { kind: 'exists' };
  if (!s.runInCampaign.get(w.runId, w.campaignId)) throw runNotFound();
  if (!w.repeat) {
    const earlier = s.earlier.get(w.campaignId, w.runId) as
      | { id: string; runId: string; status: string; passed: number | null; failureReason: string; notes: string; version: number }
      | undefined;
    if (earlier) {
      const observations = s.observationsOf.all(earlier.id) as { name: string; value: number }[];
      const stored: LoggedValues = {
        runId: earlier.runId,
        status: earlier.status,
        passed: earlier.passed === null ? null : earlier.passed !== 0,
        failureReason: earlier.failureReason,
        notes: earlier.notes,
        observations: Object.fromEntries(observations.map((o) => [o.name, o.value])),
      };
      throw alreadyLogged({ id: earlier.id, version: earlier.version, stored, amendments: s.amendmentsOf.all(earlier.id) }, w);
    }
  }
  const at = w.now.getTime();
  const trial: StoredLogTrial = {
    id: newRowId(at),
    campaignId: w.campaignId,
    runId: w.runId,
    robotId: w.robotId,
    rigId: w.rigId,
    status: w.status,
    passed: w.passed,
    failureReason: w.failureReason,
    operator: w.operator,
    notes: w.notes,
    startedAt: w.startedAt,
    finishedAt: w.finishedAt,
    idempotencyKey: w.idempotencyKey,
    version: VERSION_AFTER_LOG,
    createdAt: w.now,
    observations: [],
  };
  s.insertTrial.run(
    trial.id, trial.campaignId, trial.runId, trial.robotId, trial.rigId, trial.status,
    trial.passed === null ? null : trial.passed ? 1 : 0,
    trial.failureReason, trial.operator, trial.notes, sqliteTime(trial.startedAt), sqliteTime(w.finishedAt),
    trial.idempotencyKey, trial.version, sqliteTime(trial.createdAt),
  );
  for (const o of w.observations) {
    const obs: StoredObservation = { id: newRowId(at), trialId: trial.id, name: o.name, value: o.value, unit: o.unit, origin: 'typed' };
    s.insertObservation.run(obs.id, obs.trialId, obs.name, obs.value, obs.unit, obs.origin);
    trial.observations.push(obs);
  }
  s.insertAudit.run(newRowId(at), sqliteTime(w.now), w.actor, LOG_TRIAL_ACTION, 'trial', trial.id, null, JSON.stringify(auditAfter(w)));
  return { kind: 'stored', trial };
}

// ---------------------------------------------------------------------------------------------------
// PostgreSQL (and any database without the SQLite connection): one Prisma transaction per entry.

/** Many tablets at once queue for the connection pool: wait for a connection rather than fail. */
const PG_TRANSACTION_OPTIONS = { maxWait: 15_000, timeout: 15_000 };

async function writePrisma(w: LogWrite): Promise<LogOutcome> {
  const client = await db();
  try {
    return await client.$transaction(async (tx) => {
      if (await tx.trial.findUnique({ where: { idempotencyKey: w.idempotencyKey }, select: { id: true } })) return { kind: 'exists' } as const;
      if (!(await tx.run.findFirst({ where: { id: w.runId, campaignId: w.campaignId }, select: { id: true } }))) throw runNotFound();
      if (!w.repeat) {
        const earlier = await tx.trial.findFirst({
          where: { campaignId: w.campaignId, runId: w.runId, status: { in: ['done', 'failed'] } },
          orderBy: { startedAt: 'desc' },
          include: { observations: { select: { name: true, value: true } }, amendments: { select: { field: true, oldValue: true, newValue: true, reason: true } } },
        });
        if (earlier) {
          const stored: LoggedValues = {
            runId: earlier.runId,
            status: earlier.status,
            passed: earlier.passed,
            failureReason: earlier.failureReason,
            notes: earlier.notes,
            observations: Object.fromEntries(earlier.observations.map((o) => [o.name, o.value])),
          };
          throw alreadyLogged({ id: earlier.id, version: earlier.version, stored, amendments: earlier.amendments }, w);
        }
      }
      const trial = await tx.trial.create({
        data: {
          campaignId: w.campaignId,
          runId: w.runId,
          rigId: w.rigId,
          robotId: w.robotId,
          operator: w.operator,
          status: w.status,
          passed: w.passed,
          failureReason: w.failureReason,
          notes: w.notes,
          startedAt: w.startedAt,
          finishedAt: w.finishedAt,
          idempotencyKey: w.idempotencyKey,
          version: VERSION_AFTER_LOG,
          createdAt: w.now,
          observations: { create: w.observations.map((o) => ({ name: o.name, value: o.value, unit: o.unit, origin: 'typed' })) },
        },
        include: { observations: true },
      });
      await audit(tx, w.actor, LOG_TRIAL_ACTION, 'trial', trial.id, null, auditAfter(w));
      return { kind: 'stored', trial } as const;
    }, PG_TRANSACTION_OPTIONS);
  } catch (e) {
    // Two copies of one entry racing: the loser's unique key is the winner's trial.
    if (!(e instanceof DomainError) && (await client.trial.findUnique({ where: { idempotencyKey: w.idempotencyKey }, select: { id: true } }))) {
      return { kind: 'exists' };
    }
    throw e;
  }
}

// ---------------------------------------------------------------------------------------------------

/** Whether a trial with this idempotency key is stored (one indexed lookup). */
export async function keyIsStored(key: string): Promise<boolean> {
  const conn = await sqliteConnection();
  if (conn) return !!statements(conn).keyStored.get(key);
  const client = await db();
  return !!(await client.trial.findUnique({ where: { idempotencyKey: key }, select: { id: true } }));
}

/** Store one checked entry; resolves once it is durable (or refused). */
export async function storeLoggedTrial(w: LogWrite): Promise<LogOutcome> {
  const conn = await sqliteConnection();
  if (conn) return groupCommitter(conn).run((c) => writeSqlite(c, w));
  return writePrisma(w);
}

/** Group-commit counters of this process (SQLite), for tests and diagnostics. */
export async function logCommitStats() {
  const conn = await sqliteConnection();
  return conn ? { ...groupCommitter(conn).stats } : null;
}
