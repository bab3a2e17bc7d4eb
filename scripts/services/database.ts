/*
 * Bringing a database up to date for the local stacks: the committed migrations and the app user's
 * grants (db/migrate.ts), then the demo scenario (scripts/seed) when the database has no users yet.
 * The imports are dynamic on purpose: callers load server-only-preload.mjs first, because the seed
 * imports app modules marked server-only.
 */

export type SeedOutcome = 'seeded' | 'kept';

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

export async function prepareDatabase(opts: { adminUrl: string; appUrl: string }): Promise<SeedOutcome> {
  const { migrateDatabase } = await import('../../db/migrate');
  await migrateDatabase(opts.adminUrl, opts.appUrl);
  if ((await countUsers(opts.adminUrl)) > 0) return 'kept';
  const { seedDemo } = await import('../seed/index');
  await seedDemo(opts.adminUrl);
  return 'seeded';
}
