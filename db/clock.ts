import { AsyncLocalStorage } from 'node:async_hooks';

/*
 * The time rows are stamped with. created_at and updated_at default to it (db/schema/columns.ts)
 * and lib/clock.ts's now() reads it for everything the write path records, so a record's own
 * columns agree with its history, audit entries and signatures. Everywhere but the demo seed it is
 * the server's clock. It lives here, below lib/, because the schema needs it and db/ imports
 * nothing from lib/.
 */

interface StoryTime {
  at: number;
  startedAt: number;
}

const storyTime = new AsyncLocalStorage<StoryTime>();

export function rowTime(): Date {
  const story = storyTime.getStore();
  // Inside a story the clock still runs, so the steps of one story keep their order in time.
  return story ? new Date(story.at + (Date.now() - story.startedAt)) : new Date();
}

/**
 * For lib/clock.ts's recordedAt only (tests/unit/audit/backdating.test.ts keeps every other caller
 * out): runs `work` with the clock set to `at`.
 */
export function runAtStoryTime<T>(at: Date, work: () => Promise<T>): Promise<T> {
  return storyTime.run({ at: at.getTime(), startedAt: Date.now() }, work);
}
