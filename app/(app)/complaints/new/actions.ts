'use server';

import { revalidatePath } from 'next/cache';
import { redirect } from 'next/navigation';
import type { ComplaintFormState } from '@/components/complaints/form-state';
import { createComplaint } from '@/lib/complaints/commands';
import { intakeSchema } from '@/lib/complaints/schemas';
import { defineAction } from '@/lib/define-action';

/* The intake form posts here; a refusal returns the messages and everything typed, success opens the new complaint. */

const run = defineAction(intakeSchema, (input, user) => createComplaint(user, input));

export async function submitIntake(_previous: ComplaintFormState, formData: FormData): Promise<ComplaintFormState> {
  const result = await run(formData);
  if (!result.ok) return { failed: true, message: result.message, fieldErrors: result.fieldErrors, values: result.values ?? {} };
  revalidatePath('/complaints');
  redirect(`/complaints/${result.data.record.id}?done=received`);
}
