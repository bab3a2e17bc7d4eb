/*
 * The time rows are stamped with: created_at and updated_at default to it (db/schema/columns.ts),
 * so a record's own columns agree with the history, audit entries and signatures the write path
 * stamps with lib/clock.ts's now(). That clock lives in lib/ (it knows the demo seed's story time)
 * and installs itself here when it loads: db/ imports nothing from lib/, and the schema's enums
 * also reach the pages' bundles, where nothing may pull in Node's async hooks. Until it is
 * installed, and everywhere but the seed, it is the server's clock.
 */

let clock: () => Date = () => new Date();

export function rowTime(): Date {
  return clock();
}

/** For lib/clock.ts only (tests/unit/audit/backdating.test.ts keeps every other caller out). */
export function installRowClock(read: () => Date): void {
  clock = read;
}
