import { type IsoDate, daysBetween } from '../clocks/dates';

/*
 * When a due date earns a reminder. Pure, so the edges (the last day, midnight in the site's time
 * zone, a due date moved) are tested without a clock or a database.
 *
 * - "due soon": once per item and due date, from three days before the due date to the day itself
 *   (a moved due date is a new date and earns a new reminder);
 * - "overdue": once per item and site day after the due date has passed.
 * The de-duplication key carries exactly that, so any number of workers, running as often as they
 * like, queue each message once (the outbox ignores a key it already holds).
 */

export const dueSoonDays = 3;

export type ReminderKind = 'due_soon' | 'overdue';

export interface ReminderDecision {
  kind: ReminderKind;
  /** Whole days until the due date (negative when overdue), counted in site days. */
  daysLeft: number;
  dedupeKey: string;
}

export function reminderFor(input: {
  /** e.g. "deviation:42" or "capa_action:7". */
  itemKey: string;
  dueOn: IsoDate;
  /** The calendar day it is now at the site. */
  today: IsoDate;
  recipientId: number;
}): ReminderDecision | null {
  const daysLeft = daysBetween(input.today, input.dueOn);
  if (daysLeft < 0) {
    return { kind: 'overdue', daysLeft, dedupeKey: `overdue:${input.itemKey}:${input.today}:${input.recipientId}` };
  }
  if (daysLeft <= dueSoonDays) {
    return { kind: 'due_soon', daysLeft, dedupeKey: `due-soon:${input.itemKey}:${input.dueOn}:${input.recipientId}` };
  }
  return null;
}

/** "due today", "due tomorrow", "due in 3 days", "1 day overdue", "12 days overdue". */
export function describeDue(daysLeft: number): string {
  if (daysLeft === 0) return 'due today';
  if (daysLeft === 1) return 'due tomorrow';
  if (daysLeft > 1) return `due in ${daysLeft} days`;
  const late = -daysLeft;
  return `${late} ${late === 1 ? 'day' : 'days'} overdue`;
}
