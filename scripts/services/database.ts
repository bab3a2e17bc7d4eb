import { existsSync } from 'node:fs';
import path from 'node:path';

/*
 * Bringing a database up to date for the local stacks: the committed migrations and the app user's
 * grants (db/migrate.ts), then the demo scenario (db/seed) when the database has no users yet.
 * Callers must have loaded server-only-preload.mjs first: the seed imports app modules.
 */

export type SeedOutcome = 'seeded' | 'kept' | 'no-seed';

async function countUsers(adminUrl: string): Promise<number> {
  const { connect } = await import('../../db/client');
  const { conn } = await connect(adminUrl);
  try {
    const [rows] = await conn.query('SELECT COUNT(*) AS n FROM users');
    return Number((rows as { n: number | string }[])[0]?.n ?? 0);
  } finally {
    await conn.end();
  }
}

export async function prepareDatabase(opts: {
  root: string;
  adminUrl: string;
  appUrl: string;
  log: (line: string) => void;
}): Promise<SeedOutcome> {
  const { migrateDatabase } = await import('../../db/migrate');
  await migrateDatabase(opts.adminUrl, opts.appUrl);
  if ((await countUsers(opts.adminUrl)) > 0) return 'kept';

  const seedFile = path.join(opts.root, 'db', 'seed', 'index.ts');
  if (!existsSync(seedFile)) {
    opts.log('demo data NOT loaded: db/seed/index.ts does not exist yet; the database stays empty.');
    return 'no-seed';
  }
  const seedModule: unknown = await import(seedFile);
  const seedDemo = (seedModule as { seedDemo?: unknown }).seedDemo;
  if (typeof seedDemo !== 'function') {
    opts.log('demo data NOT loaded: db/seed/index.ts does not export seedDemo(adminDbUrl).');
    return 'no-seed';
  }
  await (seedDemo as (adminDbUrl: string) => Promise<void>)(opts.adminUrl);
  return 'seeded';
}
