import { requireUser } from '@/lib/auth/session';
import { readJson, respond } from '@/lib/define-action';
import { recordTriage } from '@/lib/deviations/commands';
import { NotFoundError } from '@/lib/errors';

/*
 * PUT /api/deviations/:id/triage { version, severity, occurrence, detection, classification?,
 * classificationReason?, investigatorId?, dueAt? } → the deviation as saved. QA investigators while
 * the deviation is in triage; the class is checked on the server against the defect's catalogue class
 * (a lower class needs a reason); a stale version answers 409.
 */

export async function PUT(request: Request, { params }: RouteContext<'/api/deviations/[id]/triage'>) {
  return respond(async () => {
    const user = await requireUser();
    const raw = (await params).id;
    if (!/^\d{1,9}$/.test(raw) || Number(raw) < 1) throw new NotFoundError('This deviation');
    const body = (await readJson(request)) as Record<string, unknown>;
    return recordTriage(user, { ...body, id: Number(raw) } as Parameters<typeof recordTriage>[1]);
  });
}
