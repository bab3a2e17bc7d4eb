import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { type DemoSeedState, demoSeedState, seedCompletedKey, seedStartedKey } from '../seed/markers';
import { type Teardown, runForeground } from './processes';
import { StartError } from './util';

/*
 * Bringing a database up to date for the local stacks: the committed migrations and the app user's
 * grants (db/migrate.ts), then the demo (scripts/seed) when the database is empty. The seed runs in
 * a process of its own with the app's settings, because it writes through the app's own pool
 * (DATABASE_URL, the application user) as the product does; the test stack seeds two databases at
 * once that way. The imports of db/ are dynamic on purpose: callers load server-only-preload.mjs
 * first, because the migrations import app modules marked server-only.
 */

export type SeedOutcome = 'seeded' | 'kept' | 'reseeded';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
const seedScript = path.join(root, 'scripts', 'seed', 'index.ts');
const preload = path.join(root, 'scripts', 'services', 'server-only-preload.mjs');

export interface PrepareDatabaseOptions {
  adminUrl: string;
  appUrl: string;
  /** The environment the seed runs with: the app's settings, DATABASE_URL the app user's. */
  seedEnv: NodeJS.ProcessEnv;
  teardown: Teardown;
  /**
   * Drops and re-creates the (empty) database, for a demo whose seed stopped half-way. Without it,
   * such a database stops the start with an explanation instead.
   */
  recreateDatabase?: () => void;
  log?: (line: string) => void;
  /** Names the database in messages, e.g. ".data/demo/". */
  where?: string;
}

async function readSeedState(adminUrl: string): Promise<DemoSeedState> {
  const { connect } = await import('../../db/client');
  const { conn } = await connect(adminUrl);
  try {
    const [userRows] = await conn.query('SELECT COUNT(*) AS n FROM users');
    const [keyRows] = await conn.query('SELECT `key` FROM settings WHERE `key` IN (?, ?)', [seedStartedKey, seedCompletedKey]);
    const users = Number((userRows as { n: number | string }[])[0]?.n ?? 0);
    return demoSeedState(users, new Set((keyRows as { key: string }[]).map((r) => r.key)));
  } finally {
    await conn.end();
  }
}

async function runSeed(opts: PrepareDatabaseOptions): Promise<void> {
  const code = await runForeground(process.execPath, ['--import', 'tsx', '--import', preload, seedScript], { cwd: root, env: opts.seedEnv }, opts.teardown);
  if (code !== 0) {
    throw new StartError(
      `loading the demo data failed (exit ${code}; the reason is above). The database${opts.where ? ` in ${opts.where}` : ''} now holds part of the demo, ` +
        'which is never used: the next start loads it again from scratch.',
    );
  }
}

export async function prepareDatabase(opts: PrepareDatabaseOptions): Promise<SeedOutcome> {
  const { migrateDatabase } = await import('../../db/migrate');
  await migrateDatabase(opts.adminUrl, opts.appUrl);
  const state = await readSeedState(opts.adminUrl);
  if (state === 'complete' || state === 'not_demo') return 'kept';
  if (state === 'empty') {
    await runSeed(opts);
    return 'seeded';
  }
  if (!opts.recreateDatabase) {
    throw new StartError(
      `the database${opts.where ? ` in ${opts.where}` : ''} holds a demo whose loading stopped half-way (settings ${seedStartedKey} without ${seedCompletedKey}). ` +
        'Drop and re-create it, then start again.',
    );
  }
  opts.log?.('the demo data was only partly loaded last time (the seed stopped before it finished): loading it again from scratch ...');
  opts.recreateDatabase();
  await migrateDatabase(opts.adminUrl, opts.appUrl);
  await runSeed(opts);
  return 'reseeded';
}

/**
 * Fills a second migrated database with every row of the first (the test stack's browser database
 * from its seeded integration one): the same demo for the cost of a copy instead of a second seed.
 * Runs as root with foreign key checks off for the session, so the order of the tables does not
 * matter; the migrations' own rows (the audit chain's head) are replaced.
 */
export function copyDatabaseRows(rootSql: (sql: string) => string, from: string, to: string): void {
  const tables = rootSql(
    `SELECT table_name FROM information_schema.tables WHERE table_schema = '${from}' AND table_type = 'BASE TABLE' AND table_name <> '__drizzle_migrations'`,
  )
    .split('\n')
    .map((t) => t.trim())
    .filter(Boolean);
  const copy = tables.flatMap((t) => [`DELETE FROM \`${to}\`.\`${t}\``, `INSERT INTO \`${to}\`.\`${t}\` SELECT * FROM \`${from}\`.\`${t}\``]);
  rootSql(['SET FOREIGN_KEY_CHECKS = 0', ...copy, 'SET FOREIGN_KEY_CHECKS = 1'].join(';\n') + ';');
}

/** The migrations and grants alone, for a database that is filled another way. */
export async function migrateOnly(opts: { adminUrl: string; appUrl: string }): Promise<void> {
  const { migrateDatabase } = await import('../../db/migrate');
  await migrateDatabase(opts.adminUrl, opts.appUrl);
}
