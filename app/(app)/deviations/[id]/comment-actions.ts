'use server';

import { revalidatePath } from 'next/cache';
import { z } from 'zod';
import { type ActionResult, defineAction } from '@/lib/define-action';
import { addComment } from '@/lib/comments/commands';
import type { CommentDto } from '@/lib/comments/queries';

/* The comment form on the deviation page; the same command as POST /api/deviations/[id]/comments. */

const schema = z.object({
  deviationId: z.coerce.number({ error: 'Reload the page and try again.' }).int().positive(),
  body: z.string({ error: 'Write a comment.' }),
});

const add = defineAction(schema, (input, user) => addComment(user, { recordType: 'deviation', recordId: input.deviationId, body: input.body }));

export async function addDeviationComment(_previous: ActionResult<CommentDto> | null, form: FormData): Promise<ActionResult<CommentDto>> {
  const result = await add(form);
  if (result.ok) revalidatePath(`/deviations/${String(form.get('deviationId'))}`);
  return result;
}
