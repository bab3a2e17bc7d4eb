import { z } from 'zod';
import { requireUser } from '@/lib/auth/session';
import { readJson, respond } from '@/lib/define-action';
import { extendHolds, listHoldSuggestions, recordDisposition } from '@/lib/deviations/batches';
import type { ExtendHoldsInput, RecordDispositionInput } from '@/lib/deviations/schemas';
import { NotFoundError } from '@/lib/errors';
import { parseInput } from '@/lib/validation/parse';

/*
 * GET /api/deviations/:id/batches → batches that may share the deviation's cause, to extend its
 * holds (QA investigators). POST { action: 'disposition', version, batchId, disposition, note?,
 * inspectionLevel?, aql?, inspectionSeverity? } records a held batch's disposition; POST
 * { action: 'hold', version, batchIds } extends the holds. The same commands as the page;
 * 401/403/404/409/422 as `respond` maps the domain errors.
 */

function idOf(raw: string): number {
  if (!/^\d{1,9}$/.test(raw) || Number(raw) < 1) throw new NotFoundError('This deviation');
  return Number(raw);
}

const requestSchema = z.object({ action: z.enum(['disposition', 'hold'], { error: "Say what to do: 'disposition' or 'hold'." }) }).loose();

export async function GET(_request: Request, { params }: RouteContext<'/api/deviations/[id]/batches'>) {
  return respond(async () => {
    const user = await requireUser();
    return listHoldSuggestions(idOf((await params).id), user);
  });
}

export async function POST(request: Request, { params }: RouteContext<'/api/deviations/[id]/batches'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = idOf((await params).id);
    const { action, ...body } = parseInput(requestSchema, await readJson(request));
    // The commands parse the rest of the body themselves, with field errors for a 422.
    return action === 'disposition'
      ? recordDisposition(user, { ...body, id } as RecordDispositionInput)
      : extendHolds(user, { ...body, id } as ExtendHoldsInput);
  });
}
