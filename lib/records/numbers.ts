import 'server-only';
import { and, eq, sql } from 'drizzle-orm';
import { connect, type Tx } from '../../db/client';
import { recordCounters } from '../../db/schema';
import { getEnv } from '../env';
import { ValidationError } from '../errors';
import { formatRecordNumber } from './number-format';
import { numberPrefixes, type NumberedRecordType } from './types';

export { formatRecordNumber, parseRecordNumber } from './number-format';

/*
 * Human record numbers, gap-free per prefix and year. The counter row is bumped with
 * LAST_INSERT_ID(expr), which hands the new value back on this connection only, and stays locked
 * until the creating transaction ends: concurrent creations queue on it, and a creation that
 * rolls back gives its number back to the next one. A number is allocated after the record's own
 * row is locked and before the audit-chain head (lib/records/transaction.ts), always in that order.
 *
 * The first number of a year needs the row to exist. If the creating transaction inserted it and
 * then rolled back, the transactions queued behind it would deadlock on the vanished row (InnoDB
 * gives every waiter a shared lock, then each wants it exclusive). So a missing row is created at
 * 0 on a connection of its own, committed at once, before this transaction bumps it.
 */

async function ensureCounterRow(tx: Tx, prefix: string, year: number): Promise<void> {
  // A plain read takes no lock, so it cannot block the insert below.
  const [row] = await tx
    .select({ prefix: recordCounters.prefix })
    .from(recordCounters)
    .where(and(eq(recordCounters.prefix, prefix), eq(recordCounters.year, year)));
  if (row) return;
  // Not from the pool: a transaction waiting for a second pool connection could starve the pool.
  const { conn } = await connect(getEnv().DATABASE_URL);
  try {
    await conn.query('INSERT IGNORE INTO record_counters (prefix, year, last_value) VALUES (?, ?, 0)', [prefix, year]);
  } finally {
    await conn.end();
  }
}

export async function allocateNumber(tx: Tx, type: NumberedRecordType, year: number): Promise<string> {
  if (!Number.isInteger(year) || year < 2000 || year > 9999) {
    throw new ValidationError(`Record numbers need a four-digit year, not ${year}.`);
  }
  const prefix = numberPrefixes[type];
  await ensureCounterRow(tx, prefix, year);
  // A plain UPDATE takes the row's exclusive lock at once (an upsert would take a shared one first).
  await tx.execute(
    sql`UPDATE record_counters SET last_value = LAST_INSERT_ID(last_value + 1) WHERE prefix = ${prefix} AND year = ${year}`,
  );
  const [rows] = (await tx.execute(sql`SELECT LAST_INSERT_ID() AS value`)) as unknown as [{ value: number | string }[]];
  const value = Number(rows[0]?.value);
  if (!Number.isInteger(value) || value < 1) throw new Error(`record counter ${prefix}-${year} returned ${String(value)}`);
  return formatRecordNumber(prefix, year, value);
}
