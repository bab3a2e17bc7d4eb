import { requireUserWith } from '@/lib/auth/session';
import { openReviewLink, signReviewDecision } from '@/lib/capa/review-by-link';
import { readJson, respond } from '@/lib/define-action';

/*
 * The effectiveness review link as JSON, for clients other than the page. The token is the path
 * segment; nothing here logs it.
 *
 * GET /api/review/:token → 200 { ok: true, detail, expiresAt, canSign } for a usable link, or
 * 200 { ok: false, problem: unknown|used|revoked|expired|other_user|record_changed, title, body,
 * capa: { id, number } | null, freshLink: { allowed, why? } } (nothing changes either way).
 * POST /api/review/:token { decision: effective|not_effective, password, reason? (required for
 * not_effective) } → 200 { record, allowedEvents, signature }; 409 when the link is used, replaced,
 * expired, someone else's or the CAPA changed; 422 for a wrong password or a missing reason (the
 * link stays usable); 401 signed out.
 */

export async function GET(_request: Request, { params }: RouteContext<'/api/review/[token]'>) {
  return respond(async () => openReviewLink((await params).token, await requireUserWith('capa.read')));
}

export async function POST(request: Request, { params }: RouteContext<'/api/review/[token]'>) {
  return respond(async () => {
    const user = await requireUserWith('capa.read');
    const body = (await readJson(request)) as Record<string, unknown>;
    return signReviewDecision(user, { ...body, token: (await params).token } as Parameters<typeof signReviewDecision>[1]);
  });
}
