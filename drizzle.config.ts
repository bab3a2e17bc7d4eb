import { defineConfig } from 'drizzle-kit';

// Generation only (drizzle-kit generate needs no database). Migrations are applied by db/migrate.ts.
export default defineConfig({
  dialect: 'mysql',
  schema: './db/schema/index.ts',
  out: './drizzle',
  casing: 'snake_case',
});
