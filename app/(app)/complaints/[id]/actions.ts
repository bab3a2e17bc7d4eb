'use server';

import { revalidatePath } from 'next/cache';
import { redirect } from 'next/navigation';
import { z } from 'zod';
import type { ComplaintFormState } from '@/components/complaints/form-state';
import {
  linkRecord,
  raiseCapaFromComplaint,
  recordReportSubmitted,
  saveAssessment,
  saveInvestigation,
  saveResponseDraft,
  sendResponse,
} from '@/lib/complaints/commands';
import { sendComplaintEvent } from '@/lib/complaints/detail';
import { type ActionResult, defineAction } from '@/lib/define-action';

/*
 * The complaint page's forms post here. Success goes back to the page with a note of what was done (a
 * fresh render with the new version and what comes next); failure returns the message, field errors
 * and typed values to the form. Every one calls the same command as the JSON routes.
 */

const withId = z.object({ id: z.coerce.number().int().positive() }).loose();
type Command<I> = (actor: Parameters<typeof saveAssessment>[0], input: I) => Promise<{ record: { id: number } }>;

function wrap<I>(command: Command<I>) {
  return defineAction(withId, (input, user) => command(user, input as I));
}

function failed(result: Extract<ActionResult<unknown>, { ok: false }>): ComplaintFormState {
  return { failed: true, message: result.message, fieldErrors: result.fieldErrors, values: result.values ?? {} };
}

function done(id: number, what: string): never {
  revalidatePath('/complaints');
  revalidatePath(`/complaints/${id}`);
  redirect(`/complaints/${id}?done=${encodeURIComponent(what)}`);
}

async function run(
  runner: (input: FormData) => Promise<ActionResult<{ record: { id: number } }>>,
  formData: FormData,
  what: string,
): Promise<ComplaintFormState> {
  const result = await runner(formData);
  if (!result.ok) return failed(result);
  done(result.data.record.id, what);
}

const runEvent = defineAction(withId, (input, user) => sendComplaintEvent(user, input.id, input));
const runAssessment = wrap(saveAssessment);
const runInvestigation = wrap(saveInvestigation);
const runLink = wrap(linkRecord);
const runCapa = wrap(raiseCapaFromComplaint);
const runLetter = wrap(saveResponseDraft);
const runSend = wrap(sendResponse);
const runReport = wrap((actor, input: Parameters<typeof recordReportSubmitted>[1]) => recordReportSubmitted(actor, input));

export async function submitComplaintEvent(_p: ComplaintFormState, formData: FormData) {
  return run(runEvent, formData, formData.get('event')?.toString() ?? '');
}
export async function submitAssessment(_p: ComplaintFormState, formData: FormData) {
  return run(runAssessment, formData, 'assessment');
}
export async function submitInvestigation(_p: ComplaintFormState, formData: FormData) {
  return run(runInvestigation, formData, 'investigation');
}
export async function submitLink(_p: ComplaintFormState, formData: FormData) {
  return run(runLink, formData, `link_${formData.get('target')?.toString() ?? ''}`);
}
export async function submitRaiseCapa(_p: ComplaintFormState, formData: FormData) {
  return run(runCapa, formData, 'capa');
}
export async function submitLetter(_p: ComplaintFormState, formData: FormData) {
  return run(runLetter, formData, 'letter');
}
export async function submitSend(_p: ComplaintFormState, formData: FormData) {
  return run(runSend, formData, `sent_${formData.get('channel')?.toString() ?? ''}`);
}
export async function submitReport(_p: ComplaintFormState, formData: FormData) {
  return run(runReport, formData, 'report');
}
