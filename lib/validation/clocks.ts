import { z } from 'zod';
import { isBusinessDay, nonBusinessReason, federalCalendar } from '../clocks/business-days';
import { isIsoDate, yearOf } from '../clocks/dates';
import { dueDaySettingKeys, maxDueDays, minDueDays } from '../clocks/due-dates';
import { firstSupportedYear, lastSupportedYear } from '../clocks/holidays';

/*
 * Site calendar input: closures (days the site does not work besides weekends and federal
 * holidays) and the closure targets by classification. Shared by the admin forms (FormData: every
 * value a string) and any JSON caller. Changes to GMP configuration carry a reason for the audit
 * trail (EU GMP Annex 11 §12.3 asks that changes to access and configuration be recorded).
 */

const trimmed = (max: number, label: string) =>
  z
    .string({ error: `${label} is required.` })
    .trim()
    .max(max, `${label} must be at most ${max} characters.`);

const reason = trimmed(500, 'Reason').min(3, 'Say why (at least 3 characters); it goes into the audit trail.');

const day = z
  .string({ error: 'Enter the date.' })
  .trim()
  .refine(isIsoDate, { message: 'Enter a date as YYYY-MM-DD, e.g. 2026-12-28.', abort: true })
  .refine(
    (d) => yearOf(d) >= firstSupportedYear && yearOf(d) <= lastSupportedYear,
    { message: `Enter a date between ${firstSupportedYear} and ${lastSupportedYear}.`, abort: true },
  );

/** A closure on a weekend or a federal holiday would change nothing; say what the day already is. */
const workingDay = day.superRefine((d, ctx) => {
  if (isBusinessDay(d, federalCalendar)) return;
  const why = nonBusinessReason(d, federalCalendar)!;
  ctx.addIssue({
    code: 'custom',
    message: `${d} is already not a business day (${why.label}); no closure is needed.`,
  });
});

export const addClosureSchema = z.object({
  day: workingDay,
  description: trimmed(200, 'Description').min(3, 'Say what the closure is, e.g. “Plant shutdown”.'),
});
export type AddClosureInput = z.input<typeof addClosureSchema>;

export const deactivateClosureSchema = z.object({ day, reason });

const dueDays = (label: string) =>
  z.coerce
    .number({ error: `${label}: enter a whole number of days.` })
    .int(`${label}: enter a whole number of days.`)
    .min(minDueDays, `${label}: at least ${minDueDays} day.`)
    .max(maxDueDays, `${label}: at most ${maxDueDays} days.`);

export const dueDaysSchema = z.object({
  critical: dueDays('Critical'),
  major: dueDays('Major'),
  minor: dueDays('Minor'),
  reason,
});
export type DueDaysInput = z.input<typeof dueDaysSchema>;

export { dueDaySettingKeys };
