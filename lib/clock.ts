import 'server-only';
import { AsyncLocalStorage } from 'node:async_hooks';
import { installRowClock } from '../db/clock';

/*
 * The time a write is recorded at. The application always records the server's own clock
 * (21 CFR 11.10(e): computer-generated time stamps). The demo seed tells stories that happened over
 * months, and replays them through the same write path as people do: it alone runs its steps inside
 * `recordedAt(date, ...)`, so history, audit entries, signatures and the records' own created_at and
 * updated_at (db/clock.ts) carry the story's dates. tests/unit/audit/backdating.test.ts keeps every
 * other caller out.
 */

const storyTime = new AsyncLocalStorage<{ at: number; startedAt: number }>();

/** Now, as the write path records it. */
export function now(): Date {
  const story = storyTime.getStore();
  // Inside a story the clock still runs, so the steps of one story keep their order in time.
  return story ? new Date(story.at + (Date.now() - story.startedAt)) : new Date();
}

installRowClock(now);

/** For scripts/seed only: runs `work` with the clock set to `at`. */
export function recordedAt<T>(at: Date, work: () => Promise<T>): Promise<T> {
  return storyTime.run({ at: at.getTime(), startedAt: Date.now() }, work);
}
