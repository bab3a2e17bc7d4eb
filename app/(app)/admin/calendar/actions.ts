'use server';

import { revalidatePath } from 'next/cache';
import type { AdminFormState } from '@/components/admin/form-state';
import { requireUser } from '@/lib/auth/session';
import { formatLongDate } from '@/lib/clocks';
import { describeError } from '@/lib/define-action';
import { addSiteClosure, deactivateSiteClosure, updateDueDays, type CalendarActor } from '@/lib/site-calendar/commands';

/*
 * Form actions for Admin → Site calendar. Each re-reads the signed-in user and hands the form to
 * the command, which checks the permission, validates and audits. Typed values come back on a
 * refusal so the form keeps them.
 */

function fields(formData: FormData): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [key, value] of formData.entries()) {
    if (typeof value === 'string' && !key.startsWith('$ACTION')) out[key] = value;
  }
  return out;
}

async function run<T>(
  previous: AdminFormState,
  formData: FormData,
  command: (actor: CalendarActor, input: Record<string, string>) => Promise<T>,
  saved: (result: T) => string,
): Promise<AdminFormState> {
  const input = fields(formData);
  try {
    const result = await command(await requireUser(), input);
    revalidatePath('/admin/calendar');
    return { status: 'saved', message: saved(result), fieldErrors: {}, values: {}, submissions: previous.submissions + 1 };
  } catch (err) {
    const { message, fieldErrors } = describeError(err);
    return { status: 'failed', message, fieldErrors, values: input, submissions: previous.submissions + 1 };
  }
}

export async function updateDueDaysAction(previous: AdminFormState, formData: FormData): Promise<AdminFormState> {
  return run(previous, formData, updateDueDays, (d) => `Targets saved: critical ${d.critical}, major ${d.major}, minor ${d.minor} days.`);
}

export async function addClosureAction(previous: AdminFormState, formData: FormData): Promise<AdminFormState> {
  return run(previous, formData, addSiteClosure, (c) => `${formatLongDate(c.day)} is now a site closure.`);
}

export async function deactivateClosureAction(previous: AdminFormState, formData: FormData): Promise<AdminFormState> {
  return run(previous, formData, deactivateSiteClosure, (c) => `The closure on ${formatLongDate(c.day)} is inactive.`);
}
