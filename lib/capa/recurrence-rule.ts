/*
 * Whether a recurrence criterion is met, from the counts lib/capa/recurrence.ts reads. Pure, so the
 * rule is tested without a database and the page can word the result.
 *
 * The rule: any recurrence since the actions were completed fails the criterion at once (the actions
 * did not stop it); with none, the criterion is met once the period has run — every span it names
 * (batches, days) reached — and pending until then. Before the actions are completed nothing is
 * counted and the result is pending.
 */

export interface RecurrenceTarget {
  batches: number | null;
  days: number | null;
}

export interface RecurrenceCounts {
  /** When the actions were completed (ISO 8601, UTC); null while any is open. */
  since: string | null;
  recurrences: number;
  batchesSince: number;
  daysSince: number;
}

export type RecurrenceVerdict = boolean | 'pending';

export function recurrenceVerdict(counts: RecurrenceCounts, target: RecurrenceTarget): RecurrenceVerdict {
  if (counts.since === null) return 'pending';
  if (counts.recurrences > 0) return false;
  const batchesDone = target.batches === null || counts.batchesSince >= target.batches;
  const daysDone = target.days === null || counts.daysSince >= target.days;
  return batchesDone && daysDone ? true : 'pending';
}

const dayMs = 86_400_000;

/** Whole days from `since` to `now`, never negative. */
export function wholeDaysBetween(sinceIso: string, now: Date): number {
  return Math.max(0, Math.floor((now.getTime() - Date.parse(sinceIso)) / dayMs));
}

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

/**
 * The sentence shown beside the criterion, e.g. "0 broken-body deviations on Filler 2 over 14 of 20
 * batches". `what` names the defect and `where` the machine or ring.
 */
export function describeRecurrence(
  counts: RecurrenceCounts,
  target: RecurrenceTarget,
  what: string,
  where: string,
): string {
  if (counts.since === null) return `Counting starts when every action is completed (${what} deviations on ${where}).`;
  const spans: string[] = [];
  if (target.batches !== null) spans.push(`${counts.batchesSince} of ${plural(target.batches, 'batch', 'batches')}`);
  if (target.days !== null) spans.push(`${counts.daysSince} of ${plural(target.days, 'day')}`);
  const over = spans.length > 0 ? ` over ${spans.join(' and ')}` : '';
  return `${plural(counts.recurrences, `${what} deviation`)} on ${where}${over} since ${counts.since.slice(0, 10)}`;
}
