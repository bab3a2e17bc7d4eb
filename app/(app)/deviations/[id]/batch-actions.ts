'use server';

import { revalidatePath } from 'next/cache';
import { redirect } from 'next/navigation';
import type { DeviationFormState } from '@/components/deviations/detail-form-state';
import { defineAction } from '@/lib/define-action';
import { extendHolds, recordDisposition } from '@/lib/deviations/batches';
import { extendHoldsSchema, recordDispositionSchema } from '@/lib/deviations/schemas';

/*
 * The held-batch forms of the deviation page: one disposition per batch, and holds extended at
 * triage. Success goes back to the page (new version, fresh forms) with a note of what was done;
 * failure returns the message, the field errors and what was typed.
 */

const runDisposition = defineAction(recordDispositionSchema, (input, user) => recordDisposition(user, input));
const runHolds = defineAction(extendHoldsSchema, (input, user) => extendHolds(user, input));

function failed(result: { message: string; fieldErrors: Record<string, string[]>; values?: Record<string, string> }): DeviationFormState {
  return { failed: true, message: result.message, fieldErrors: result.fieldErrors, values: result.values ?? {} };
}

function done(id: number, what: 'disposition' | 'holds'): never {
  revalidatePath('/deviations');
  revalidatePath(`/deviations/${id}`);
  redirect(`/deviations/${id}?done=${what}#held-batches-heading`);
}

export async function submitDisposition(_previous: DeviationFormState, formData: FormData): Promise<DeviationFormState> {
  const result = await runDisposition(formData);
  if (!result.ok) return failed(result);
  done(result.data.deviationId, 'disposition');
}

export async function submitHolds(_previous: DeviationFormState, formData: FormData): Promise<DeviationFormState> {
  const result = await runHolds(formData);
  if (!result.ok) return failed(result);
  done(result.data.deviationId, 'holds');
}
