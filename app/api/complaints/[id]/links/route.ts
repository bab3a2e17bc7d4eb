import { requireUser } from '@/lib/auth/session';
import { linkRecord } from '@/lib/complaints/commands';
import { complaintIdFrom } from '@/lib/complaints/route-id';
import { readJson, respond } from '@/lib/define-action';

/*
 * POST /api/complaints/:id/links { version, target: deviation|capa, reference: 'DEV-2026-0042' | 'CAPA-2026-0007' }
 * links an existing deviation or CAPA (QA investigator, while under investigation).
 * → { record, allowedEvents, signature: null } (record without personal data); 401/403/404/409/422.
 */

export async function POST(request: Request, { params }: RouteContext<'/api/complaints/[id]/links'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = complaintIdFrom((await params).id);
    const body = await readJson(request);
    return linkRecord(user, { ...(body as object), id } as Parameters<typeof linkRecord>[1]);
  });
}
