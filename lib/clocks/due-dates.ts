import { addDays, daysBetween, type IsoDate } from './dates';

/*
 * Closure targets for deviations and CAPA by classification, in calendar days from the day the
 * record was opened. No regulation fixes these numbers: 21 CFR 211.192 asks for a thorough,
 * timely investigation and leaves "timely" to the firm. Targets are site settings; the defaults
 * (critical 15, major 30, minor 30) are common practice, 30 days being the figure most sites use.
 * A target falling on a weekend or holiday is not moved: it is an internal target, and moving it
 * later would only hide lateness.
 */

export const classifications = ['critical', 'major', 'minor'] as const;
export type Classification = (typeof classifications)[number];

export const dueDaySettingKeys: Record<Classification, string> = {
  critical: 'due_days_critical',
  major: 'due_days_major',
  minor: 'due_days_minor',
};

/** Common practice, not a published requirement. */
export const defaultDueDays: Readonly<Record<Classification, number>> = { critical: 15, major: 30, minor: 30 };

export const minDueDays = 1;
export const maxDueDays = 365;

export type DueDays = Record<Classification, number>;

export interface DueDaySetting {
  days: number;
  /** 'default' when the setting is missing or unreadable, so the screen can say so. */
  source: 'setting' | 'default';
}

function readDays(raw: string | undefined): number | null {
  if (raw === undefined || !/^\d{1,3}$/.test(raw.trim())) return null;
  const n = Number(raw.trim());
  return n >= minDueDays && n <= maxDueDays ? n : null;
}

/** The three targets from the `settings` rows (key → value), falling back to the defaults. */
export function readDueDaySettings(values: Readonly<Record<string, string | undefined>>): Record<Classification, DueDaySetting> {
  const one = (c: Classification): DueDaySetting => {
    const days = readDays(values[dueDaySettingKeys[c]]);
    return days === null ? { days: defaultDueDays[c], source: 'default' } : { days, source: 'setting' };
  };
  return { critical: one('critical'), major: one('major'), minor: one('minor') };
}

export function dueDaysOf(settings: Record<Classification, DueDaySetting>): DueDays {
  return { critical: settings.critical.days, major: settings.major.days, minor: settings.minor.days };
}

export function dueDateFor(openedOn: IsoDate, classification: Classification, dueDays: DueDays): IsoDate {
  return addDays(openedOn, dueDays[classification]);
}

export type ClockState = 'open' | 'due_today' | 'overdue';

export interface CalendarClock {
  dueOn: IsoDate;
  /** Calendar days from today to the due date; negative once overdue. */
  daysRemaining: number;
  state: ClockState;
}

export function clockState(daysRemaining: number): ClockState {
  if (daysRemaining > 0) return 'open';
  return daysRemaining === 0 ? 'due_today' : 'overdue';
}

export function calendarClock(dueOn: IsoDate, today: IsoDate): CalendarClock {
  const daysRemaining = daysBetween(today, dueOn);
  return { dueOn, daysRemaining, state: clockState(daysRemaining) };
}
