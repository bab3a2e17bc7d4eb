import { type IsoDate, daysBetween } from '../clocks/dates';
import { businessDaysBetween, federalCalendar } from '../clocks/business-days';
import { type RegulatoryClockKind, regulatoryDeadline } from '../clocks/regulatory';

/*
 * The report deadline of a reportable complaint and the countdown shown beside it. The deadline is
 * counted by the clocks module from the day the firm first received the information (the complaint's
 * received date), in federal business days: a site shutdown does not stop the regulator's clock
 * (lib/clocks/regulatory.ts). Pure: the list, the page and the reminder sweep share it.
 */

export function reportDueOn(kind: RegulatoryClockKind, receivedOn: IsoDate): IsoDate {
  return regulatoryDeadline(kind, receivedOn, receivedOn).deadline;
}

export type CountdownTone = 'ok' | 'warn' | 'danger' | 'done';

export interface ReportCountdown {
  dueOn: IsoDate;
  /** Business days from today to the deadline (today not counted); negative once overdue. */
  businessDaysLeft: number;
  calendarDaysLeft: number;
  tone: CountdownTone;
  /** e.g. "2 business days left", "due today", "3 days overdue", "submitted 2026-09-02". */
  text: string;
}

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

export function reportCountdown(dueOn: IsoDate, today: IsoDate, submittedOn: IsoDate | null = null): ReportCountdown {
  const calendarDaysLeft = daysBetween(today, dueOn);
  const businessDaysLeft = businessDaysBetween(today, dueOn, federalCalendar);
  if (submittedOn !== null) {
    const late = submittedOn > dueOn;
    return { dueOn, businessDaysLeft, calendarDaysLeft, tone: late ? 'warn' : 'done', text: `submitted ${submittedOn}${late ? ' (late)' : ''}` };
  }
  if (calendarDaysLeft < 0) {
    return { dueOn, businessDaysLeft, calendarDaysLeft, tone: 'danger', text: `${plural(-calendarDaysLeft, 'day')} overdue` };
  }
  if (calendarDaysLeft === 0) return { dueOn, businessDaysLeft, calendarDaysLeft, tone: 'danger', text: 'due today' };
  return {
    dueOn,
    businessDaysLeft,
    calendarDaysLeft,
    tone: businessDaysLeft <= 2 ? 'warn' : 'ok',
    text: `${plural(businessDaysLeft, 'business day')} left`,
  };
}
