'use server';

import { z } from 'zod';
import type { ReviewDecision, ReviewFormState } from '@/components/capa/review-decision-forms';
import type { FreshLinkState } from '@/components/capa/review-fresh-link';
import { formatExpiry } from '@/lib/capa/review-links';
import { requestFreshReviewLink, signReviewDecision } from '@/lib/capa/review-by-link';
import { defineAction } from '@/lib/define-action';

/*
 * The review page's two forms. The token travels in the form body, never in a log line or an audit
 * entry; it is not echoed back either (the page already has it).
 */

const withToken = z.object({ token: z.string().max(100) }).loose();

const runDecision = defineAction(withToken, (input, user) => signReviewDecision(user, input as Parameters<typeof signReviewDecision>[1]));
const runFreshLink = defineAction(withToken, (input, user) => requestFreshReviewLink(user, input));

export async function signReview(_previous: ReviewFormState, formData: FormData): Promise<ReviewFormState> {
  const result = await runDecision(formData);
  if (!result.ok) {
    const { token: _token, ...values } = result.values ?? {};
    return { failed: true, message: result.message, fieldErrors: result.fieldErrors, values, signed: null };
  }
  const { record } = result.data;
  // No revalidatePath: it would re-render this page, whose link is now used, in place of the outcome.
  // The CAPA pages read the database on every request, so nothing cached needs refreshing.
  const decision: ReviewDecision = record.effectivenessResult === 'effective' ? 'effective' : 'not_effective';
  return { failed: false, message: null, fieldErrors: {}, values: {}, signed: { decision, capaId: record.id, number: record.number } };
}

export async function askForFreshLink(_previous: FreshLinkState, formData: FormData): Promise<FreshLinkState> {
  const result = await runFreshLink(formData);
  if (!result.ok) return { status: 'failed', message: result.message };
  return { status: 'sent', email: result.data.email, expiresAt: formatExpiry(new Date(result.data.expiresAt)) };
}
