'use server';

import { revalidatePath } from 'next/cache';
import { redirect } from 'next/navigation';
import type { InvestigationFormState } from '@/components/deviations/investigation-form-state';
import { defineAction } from '@/lib/define-action';
import { investigationConflictMessage, saveInvestigation } from '@/lib/deviations/investigation';
import { saveInvestigationSchema } from '@/lib/deviations/investigation-schema';

/*
 * The investigation form posts here. Success goes back to the page (fresh version, the sign-off
 * form up to date) at the investigation section; failure returns the message and field errors, and
 * says whether someone else saved first so the form can offer the typed text to copy.
 */

const run = defineAction(saveInvestigationSchema, (input, user) => saveInvestigation(user, input));

export async function saveInvestigationAction(_previous: InvestigationFormState, formData: FormData): Promise<InvestigationFormState> {
  const result = await run(formData);
  if (!result.ok) {
    return { failed: true, conflict: result.message === investigationConflictMessage, message: result.message, fieldErrors: result.fieldErrors };
  }
  const id = result.data.record.id;
  revalidatePath('/deviations');
  revalidatePath(`/deviations/${id}`);
  redirect(`/deviations/${id}?done=${result.data.capaCreated ? 'investigation_capa' : 'investigation'}#investigation-heading`);
}
