import { describe, expect, it } from 'vitest';
import {
  calendarClock,
  defaultDueDays,
  dueDateFor,
  dueDaysOf,
  readDueDaySettings,
} from '../../../lib/clocks/due-dates';
import {
  dietarySupplementSaeDeadline,
  fieldAlertReportDeadline,
  regulatoryRules,
} from '../../../lib/clocks/regulatory';

describe('closure targets by classification (common practice: no regulation fixes the days)', () => {
  it('uses the site settings when they are valid', () => {
    const s = readDueDaySettings({ due_days_critical: '10', due_days_major: ' 20 ', due_days_minor: '45' });
    expect(s.critical).toEqual({ days: 10, source: 'setting' });
    expect(dueDaysOf(s)).toEqual({ critical: 10, major: 20, minor: 45 });
  });

  it('falls back to the defaults (critical 15, major 30, minor 30: common practice) for missing or bad values', () => {
    const s = readDueDaySettings({ due_days_critical: '0', due_days_major: 'thirty', due_days_minor: '366' });
    expect(dueDaysOf(s)).toEqual(defaultDueDays);
    expect(defaultDueDays).toEqual({ critical: 15, major: 30, minor: 30 });
    expect(readDueDaySettings({}).major.source).toBe('default');
  });

  it('counts calendar days from the day opened and does not move a weekend due date', () => {
    const days = { critical: 15, major: 30, minor: 30 };
    expect(dueDateFor('2026-11-02', 'critical', days)).toBe('2026-11-17');
    expect(dueDateFor('2026-10-27', 'major', days)).toBe('2026-11-26'); // Thanksgiving, kept as is
  });

  it('reports days left, due today and overdue', () => {
    expect(calendarClock('2026-11-26', '2026-11-20')).toEqual({ dueOn: '2026-11-26', daysRemaining: 6, state: 'open' });
    expect(calendarClock('2026-11-26', '2026-11-26').state).toBe('due_today');
    expect(calendarClock('2026-11-26', '2026-11-27')).toMatchObject({ daysRemaining: -1, state: 'overdue' });
  });
});

describe('field alert report: 3 working days (21 CFR 314.81(b)(1))', () => {
  it('received on the Friday before MLK Day (Monday 18 January 2027): due Thursday 21 January', () => {
    const d = fieldAlertReportDeadline('2027-01-15', '2027-01-15');
    expect(d.deadline).toBe('2027-01-21');
    expect(d.businessDaysRemaining).toBe(3);
    expect(d.calendarDaysRemaining).toBe(6);
    expect(d.citation).toBe('21 CFR 314.81(b)(1)');
    expect(d.state).toBe('open');
  });

  it('received the day before Thanksgiving 2026: 27 Nov (1), 30 Nov (2), 1 Dec (3)', () => {
    expect(fieldAlertReportDeadline('2026-11-25', '2026-11-30')).toMatchObject({
      deadline: '2026-12-01',
      businessDaysRemaining: 1,
      state: 'open',
    });
  });

  it('is due today on the deadline and overdue after it, with negative days remaining', () => {
    expect(fieldAlertReportDeadline('2027-01-15', '2027-01-21')).toMatchObject({ businessDaysRemaining: 0, state: 'due_today' });
    expect(fieldAlertReportDeadline('2027-01-15', '2027-01-25')).toMatchObject({
      businessDaysRemaining: -2, // 22 and 25 January
      calendarDaysRemaining: -4,
      state: 'overdue',
    });
  });

  it('is not extended by a site closure: the plant shutdown does not stop FDA’s clock', () => {
    // 24 Dec (1); 25 Christmas; 28 (2); 29 (3) — the shutdown of 28–31 December is ignored.
    expect(fieldAlertReportDeadline('2026-12-23', '2026-12-23').deadline).toBe('2026-12-29');
  });
});

describe('dietary supplement serious adverse event report: 15 business days (FD&C Act §761(c)(1), 21 U.S.C. 379aa-1)', () => {
  it('received Friday 20 November 2026: skips Thanksgiving, due Monday 14 December', () => {
    const d = dietarySupplementSaeDeadline('2026-11-20', '2026-11-20');
    expect(d.deadline).toBe('2026-12-14');
    expect(d.businessDaysRemaining).toBe(15);
    expect(regulatoryRules.dietary_supplement_sae.businessDays).toBe(15);
  });

  it('received Friday 15 January 2027 before MLK Day: due Monday 8 February', () => {
    // 19–22 Jan (4), 25–29 Jan (9), 1–5 Feb (14), 8 Feb (15).
    expect(dietarySupplementSaeDeadline('2027-01-15', '2027-01-15').deadline).toBe('2027-02-08');
  });

  it('received Friday 24 December 2027 (Christmas observed) across the New Year observed on 31 December', () => {
    // 27–30 Dec (4); 31 Dec New Year's Day 2028 observed; 3–7 Jan (9); 10–14 Jan (14); 17 Jan MLK Day; 18 Jan (15).
    expect(dietarySupplementSaeDeadline('2027-12-24', '2027-12-24').deadline).toBe('2028-01-18');
  });
});
