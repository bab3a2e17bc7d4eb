import { z } from 'zod';
import { requireUser } from '@/lib/auth/session';
import { addAction, completeAction, updateAction } from '@/lib/capa/commands';
import { parseInput, readJson, respond } from '@/lib/define-action';
import { NotFoundError } from '@/lib/errors';

/*
 * POST /api/capa/:id/actions, one of:
 *   { op: 'add', version, kind, category, description, ownerId, dueAt }           (capa.plan, while planning)
 *   { op: 'update', version, actionId, kind, category, description, ownerId, dueAt } (same)
 *   { op: 'complete', actionId, actionVersion, evidence }                         (the action's owner, in implementation)
 * → { record, allowedEvents, signature: null }; 401/403/404/409/422 as `respond` maps the domain errors.
 */

const opSchema = z.object({ op: z.enum(['add', 'update', 'complete'], { error: 'op is add, update or complete.' }) }).loose();

function idOf(raw: string): number {
  if (!/^\d{1,9}$/.test(raw) || Number(raw) < 1) throw new NotFoundError('This CAPA');
  return Number(raw);
}

export async function POST(request: Request, { params }: RouteContext<'/api/capa/[id]/actions'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = idOf((await params).id);
    const body = parseInput(opSchema, await readJson(request));
    const input = { ...body, id } as Record<string, unknown> & { id: number };
    switch (body.op) {
      case 'add':
        return addAction(user, input as Parameters<typeof addAction>[1]);
      case 'update':
        return updateAction(user, input as Parameters<typeof updateAction>[1]);
      case 'complete':
        return completeAction(user, input as Parameters<typeof completeAction>[1]);
    }
  });
}
