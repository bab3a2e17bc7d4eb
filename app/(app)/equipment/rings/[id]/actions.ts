'use server';

import { revalidatePath } from 'next/cache';
import { redirect } from 'next/navigation';
import type { RingFormState } from '@/components/equipment/ring-form-state';
import { defineAction } from '@/lib/define-action';
import { applyRingEvent } from '@/lib/equipment/commands';
import { ringEventSchema } from '@/lib/equipment/schemas';

/*
 * The ring page's forms all post here; the event is a hidden field. Success goes back to the ring
 * page with a note of what was done (a fresh render with the new version and the next actions);
 * failure returns the message, field errors and typed values to the form.
 */

const run = defineAction(ringEventSchema, (input, user) => applyRingEvent(user, input));

export async function submitRingEvent(_previous: RingFormState, formData: FormData): Promise<RingFormState> {
  const result = await run(formData);
  if (!result.ok) {
    return { failed: true, message: result.message, fieldErrors: result.fieldErrors, values: result.values ?? {} };
  }
  const ring = result.data.record;
  revalidatePath('/equipment');
  revalidatePath(`/equipment/rings/${ring.id}`);
  redirect(`/equipment/rings/${ring.id}?done=${encodeURIComponent(formData.get('event')?.toString() ?? '')}`);
}
