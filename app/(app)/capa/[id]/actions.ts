'use server';

import { revalidatePath } from 'next/cache';
import { redirect } from 'next/navigation';
import { z } from 'zod';
import type { CapaFormState } from '@/components/capa/form-state';
import { addAction, completeAction, reassignOwner, requestPlanApproval, updateAction, updatePlan } from '@/lib/capa/commands';
import { sendCapaEvent } from '@/lib/capa/detail';
import { type ActionResult, defineAction } from '@/lib/define-action';

/*
 * The CAPA page's forms post here. Success goes back to the page with a note of what was done (a
 * fresh render with the new version and what comes next); failure returns the message, field errors
 * and typed values to the form.
 */

const withId = z.object({ id: z.coerce.number().int().positive() }).loose();
type Loose = z.output<typeof withId>;

const runEvent = defineAction(withId, (input, user) => sendCapaEvent(user, input.id, input));
const runPlan = defineAction(withId, (input, user) => updatePlan(user, input as Parameters<typeof updatePlan>[1]));
const runAction = defineAction(withId, (input: Loose, user) =>
  input.actionId ? updateAction(user, input as Parameters<typeof updateAction>[1]) : addAction(user, input as Parameters<typeof addAction>[1]),
);
const runComplete = defineAction(withId, (input, user) => completeAction(user, input as Parameters<typeof completeAction>[1]));
const runRequest = defineAction(withId, (input, user) => requestPlanApproval(user, input as Parameters<typeof requestPlanApproval>[1]));
const runReassign = defineAction(withId, (input, user) => reassignOwner(user, input as Parameters<typeof reassignOwner>[1]));

function failed(result: Extract<ActionResult<unknown>, { ok: false }>): CapaFormState {
  return { failed: true, message: result.message, fieldErrors: result.fieldErrors, values: result.values ?? {} };
}

function done(id: number, what: string): never {
  revalidatePath('/capa');
  revalidatePath(`/capa/${id}`);
  redirect(`/capa/${id}?done=${encodeURIComponent(what)}`);
}

export async function submitCapaEvent(_previous: CapaFormState, formData: FormData): Promise<CapaFormState> {
  const result = await runEvent(formData);
  if (!result.ok) return failed(result);
  done(result.data.record.id, formData.get('event')?.toString() ?? '');
}

export async function savePlan(_previous: CapaFormState, formData: FormData): Promise<CapaFormState> {
  const result = await runPlan(formData);
  if (!result.ok) return failed(result);
  done(result.data.record.id, 'plan');
}

export async function saveAction(_previous: CapaFormState, formData: FormData): Promise<CapaFormState> {
  const result = await runAction(formData);
  if (!result.ok) return failed(result);
  done(result.data.record.id, formData.get('actionId') ? 'action_updated' : 'action_added');
}

export async function saveCompletion(_previous: CapaFormState, formData: FormData): Promise<CapaFormState> {
  const result = await runComplete(formData);
  if (!result.ok) return failed(result);
  done(result.data.record.id, 'action_completed');
}

export async function askForPlanApproval(_previous: CapaFormState, formData: FormData): Promise<CapaFormState> {
  const result = await runRequest(formData);
  if (!result.ok) return failed(result);
  done(result.data.record.id, 'approval_requested');
}

export async function saveOwner(_previous: CapaFormState, formData: FormData): Promise<CapaFormState> {
  const result = await runReassign(formData);
  if (!result.ok) return failed(result);
  done(result.data.record.id, 'owner');
}
