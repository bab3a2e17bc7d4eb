import { requireUser } from '@/lib/auth/session';
import { requestFreshReviewLink } from '@/lib/capa/review-by-link';
import { respond } from '@/lib/define-action';

/*
 * POST /api/review/:token/fresh-link (no body) → 200 { email, expiresAt }: a new personal link by
 * e-mail to the person signed in, for the CAPA their own earlier link was for, while it awaits the
 * effectiveness review and they are a QA approver who does not own it; 403 otherwise (with why),
 * 409 when the CAPA no longer awaits review.
 */
export async function POST(_request: Request, { params }: RouteContext<'/api/review/[token]/fresh-link'>) {
  return respond(async () => requestFreshReviewLink(await requireUser(), { token: (await params).token }));
}
