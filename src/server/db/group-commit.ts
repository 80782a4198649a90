/**
 * Group commit on the SQLite connection: units of work that arrive together are written in ONE
 * transaction (one WAL sync) and each is answered only after that commit. Every unit runs under its
 * own savepoint, so a unit that throws (a refused entry) is rolled back and answered alone while the
 * others commit. Units are synchronous (better-sqlite3), so a batch never interleaves with other work
 * of the process; a batch waits while a Prisma transaction is open on the same connection.
 */
import type { SqliteConnection } from './client';

interface Unit {
  work: (conn: SqliteConnection) => unknown;
  resolve: (value: unknown) => void;
  reject: (error: unknown) => void;
}

export interface GroupCommitStats {
  /** transactions committed */
  commits: number;
  /** units committed or answered */
  units: number;
  /** largest batch so far */
  largestBatch: number;
}

export class GroupCommitter {
  private queue: Unit[] = [];
  private scheduled = false;
  readonly stats: GroupCommitStats = { commits: 0, units: 0, largestBatch: 0 };

  constructor(
    private readonly conn: SqliteConnection,
    private readonly maxBatch = 256,
  ) {}

  /** Runs `work` inside the next group transaction; resolves after that transaction is on disk. */
  run<T>(work: (conn: SqliteConnection) => T): Promise<T> {
    return new Promise<T>((resolve, reject) => {
      this.queue.push({ work, resolve: resolve as (v: unknown) => void, reject });
      this.schedule(false);
    });
  }

  private schedule(later: boolean): void {
    if (this.scheduled) return;
    this.scheduled = true;
    const go = () => {
      this.scheduled = false;
      this.flush();
    };
    // setImmediate lets every request already read from the sockets join this batch.
    if (later) setTimeout(go, 1);
    else setImmediate(go);
  }

  private flush(): void {
    if (this.queue.length === 0) return;
    if (!this.conn.open) {
      for (const u of this.queue.splice(0)) u.reject(new Error('the database connection is closed'));
      return;
    }
    if (this.conn.inTransaction) {
      // A Prisma transaction is open on this connection: our statements must not join it.
      this.schedule(true);
      return;
    }
    const batch = this.queue.splice(0, this.maxBatch);
    const results: { ok: boolean; value: unknown }[] = [];
    try {
      this.conn.exec('BEGIN IMMEDIATE');
    } catch (e) {
      for (const u of batch) u.reject(e);
      if (this.queue.length) this.schedule(false);
      return;
    }
    try {
      for (const unit of batch) {
        this.conn.exec('SAVEPOINT log_entry');
        try {
          const value = unit.work(this.conn);
          this.conn.exec('RELEASE log_entry');
          results.push({ ok: true, value });
        } catch (e) {
          this.conn.exec('ROLLBACK TO log_entry');
          this.conn.exec('RELEASE log_entry');
          results.push({ ok: false, value: e });
        }
      }
      this.conn.exec('COMMIT');
    } catch (e) {
      // The transaction itself failed (disk full, I/O error): nothing of the batch is stored.
      if (this.conn.inTransaction) {
        try {
          this.conn.exec('ROLLBACK');
        } catch {
          /* the rollback failed too; the connection reports the first error */
        }
      }
      for (const u of batch) u.reject(e);
      if (this.queue.length) this.schedule(false);
      return;
    }
    this.stats.commits++;
    this.stats.units += batch.length;
    this.stats.largestBatch = Math.max(this.stats.largestBatch, batch.length);
    batch.forEach((u, i) => (results[i]!.ok ? u.resolve(results[i]!.value) : u.reject(results[i]!.value)));
    if (this.queue.length) this.schedule(false);
  }
}

const holder = globalThis as unknown as { saltusGroupCommit?: { conn: SqliteConnection; committer: GroupCommitter } };

/** The process's group committer for this connection (a new connection gets a new one). */
export function groupCommitter(conn: SqliteConnection): GroupCommitter {
  if (holder.saltusGroupCommit?.conn !== conn) holder.saltusGroupCommit = { conn, committer: new GroupCommitter(conn) };
  return holder.saltusGroupCommit.committer;
}
