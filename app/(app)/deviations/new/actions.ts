'use server';

import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import { type ActionResult, defineAction } from '@/lib/define-action';
import { assertCan } from '@/lib/auth/permissions';
import { createDraft, submitDeviation, updateDraft } from '@/lib/deviations/commands';
import { type RaiseBatchOption, listHoldCandidates, searchRaisableBatches } from '@/lib/deviations/raise-options';
import { createDraftSchema, deviationVersionSchema, updateDraftSchema } from '@/lib/deviations/schemas';

/*
 * The raise form keeps its state in the browser and calls these as plain async functions (not form
 * actions), so a failed save never resets what was typed. The first save creates the draft; later
 * saves carry the version they read, so a second tab editing the same draft is refused, not merged.
 */

export interface SavedDraft {
  id: number;
  version: number;
}

const create = defineAction(createDraftSchema, async (input, user): Promise<SavedDraft> => {
  const { record } = await createDraft(user, input);
  return { id: record.id, version: record.version };
});

const update = defineAction(updateDraftSchema, async (input, user): Promise<SavedDraft> => {
  const { record } = await updateDraft(user, input);
  return { id: record.id, version: record.version };
});

export async function saveRaiseDraft(values: Record<string, unknown>): Promise<ActionResult<SavedDraft>> {
  return values.id ? update(values) : create(values);
}

const submit = defineAction(deviationVersionSchema, async (input, user) => {
  const { record } = await submitDeviation(user, input);
  return { id: record.id, number: record.number ?? '' };
});

export async function submitRaisedDeviation(values: { id: number; version: number }) {
  const result = await submit(values);
  if (result.ok) revalidatePath('/deviations');
  return result;
}

const lotSearch = defineAction(z.object({ term: z.string().max(40) }), async (input, user) => {
  assertCan(user, 'deviation.raise');
  return searchRaisableBatches(input.term, { limit: 15 });
});

export async function findRaisableLots(term: string): Promise<ActionResult<RaiseBatchOption[]>> {
  return lotSearch({ term });
}

const holds = defineAction(z.object({ batchId: z.coerce.number().int().positive() }), async (input, user) => {
  assertCan(user, 'deviation.raise');
  return listHoldCandidates(input.batchId, { sinceDays: 7 });
});

export async function findHoldCandidates(batchId: number): Promise<ActionResult<RaiseBatchOption[]>> {
  return holds({ batchId });
}
