import 'server-only';
import { rowTime, runAtStoryTime } from '../db/clock';

/*
 * The time a write is recorded at. The application always records the server's own clock
 * (21 CFR 11.10(e): computer-generated time stamps). The demo seed tells stories that happened over
 * months, and replays them through the same write path as people do: it alone runs its steps inside
 * `recordedAt(date, ...)`, so history, audit entries, signatures and the records' own created_at and
 * updated_at (db/clock.ts) carry the story's dates. tests/unit/audit/backdating.test.ts keeps every
 * other caller out.
 */

/** Now, as the write path records it. */
export function now(): Date {
  return rowTime();
}

/** For scripts/seed only: runs `work` with the clock set to `at`. */
export function recordedAt<T>(at: Date, work: () => Promise<T>): Promise<T> {
  return runAtStoryTime(at, work);
}
