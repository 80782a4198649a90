/**
 * Row ids made in the server for rows written without Prisma (the trial-log hot path): 25 lowercase
 * letters and digits beginning with "c" — time, a per-process counter and 60 random bits — the same
 * shape as the ids Prisma makes, so both kinds sort and read alike.
 */
import { randomBytes } from 'node:crypto';

let counter = 0;

export function newRowId(now = Date.now()): string {
  counter = (counter + 1) % 36 ** 4;
  const time = now.toString(36).padStart(8, '0').slice(-8);
  const count = counter.toString(36).padStart(4, '0');
  const random = randomBytes(8).readBigUInt64BE().toString(36).padStart(13, '0').slice(-12);
  return `c${time}${count}${random}`;
}
