'use server';

import { revalidatePath } from 'next/cache';
import { redirect } from 'next/navigation';
import { z } from 'zod';
import type { DeviationFormState } from '@/components/deviations/detail-form-state';
import { defineAction } from '@/lib/define-action';
import { recordTriage } from '@/lib/deviations/commands';
import { sendDeviationEvent } from '@/lib/deviations/detail';
import { assessRisk } from '@/lib/risk/assess';
import { classifications } from '@/lib/risk/classify';

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
 * justification classificationJustification; the command wants the class itself and
 * classificationReason, so the computed class is worked out here the same way the widget did.
 */
const triageForm = z
  .object({
    id: z.coerce.number().int().positive(),
    classification: z.string().optional(),
    defaultClassification: z.enum(classifications).optional(),
    classificationJustification: z.string().optional(),
  })
  .loose();

const runTriage = defineAction(triageForm, (input, user) => {
  const s = Number(input.severity);
  const o = Number(input.occurrence);
  const d = Number(input.detection);
  let classification = input.classification || undefined;
  if (!classification && input.defaultClassification && [s, o, d].every((n) => Number.isInteger(n) && n >= 1 && n <= 10)) {
    classification = assessRisk({
      defaultClassification: input.defaultClassification,
      severity: s,
      occurrence: o,
      detection: d,
      chosen: null,
    }).classification.classification;
  }
  return recordTriage(user, {
    ...(input as Record<string, unknown>),
    id: input.id,
    version: input.version as string,
    classification: classification as 'major',
    severity: input.severity as string,
    occurrence: input.occurrence as string,
    detection: input.detection as string,
    classificationReason: input.classificationJustification,
  });
});

export async function submitTriage(_previous: DeviationFormState, formData: FormData): Promise<DeviationFormState> {
  const result = await runTriage(formData);
  if (!result.ok) return failed(result);
  done(result.data.record.id, 'triage');
}
