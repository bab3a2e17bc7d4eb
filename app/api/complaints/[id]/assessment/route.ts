import { requireUser } from '@/lib/auth/session';
import { saveAssessment } from '@/lib/complaints/commands';
import { complaintIdFrom } from '@/lib/complaints/route-id';
import { readJson, respond } from '@/lib/define-action';

/*
 * PUT /api/complaints/:id/assessment { version, category, adverseEvent: yes|no, seriousAdverseEvent?: yes|no, reportable: yes|no,
 * assessmentRationale } records the assessment (QA investigator, while in assessment); the report kind
 * and deadline follow from the product's class and the received date.
 * → { record, allowedEvents, signature: null } (record without personal data); 401/403/404/409/422.
 */

export async function PUT(request: Request, { params }: RouteContext<'/api/complaints/[id]/assessment'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = complaintIdFrom((await params).id);
    const body = await readJson(request);
    return saveAssessment(user, { ...(body as object), id } as Parameters<typeof saveAssessment>[1]);
  });
}
