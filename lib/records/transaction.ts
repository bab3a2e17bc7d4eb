import 'server-only';
import { setTimeout as sleep } from 'node:timers/promises';
import { db, type Tx } from '../../db/client';
import { deferAudit, flushDeferredAudit } from '../audit';

/*
 * The transaction every record write runs in. Two things make concurrent writers safe:
 *
 * - Locks in one order, the serialised ones last: the record row first (FOR UPDATE), then its child
 *   rows, then a record counter when a number is given, and the audit-chain head only as the last
 *   statement before commit (lib/audit defers the entries until then).
 * - A transaction the database aborted to break a deadlock (1213) or that waited too long for a lock
 *   (1205) is run again from the start, a bounded number of times with jittered back-off. Everything
 *   a write does (record, history, audit entries, signature, outbox rows, a spent link token) is in
 *   the transaction, so a rolled-back attempt leaves nothing behind and the retry cannot send mail,
 *   write an audit entry or spend a token twice. After-commit effects run once, after the attempt
 *   that committed. Password checks happen before, outside, once.
 */

const retriedErrnos = new Set([1213, 1205]);
export const maxWriteAttempts = 6;

function errnoOf(err: unknown): number | undefined {
  const e = err as { errno?: number; cause?: { errno?: number } } | null;
  return e?.cause?.errno ?? e?.errno;
}

export function isRetriableWriteConflict(err: unknown): boolean {
  const errno = errnoOf(err);
  return errno !== undefined && retriedErrnos.has(errno);
}

export interface WriteTransactionStats {
  /** Attempts the database aborted and this module ran again, since the process started. */
  retries: number;
}

export const writeTransactionStats: WriteTransactionStats = { retries: 0 };

export async function writeTransaction<T>(work: (tx: Tx) => Promise<T>): Promise<T> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await db.transaction(async (tx) => {
        deferAudit(tx);
        const result = await work(tx);
        await flushDeferredAudit(tx);
        return result;
      });
    } catch (err) {
      if (attempt >= maxWriteAttempts || !isRetriableWriteConflict(err)) throw err;
      writeTransactionStats.retries++;
      // 5, 10, 20, 40, 80 ms ceilings, each drawn at random below it, so the same writers do not meet again.
      await sleep(Math.random() * 5 * 2 ** (attempt - 1));
    }
  }
}
