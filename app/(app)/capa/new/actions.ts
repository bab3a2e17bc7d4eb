'use server';

import { revalidatePath } from 'next/cache';
import { redirect } from 'next/navigation';
import { z } from 'zod';
import type { CapaFormState } from '@/components/capa/form-state';
import { createCapa } from '@/lib/capa/commands';
import { findCapaSourceByNumber } from '@/lib/capa/queries';
import { defineAction } from '@/lib/define-action';
import { ValidationError } from '@/lib/errors';

/* The new-CAPA form: a deviation or complaint is named by its number and found here. */

const form = z.object({ sourceType: z.string().optional(), sourceNumber: z.string().optional() }).loose();

const run = defineAction(form, async (input, user) => {
  const sourceType = input.sourceType === 'deviation' || input.sourceType === 'complaint' ? input.sourceType : input.sourceType;
  let sourceId: number | undefined;
  if (sourceType === 'deviation' || sourceType === 'complaint') {
    const number = input.sourceNumber?.trim().toUpperCase() ?? '';
    if (!number) throw new ValidationError(`Enter the ${sourceType}'s number.`, { sourceNumber: [`Enter the ${sourceType}'s number.`] });
    const found = await findCapaSourceByNumber(sourceType, number, user);
    if (!found) throw new ValidationError(`No ${sourceType} has the number ${number}.`, { sourceNumber: [`No ${sourceType} has the number ${number}.`] });
    sourceId = found;
  }
  const raw = input as Record<string, unknown>;
  return createCapa(user, {
    title: raw.title as string,
    sourceType: sourceType as 'trend',
    sourceId,
    problemStatement: raw.problemStatement as string,
    rootCause: raw.rootCause as string | undefined,
    ownerId: raw.ownerId as string,
    dueAt: raw.dueAt as string | undefined,
  } as Parameters<typeof createCapa>[1]);
});

export async function openCapa(_previous: CapaFormState, formData: FormData): Promise<CapaFormState> {
  const result = await run(formData);
  if (!result.ok) return { failed: true, message: result.message, fieldErrors: result.fieldErrors, values: result.values ?? {} };
  revalidatePath('/capa');
  redirect(`/capa/${result.data.record.id}`);
}
