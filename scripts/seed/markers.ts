/*
 * How far a demo seed got, as settings rows: the first is written before anything else, the second
 * after everything else. The seed runs as many transactions (the write path's), so a database with
 * the first and not the second holds a demo that stopped half-way; scripts/services/database.ts
 * never starts the app on one. No imports, so the start scripts can read it before loading lib/.
 */

export const seedStartedKey = 'demo_seed_started_at';
export const seedCompletedKey = 'demo_seed_completed_at';

export type DemoSeedState =
  /** No users and no seed: load the demo. */
  | 'empty'
  /** The demo, complete. */
  | 'complete'
  /** A seed started and did not finish. */
  | 'partial'
  /** Users, and no demo seed ever ran: a site's own data (or a demo from before the markers existed). */
  | 'not_demo';

export function demoSeedState(users: number, keys: ReadonlySet<string>): DemoSeedState {
  if (keys.has(seedStartedKey)) return keys.has(seedCompletedKey) ? 'complete' : 'partial';
  return users > 0 ? 'not_demo' : 'empty';
}
