import { describe, expect, it } from 'vitest';
import { reportCountdown, reportDueOn } from '@/lib/complaints/deadline';
import { qualityDefectPossible, reportKindFor } from '@/lib/complaints/labels';

/*
 * Report deadlines of reportable complaints, counted from the day the firm first received the
 * information (day 0, not counted) in federal business days: Monday to Friday less the federal
 * holidays as observed (5 U.S.C. 6103). Field alert: 3 working days (21 CFR 314.81(b)(1)). Serious
 * adverse event with a dietary supplement: 15 business days (21 U.S.C. 379aa-1(c)(1)). Calendar
 * dates checked by hand against the 2026 and 2027 calendars.
 */

describe('field alert report: 3 working days (21 CFR 314.81(b)(1))', () => {
  it.each([
    // Friday before Labor Day (Monday 7 September 2026, 5 U.S.C. 6103): Tue 8, Wed 9, Thu 10.
    ['2026-09-04', '2026-09-10'],
    // Wednesday before Thanksgiving (Thursday 26 November): Fri 27, Mon 30, Tue 1 December.
    ['2026-11-25', '2026-12-01'],
    // Christmas Eve, a Thursday; Christmas Day is Friday 25 December 2026: Mon 28, Tue 29, Wed 30.
    ['2026-12-24', '2026-12-30'],
    // Across New Year: Thu 31 Dec, (Fri 1 Jan 2027 holiday), Mon 4, Tue 5.
    ['2026-12-30', '2027-01-05'],
    // Received on a Saturday: the count starts on Monday.
    ['2026-11-14', '2026-11-18'],
    // Friday 3 July 2026 is the observed Independence Day (4 July is a Saturday): Mon 6, Tue 7, Wed 8.
    ['2026-07-02', '2026-07-08'],
  ])('received %s → due %s', (received, due) => {
    expect(reportDueOn('field_alert_report', received)).toBe(due);
  });
});

describe('serious adverse event, dietary supplement: 15 business days (21 U.S.C. 379aa-1(c)(1))', () => {
  it.each([
    // Friday before Labor Day: 8–11 (4), 14–18 (9), 21–25 (14), Mon 28 September (15).
    ['2026-09-04', '2026-09-28'],
    // Friday 13 November 2026, Thanksgiving inside the period: 16–20 (5), 23–25 + 27 (9), 30 Nov–4 Dec (14), Mon 7 Dec (15).
    ['2026-11-13', '2026-12-07'],
    // Friday 9 October 2026, before Columbus Day (12 Oct) and with Veterans Day (Wed 11 Nov) far off: 13–16 (4), 19–23 (9), 26–30 (14), Mon 2 Nov (15).
    ['2026-10-09', '2026-11-02'],
  ])('received %s → due %s', (received, due) => {
    expect(reportDueOn('dietary_supplement_sae', received)).toBe(due);
  });

  it('takes the report kind from the product class, never from the form', () => {
    expect(reportKindFor.supplement).toBe('dietary_supplement_sae');
    expect(reportKindFor.drug).toBe('field_alert_report');
  });
});

describe('the countdown shown on the record and in the list', () => {
  it('counts business days left, and warns in the last two (common practice)', () => {
    expect(reportCountdown('2026-12-07', '2026-11-30')).toMatchObject({ businessDaysLeft: 5, tone: 'ok', text: '5 business days left' });
    expect(reportCountdown('2026-12-07', '2026-12-04')).toMatchObject({ businessDaysLeft: 1, tone: 'warn', text: '1 business day left' });
  });

  it('says due today on the day and overdue after it', () => {
    expect(reportCountdown('2026-12-07', '2026-12-07')).toMatchObject({ tone: 'danger', text: 'due today' });
    expect(reportCountdown('2026-12-07', '2026-12-10')).toMatchObject({ tone: 'danger', text: '3 days overdue', calendarDaysLeft: -3 });
  });

  it('stops once the report is submitted, and says when it was late', () => {
    expect(reportCountdown('2026-12-07', '2026-12-10', '2026-12-04')).toMatchObject({ tone: 'done', text: 'submitted 2026-12-04' });
    expect(reportCountdown('2026-12-07', '2026-12-10', '2026-12-08')).toMatchObject({ tone: 'warn', text: 'submitted 2026-12-08 (late)' });
  });
});

describe('which categories let the investigation be skipped (21 CFR 211.198(b)(2), EU GMP 8.9)', () => {
  it('leaves a defect possible for everything but "no defect found"', () => {
    expect(qualityDefectPossible('no_defect_found')).toBe(false);
    for (const c of ['empty_capsule', 'stuck_together', 'packaging', 'labelling', 'taste_or_odour', 'suspected_adverse_reaction', null]) {
      expect(qualityDefectPossible(c)).toBe(true);
    }
  });
});
