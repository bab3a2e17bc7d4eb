import { addBusinessDays, businessDaysBetween, federalCalendar } from './business-days';
import { daysBetween, type IsoDate } from './dates';
import { type ClockState, clockState } from './due-dates';

/*
 * Reporting deadlines set by US law, counted in business days.
 *
 * Counting convention: day 0 is the day the firm (the applicant, the responsible person) first
 * receives the information; it is not counted, and the deadline is the n-th business day after
 * it. The statutes say "within 3 working days of receipt" and "not later than 15 business days
 * after the report is received", and excluding the day of the triggering event is the general
 * rule for counting periods in US federal practice (Fed. R. Civ. P. 6(a)(1)(A)). Business days
 * are Monday–Friday less federal holidays as observed (5 U.S.C. 6103): the days FDA is open.
 *
 * Site closures are deliberately ignored here: a plant shutdown does not stop FDA's clock, and a
 * deadline that skipped it would be late.
 */

export type RegulatoryClockKind = 'field_alert_report' | 'dietary_supplement_sae';

export interface RegulatoryRule {
  kind: RegulatoryClockKind;
  title: string;
  businessDays: number;
  citation: string;
  rule: string;
}

export const regulatoryRules: Readonly<Record<RegulatoryClockKind, RegulatoryRule>> = {
  field_alert_report: {
    kind: 'field_alert_report',
    title: 'Field alert report',
    businessDays: 3,
    citation: '21 CFR 314.81(b)(1)',
    rule:
      'The holder of an approved application submits a field alert report within 3 working days of receipt of information ' +
      'concerning a distributed drug product: a mix-up, contamination, significant chemical, physical or other change or ' +
      'deterioration, or a failure of one or more distributed batches to meet the specification in the application.',
  },
  dietary_supplement_sae: {
    kind: 'dietary_supplement_sae',
    title: 'Serious adverse event report (dietary supplement)',
    businessDays: 15,
    citation: 'FD&C Act §761(c)(1), 21 U.S.C. 379aa-1(c)(1)',
    rule:
      'The responsible person whose name appears on the label submits to FDA each report it receives of a serious adverse ' +
      'event associated with the dietary supplement used in the United States, with a copy of the label, not later than ' +
      '15 business days after the report is received.',
  },
};

export interface RegulatoryDeadline extends RegulatoryRule {
  receivedOn: IsoDate;
  deadline: IsoDate;
  /** Business days from today to the deadline (today not counted); negative once overdue. */
  businessDaysRemaining: number;
  calendarDaysRemaining: number;
  state: ClockState;
}

export function regulatoryDeadline(kind: RegulatoryClockKind, receivedOn: IsoDate, today: IsoDate): RegulatoryDeadline {
  const rule = regulatoryRules[kind];
  const deadline = addBusinessDays(receivedOn, rule.businessDays, federalCalendar);
  const calendarDaysRemaining = daysBetween(today, deadline);
  return {
    ...rule,
    receivedOn,
    deadline,
    businessDaysRemaining: businessDaysBetween(today, deadline, federalCalendar),
    calendarDaysRemaining,
    state: clockState(calendarDaysRemaining),
  };
}

export const fieldAlertReportDeadline = (receivedOn: IsoDate, today: IsoDate) =>
  regulatoryDeadline('field_alert_report', receivedOn, today);

export const dietarySupplementSaeDeadline = (receivedOn: IsoDate, today: IsoDate) =>
  regulatoryDeadline('dietary_supplement_sae', receivedOn, today);
