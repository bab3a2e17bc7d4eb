import { drizzle } from 'drizzle-orm/mysql2';
import mysql from 'mysql2/promise';
import { getEnv } from '../config/env';
import * as schema from './schema';

/*
 * One pool per process. Times travel as UTC (the server runs at +00:00 and the driver is told 'Z').
 * Kept on globalThis so a development reload does not open a second pool.
 */

function createDb(url: string) {
  const pool = mysql.createPool({
    uri: url,
    timezone: 'Z',
    connectionLimit: 10,
    decimalNumbers: false,
    supportBigNumbers: true,
  });
  return { pool, db: drizzle(pool, { schema, mode: 'default' }) };
}

type Holder = ReturnType<typeof createDb>;
const g = globalThis as unknown as { __plumblineDb?: Holder };

function holder(): Holder {
  g.__plumblineDb ??= createDb(getEnv().DATABASE_URL);
  return g.__plumblineDb;
}

export type Db = Holder['db'];
export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
/** Either the pool-level database or a transaction: query helpers in db/queries accept both. */
export type DbOrTx = Db | Tx;

export const db: Db = new Proxy({} as Db, {
  get(_target, prop) {
    const real = holder().db as unknown as Record<string | symbol, unknown>;
    const value = real[prop];
    return typeof value === 'function' ? (value as (...a: unknown[]) => unknown).bind(real) : value;
  },
});

export async function closeDb(): Promise<void> {
  const h = g.__plumblineDb;
  g.__plumblineDb = undefined;
  await h?.pool.end();
}

/** A separate connection for scripts and tests that need one of their own (e.g. the admin user). */
export async function connect(url: string) {
  const conn = await mysql.createConnection({ uri: url, timezone: 'Z', multipleStatements: false });
  return { conn, db: drizzle(conn, { schema, mode: 'default' }) };
}
