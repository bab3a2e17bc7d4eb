import type { Connection } from 'mysql2/promise';

/*
 * The application's database user gets exactly what it needs, table by table. The audit trail, the
 * signatures, state history and published risk scale versions are append-only for real
 * (21 CFR 11.10(e)): INSERT and SELECT, no UPDATE, no DELETE.
 * Records are never deleted either; the few link tables an editor may untick get DELETE.
 */

export const appendOnlyTables = ['audit_entries', 'signatures', 'state_history', 'risk_scale_versions', 'risk_scale_levels'] as const;
const deletableTables = new Set(['deviation_batches']);
const readOnlyTables = new Set(['__drizzle_migrations']);

/** Hosts the app user may exist for; hosts where it does not exist are skipped (MariaDB error 1133). */
const hosts = ['%', '127.0.0.1', 'localhost'];

export async function applyGrants(conn: Connection, database: string, appUser: string): Promise<void> {
  const [rows] = await conn.query(
    'SELECT table_name AS name FROM information_schema.tables WHERE table_schema = ? AND table_type = ?',
    [database, 'BASE TABLE'],
  );
  let granted = 0;
  for (const host of hosts) {
    const who = `${conn.escape(appUser)}@${conn.escape(host)}`;
    for (const { name } of rows as { name: string }[]) {
      const table = `\`${database}\`.\`${name}\``;
      let privileges = 'SELECT, INSERT, UPDATE';
      if ((appendOnlyTables as readonly string[]).includes(name)) privileges = 'SELECT, INSERT';
      else if (readOnlyTables.has(name)) privileges = 'SELECT';
      else if (deletableTables.has(name)) privileges += ', DELETE';
      // Revoke first so a privilege granted by hand earlier does not survive a re-run.
      await conn.query(`REVOKE ALL PRIVILEGES ON ${table} FROM ${who}`).catch(() => undefined);
      try {
        await conn.query(`GRANT ${privileges} ON ${table} TO ${who}`);
      } catch (err) {
        if ((err as { errno?: number }).errno === 1133) break;
        throw err;
      }
      granted++;
    }
  }
  if (granted === 0) throw new Error(`database user ${appUser} does not exist; create it before migrating`);
}
