import { requireUser } from '@/lib/auth/session';
import { readJson, respond } from '@/lib/define-action';
import { updateDraft } from '@/lib/deviations/commands';
import { NotFoundError } from '@/lib/errors';

/*
 * PUT /api/deviations/:id/draft { version, title, whatHappened, occurredAt, ...the fields of POST
 * /api/deviations } → the draft as saved. Only its author, only while it is a draft; a stale version
 * answers 409.
 */

export async function PUT(request: Request, { params }: RouteContext<'/api/deviations/[id]/draft'>) {
  return respond(async () => {
    const user = await requireUser();
    const raw = (await params).id;
    if (!/^\d{1,9}$/.test(raw) || Number(raw) < 1) throw new NotFoundError('This deviation');
    const body = (await readJson(request)) as Record<string, unknown>;
    return updateDraft(user, { ...body, id: Number(raw) } as Parameters<typeof updateDraft>[1]);
  });
}
