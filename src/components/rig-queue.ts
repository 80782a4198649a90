'use client';
/**
 * The rig tablet's outbox: every logged trial is ONE entry (start + finish) kept in IndexedDB with a
 * key made on the tablet, sent to POST /api/v1/campaigns/{id}/trials/log with that key as
 * Idempotency-Key, and kept with its outcome: sent, waiting (no network), conflict (the server holds
 * a different version; both are kept to show) or refused (a reading the server will not take).
 */
import { postJson, type ApiError } from './api-client';

export interface LogBody {
  runId: string;
  rigId?: string;
  robotId?: string;
  operator: string;
  startedAt: string;
  finishedAt: string;
  observations: Record<string, number>;
  status: 'done' | 'failed';
  passed: boolean;
  failureReason: string;
  notes: string;
  repeat?: boolean;
}

export interface LoggedValues {
  runId: string;
  status: string;
  passed: boolean | null;
  failureReason: string;
  notes: string;
  observations: Record<string, number>;
}

export type EntryState = 'waiting' | 'sent' | 'conflict' | 'refused';

export interface QueueEntry {
  key: string;
  campaignId: string;
  rigId: string;
  runNumber: number;
  body: LogBody;
  state: EntryState;
  createdAt: string;
  attempts: number;
  trialId?: string;
  error?: ApiError;
  conflict?: { stored: LoggedValues; sent: LoggedValues; trialId: string; message: string };
  warnings?: { field: string; message: string }[];
}

const DB_NAME = 'saltus-rig';
const STORE = 'entries';

function openDb(): Promise<IDBDatabase> {
  return new Promise((resolve, reject) => {
    const req = indexedDB.open(DB_NAME, 1);
    req.onupgradeneeded = () => {
      if (!req.result.objectStoreNames.contains(STORE)) req.result.createObjectStore(STORE, { keyPath: 'key' });
    };
    req.onsuccess = () => resolve(req.result);
    req.onerror = () => reject(req.error);
  });
}

async function withStore<T>(mode: IDBTransactionMode, work: (store: IDBObjectStore) => IDBRequest<T>): Promise<T> {
  const db = await openDb();
  try {
    return await new Promise<T>((resolve, reject) => {
      const tx = db.transaction(STORE, mode);
      const req = work(tx.objectStore(STORE));
      tx.oncomplete = () => resolve(req.result);
      tx.onerror = () => reject(tx.error);
      tx.onabort = () => reject(tx.error);
    });
  } finally {
    db.close();
  }
}

export const saveEntry = (entry: QueueEntry) => withStore('readwrite', (s) => s.put(entry)).then(() => entry);
export const deleteEntry = (key: string) => withStore('readwrite', (s) => s.delete(key)).then(() => undefined);

/** Entries of one rig of one campaign, oldest first. */
export async function entriesOf(campaignId: string, rigId: string): Promise<QueueEntry[]> {
  const all = (await withStore('readonly', (s) => s.getAll())) as QueueEntry[];
  return all.filter((e) => e.campaignId === campaignId && e.rigId === rigId).sort((a, b) => (a.createdAt < b.createdAt ? -1 : a.createdAt > b.createdAt ? 1 : 0));
}

/** A key made on the tablet, unique per log entry. */
export function newEntryKey(): string {
  const c: Crypto | undefined = typeof crypto !== 'undefined' ? crypto : undefined;
  if (c && typeof c.randomUUID === 'function') return c.randomUUID();
  const bytes = new Uint8Array(16);
  c?.getRandomValues(bytes);
  return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('') + Date.now().toString(36);
}

/**
 * Send one entry; answers the entry with its new state (not yet saved). No network, or a server
 * error, leaves it waiting; a refused reading marks it refused; a 409 keeps both versions.
 */
export async function sendEntry(entry: QueueEntry): Promise<QueueEntry> {
  const res = await postJson<{ trial: { id: string }; warnings?: { field: string; message: string }[]; replayed: boolean }>(
    `/api/v1/campaigns/${entry.campaignId}/trials/log`,
    entry.body,
    { 'Idempotency-Key': entry.key },
  );
  const attempts = entry.attempts + 1;
  if (res.ok) return { ...entry, attempts, state: 'sent', trialId: res.data.trial.id, warnings: res.data.warnings ?? [], error: undefined };
  if (res.status === 0 || res.status >= 500) return { ...entry, attempts, state: 'waiting', error: res.error };
  if (res.status === 409) {
    const d = res.error.details as { stored?: LoggedValues; sent?: LoggedValues; trialId?: string } | undefined;
    if (d?.stored && d.sent) return { ...entry, attempts, state: 'conflict', error: res.error, conflict: { stored: d.stored, sent: d.sent, trialId: d.trialId ?? '', message: res.error.message } };
  }
  return { ...entry, attempts, state: 'refused', error: res.error };
}

/** Wait before the n-th retry of a waiting queue: 2, 4, 8 … s, at most 60 s. */
export function retryDelayMs(attempt: number): number {
  return Math.min(60_000, 2000 * 2 ** Math.max(0, attempt));
}
