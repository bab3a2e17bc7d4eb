import { requireUser } from '@/lib/auth/session';
import { recordReportSubmitted } from '@/lib/complaints/commands';
import { complaintIdFrom } from '@/lib/complaints/route-id';
import { readJson, respond } from '@/lib/define-action';

/*
 * PUT /api/complaints/:id/report { version, submittedOn: YYYY-MM-DD } records when the report went to the
 * regulator (QA), which stops the countdown.
 * → { record, allowedEvents, signature: null } (record without personal data); 401/403/404/409/422.
 */

export async function PUT(request: Request, { params }: RouteContext<'/api/complaints/[id]/report'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = complaintIdFrom((await params).id);
    const body = await readJson(request);
    return recordReportSubmitted(user, { ...(body as object), id } as Parameters<typeof recordReportSubmitted>[1]);
  });
}
