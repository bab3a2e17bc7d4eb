import { requireUser } from '@/lib/auth/session';
import { parseInput, readJson, respond } from '@/lib/define-action';
import { applyRingEvent } from '@/lib/equipment/commands';
import { getRingDetail } from '@/lib/equipment/queries';
import { ringEventSchema } from '@/lib/equipment/schemas';
import { NotFoundError } from '@/lib/errors';

/*
 * One filling ring as JSON. GET: the ring with its history, signatures, audit trail (for roles that
 * may read it) and the events the caller may send now. POST { event, version, reason, condition?,
 * password? }: sends one lifecycle event through the same command as the ring page's forms.
 * Errors answer { message, fieldErrors } with 401, 403, 404, 409 or 422.
 */

function ringId(raw: string): number {
  if (!/^\d{1,9}$/.test(raw)) throw new NotFoundError('This filling ring');
  return Number(raw);
}

export async function GET(_request: Request, { params }: RouteContext<'/api/rings/[id]'>) {
  return respond(async () => {
    const user = await requireUser();
    return getRingDetail(user, ringId((await params).id));
  });
}

export async function POST(request: Request, { params }: RouteContext<'/api/rings/[id]'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = ringId((await params).id);
    const body = await readJson(request);
    const input = parseInput(ringEventSchema, { ...(body && typeof body === 'object' ? body : {}), id });
    return applyRingEvent(user, input);
  });
}
