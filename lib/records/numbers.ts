import 'server-only';
import { sql } from 'drizzle-orm';
import type { Tx } from '../../db/client';
import { ValidationError } from '../errors';
import { formatRecordNumber } from './number-format';
import { numberPrefixes, type NumberedRecordType } from './types';

export { formatRecordNumber, parseRecordNumber } from './number-format';

/*
 * Human record numbers, gap-free per prefix and year. The counter row is bumped with
 * LAST_INSERT_ID(expr), which hands the new value back on this connection only, and stays locked
 * until the creating transaction ends: concurrent creations queue on it, and a creation that
 * rolls back gives its number back to the next one.
 */

export async function allocateNumber(tx: Tx, type: NumberedRecordType, year: number): Promise<string> {
  if (!Number.isInteger(year) || year < 2000 || year > 9999) {
    throw new ValidationError(`Record numbers need a four-digit year, not ${year}.`);
  }
  const prefix = numberPrefixes[type];
  await tx.execute(
    sql`INSERT INTO record_counters (prefix, year, last_value) VALUES (${prefix}, ${year}, LAST_INSERT_ID(1))
        ON DUPLICATE KEY UPDATE last_value = LAST_INSERT_ID(last_value + 1)`,
  );
  const [rows] = (await tx.execute(sql`SELECT LAST_INSERT_ID() AS value`)) as unknown as [{ value: number | string }[]];
  const value = Number(rows[0]?.value);
  if (!Number.isInteger(value) || value < 1) throw new Error(`record counter ${prefix}-${year} returned ${String(value)}`);
  return formatRecordNumber(prefix, year, value);
}
