'use server';

import { revalidatePath } from 'next/cache';
import { redirect } from 'next/navigation';
import type { WeightFormState } from '@/components/weight/form-state';
import { defineAction } from '@/lib/define-action';
import { recordWeightCheckSchema } from '@/lib/validation/weight';
import { recordWeightCheck } from '@/lib/weight-checks/commands';

/*
 * "Record check" posts here. Success goes back to the batch's page with a note of the recorded
 * check (a fresh render with it in the list and the chart); failure returns the message, field
 * errors and typed values to the form.
 */

const run = defineAction(recordWeightCheckSchema, (input, user) => recordWeightCheck(user, input));

export async function submitWeightCheck(_previous: WeightFormState, formData: FormData): Promise<WeightFormState> {
  const result = await run(formData);
  if (!result.ok) {
    return { failed: true, message: result.message, fieldErrors: result.fieldErrors, values: result.values ?? {} };
  }
  const lot = formData.get('lot')?.toString() ?? '';
  revalidatePath('/weight-checks');
  redirect(`/weight-checks?lot=${encodeURIComponent(lot)}&recorded=${result.data.check.id}#checks`);
}
