'use server';

import { revalidatePath } from 'next/cache';
import { redirect } from 'next/navigation';
import { z } from 'zod';
import type { DeviationFormState } from '@/components/deviations/detail-form-state';
import { defineAction } from '@/lib/define-action';
import { recordTriage } from '@/lib/deviations/commands';
import { sendDeviationEvent } from '@/lib/deviations/detail';
import type { TriageDecisionInput } from '@/lib/deviations/schemas';

/*
 * The deviation page's forms post here. Success goes back to the page with a note of what was done
 * (a fresh render with the new version and the next actions); failure returns the message, field
 * errors and typed values to the form.
 */

const eventForm = z.object({ id: z.coerce.number().int().positive() }).loose();
const runEvent = defineAction(eventForm, (input, user) => sendDeviationEvent(user, input.id, input));

function failed(result: { message: string; fieldErrors: Record<string, string[]>; values?: Record<string, string> }): DeviationFormState {
  return { failed: true, message: result.message, fieldErrors: result.fieldErrors, values: result.values ?? {} };
}

function done(id: number, what: string): never {
  revalidatePath('/deviations');
  revalidatePath(`/deviations/${id}`);
  redirect(`/deviations/${id}?done=${encodeURIComponent(what)}`);
}

export async function submitDeviationEvent(_previous: DeviationFormState, formData: FormData): Promise<DeviationFormState> {
  const result = await runEvent(formData);
  if (!result.ok) return failed(result);
  done(result.data.record.id, formData.get('event')?.toString() ?? '');
}

/*
 * The risk widget leaves "class to record" empty when the computed class stands, and names its
 * justification classificationJustification. The command works out the computed class itself from
 * the defect's catalogue class in the database; nothing the browser sends can lower that floor.
 */
const triageForm = z.object({ classificationJustification: z.string().optional() }).loose();

const runTriage = defineAction(triageForm, (input, user) => {
  const { classificationJustification, ...rest } = input as Record<string, unknown> & { classificationJustification?: string };
  return recordTriage(user, { ...(rest as Omit<TriageDecisionInput, 'classificationReason'>), classificationReason: classificationJustification });
});

export async function submitTriage(_previous: DeviationFormState, formData: FormData): Promise<DeviationFormState> {
  const result = await runTriage(formData);
  if (!result.ok) return failed(result);
  done(result.data.record.id, 'triage');
}
