/**
 * Storage of one checked rig-log entry: the trial (already finished), its observations and its audit
 * event, in one transaction. On SQLite the entry runs as prepared statements on Prisma's own
 * connection inside a group commit (entries that arrive together share one transaction and one WAL
 * sync; each is answered after that commit). On PostgreSQL it is one SQL statement per entry (a
 * data-modifying WITH query: one round trip, atomic in autocommit; the server groups concurrent
 * commits itself). Both answer the same outcomes:
 *   - stored: the trial as written (with observations);
 *   - exists: a trial with this idempotency key is already stored (the caller answers it as a replay);
 *   - a DomainError: the run is not in the campaign, or (without `repeat`) the run was already logged.
 */
import { DomainError, invalidInput } from '@/domain/errors';
import { db, sqliteConnection, type SqliteConnection } from '@/server/db/client';
import { groupCommitter } from '@/server/db/group-commit';
import { newRowId } from '@/server/db/ids';

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

/** The trial and observations of an entry as both databases store and answer them (ids made here). */
function newTrial(w: LogWrite): StoredLogTrial {
  const at = w.now.getTime();
  const id = newRowId(at);
  return {
    id,
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
    observations: w.observations.map((o) => ({ id: newRowId(at), trialId: id, name: o.name, value: o.value, unit: o.unit, origin: 'typed' })),
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
  const trial = newTrial(w);
  s.insertTrial.run(
    trial.id, trial.campaignId, trial.runId, trial.robotId, trial.rigId, trial.status,
    trial.passed === null ? null : trial.passed ? 1 : 0,
    trial.failureReason, trial.operator, trial.notes, sqliteTime(trial.startedAt), sqliteTime(w.finishedAt),
    trial.idempotencyKey, trial.version, sqliteTime(trial.createdAt),
  );
  for (const o of trial.observations) s.insertObservation.run(o.id, o.trialId, o.name, o.value, o.unit, o.origin);
  s.insertAudit.run(newRowId(w.now.getTime()), sqliteTime(w.now), w.actor, LOG_TRIAL_ACTION, 'trial', trial.id, null, JSON.stringify(auditAfter(w)));
  return { kind: 'stored', trial };
}

// ---------------------------------------------------------------------------------------------------
// PostgreSQL (and any database without the SQLite connection): one SQL statement per entry.

/** Timestamp parameter: an ISO 8601 instant stored as UTC in a timestamp(3) column, as Prisma stores DateTime. */
const pgTime = (n: number) => `($${n}::timestamptz AT TIME ZONE 'UTC')::timestamp(3)`;

/**
 * The whole entry as one data-modifying statement (atomic on its own in autocommit, one round trip).
 * The trial is inserted only when no trial holds the key, the run is in the campaign and (without
 * `repeat`) the run has no finished trial yet; observations and the audit event only with the trial.
 * A copy of the entry inserting the same key at the same moment makes the insert do nothing (the
 * unique index on the key waits for it). The inserts of the WITH parts run whether or not the final
 * SELECT reads them; its one row answers which of the conditions held and whether the trial went in.
 */
const PG_LOG_STATEMENT = `
WITH known AS (
  SELECT 1 FROM "Trial" WHERE "idempotencyKey" = $13
), run AS (
  SELECT 1 FROM "Run" WHERE "id" = $3 AND "campaignId" = $2
), earlier AS (
  SELECT "id" FROM "Trial"
  WHERE NOT $16::boolean AND "campaignId" = $2 AND "runId" = $3 AND "status" IN ('done', 'failed')
  ORDER BY "startedAt" DESC LIMIT 1
), trial AS (
  INSERT INTO "Trial" ("id", "campaignId", "runId", "robotId", "rigId", "status", "passed", "failureReason", "operator",
    "notes", "startedAt", "finishedAt", "idempotencyKey", "version", "createdAt")
  SELECT $1, $2, $3, $4, $5, $6, $7::boolean, $8, $9, $10, ${pgTime(11)}, ${pgTime(12)}, $13, $14::integer, ${pgTime(15)}
  FROM run
  WHERE NOT EXISTS (SELECT 1 FROM known) AND NOT EXISTS (SELECT 1 FROM earlier)
  ON CONFLICT ("idempotencyKey") DO NOTHING
  RETURNING "id"
), observations AS (
  INSERT INTO "Observation" ("id", "trialId", "name", "value", "unit", "origin")
  SELECT o.id, trial."id", o.name, o.value, o.unit, 'typed'
  FROM trial, unnest($17::text[], $18::text[], $19::double precision[], $20::text[]) AS o(id, name, value, unit)
), event AS (
  INSERT INTO "AuditEvent" ("id", "at", "actor", "action", "entity", "entityId", "beforeJson", "afterJson")
  SELECT $21, ${pgTime(15)}, $22, $23, 'trial', trial."id", NULL, $24 FROM trial
)
SELECT EXISTS (SELECT 1 FROM known) AS "known",
  EXISTS (SELECT 1 FROM run) AS "runFound",
  (SELECT "id" FROM earlier) AS "earlierId",
  (SELECT count(*) FROM trial)::integer AS "stored"`;

interface PgLogRow {
  known: boolean;
  runFound: boolean;
  earlierId: string | null;
  stored: number;
}

/**
 * Entries without `repeat` for one run wait for each other in this process: the statement sees the
 * trials committed before it began, so two entries for one run racing each other would both find it
 * unlogged and both be stored. Entries sent to two different app servers at the same moment still can.
 */
const runTurns = new Map<string, Promise<unknown>>();

function inTurn<T>(runId: string, fn: () => Promise<T>): Promise<T> {
  const result = (runTurns.get(runId) ?? Promise.resolve()).then(fn);
  const settled = result.catch(() => undefined);
  runTurns.set(runId, settled);
  void settled.then(() => {
    if (runTurns.get(runId) === settled) runTurns.delete(runId);
  });
  return result;
}

async function writePrisma(w: LogWrite): Promise<LogOutcome> {
  const client = await db();
  const trial = newTrial(w);
  const iso = (d: Date) => d.toISOString();
  const [row] = await client.$queryRawUnsafe<PgLogRow[]>(
    PG_LOG_STATEMENT,
    trial.id, trial.campaignId, trial.runId, trial.robotId, trial.rigId, trial.status, trial.passed,
    trial.failureReason, trial.operator, trial.notes, iso(trial.startedAt), iso(w.finishedAt), trial.idempotencyKey,
    trial.version, iso(trial.createdAt), w.repeat,
    trial.observations.map((o) => o.id), trial.observations.map((o) => o.name),
    trial.observations.map((o) => o.value), trial.observations.map((o) => o.unit),
    newRowId(w.now.getTime()), w.actor, LOG_TRIAL_ACTION, JSON.stringify(auditAfter(w)),
  );
  if (!row || row.known) return { kind: 'exists' };
  if (!row.runFound) throw runNotFound();
  if (row.earlierId !== null) {
    const earlier = await client.trial.findUnique({
      where: { id: row.earlierId },
      include: { observations: { select: { name: true, value: true } }, amendments: { select: { field: true, oldValue: true, newValue: true, reason: true } } },
    });
    // Deleted since the statement looked (the campaign removed): try the entry again.
    if (!earlier) return writePrisma(w);
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
  // Nothing inserted although the run is there and unlogged: a copy of this entry stored the key first.
  if (row.stored === 0) return { kind: 'exists' };
  return { kind: 'stored', trial };
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
  return w.repeat ? writePrisma(w) : inTurn(w.runId, () => writePrisma(w));
}

/** Group-commit counters of this process (SQLite), for tests and diagnostics. */
export async function logCommitStats() {
  const conn = await sqliteConnection();
  return conn ? { ...groupCommitter(conn).stats } : null;
}
