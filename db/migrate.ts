import { migrate } from 'drizzle-orm/mysql2/migrator';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { getEnv } from '../config/env';
import { connect } from './client';
import { applyGrants } from './grants';

/*
 * Applies the committed migrations in drizzle/ as the admin user, then hands the app user its
 * table grants. Opens its own connection. Run: npm run db:migrate
 */

export async function migrateDatabase(adminUrl: string, appUrl: string): Promise<void> {
  const { conn, db } = await connect(adminUrl);
  try {
    const here = path.dirname(fileURLToPath(import.meta.url));
    await migrate(db, { migrationsFolder: path.join(here, '..', 'drizzle') });
    const app = new URL(appUrl);
    const database = new URL(adminUrl).pathname.slice(1);
    await applyGrants(conn, database, decodeURIComponent(app.username));
  } finally {
    await conn.end();
  }
}

if (process.argv[1] && fileURLToPath(import.meta.url) === path.resolve(process.argv[1])) {
  const env = getEnv();
  migrateDatabase(env.DATABASE_ADMIN_URL ?? env.DATABASE_URL, env.DATABASE_URL)
    .then(() => console.log('migrations applied'))
    .catch((err) => {
      console.error(err instanceof Error ? err.message : err);
      process.exit(1);
    });
}
