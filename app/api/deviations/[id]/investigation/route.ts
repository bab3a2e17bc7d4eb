import { requireUser } from '@/lib/auth/session';
import { readJson, respond } from '@/lib/define-action';
import { getInvestigationView, saveInvestigation } from '@/lib/deviations/investigation';
import type { SaveInvestigationInput } from '@/lib/deviations/investigation-schema';
import { NotFoundError } from '@/lib/errors';

/*
 * GET /api/deviations/:id/investigation → the investigation section (report, five whys, the six
 * branches with this defect's probable causes and their marks, conclusions, CAPAs raised, canEdit).
 * PUT with { version, investigationReport?, fiveWhys?, causeAnalysis?, rootCauseCategory?, rootCause?,
 * productImpact?, capaRequired? } saves the whole section through the same command the page uses:
 * 403 for anyone but the assigned investigator, 409 for the wrong state or a stale version, 422 per field.
 */

function idOf(raw: string): number {
  if (!/^\d{1,9}$/.test(raw) || Number(raw) < 1) throw new NotFoundError('This deviation');
  return Number(raw);
}

export async function GET(_request: Request, { params }: RouteContext<'/api/deviations/[id]/investigation'>) {
  return respond(async () => {
    const user = await requireUser();
    return getInvestigationView(idOf((await params).id), user);
  });
}

export async function PUT(request: Request, { params }: RouteContext<'/api/deviations/[id]/investigation'>) {
  return respond(async () => {
    const user = await requireUser();
    const id = idOf((await params).id);
    const body = await readJson(request);
    const fields = body && typeof body === 'object' && !Array.isArray(body) ? body : {};
    // The schema checks every field; the id comes from the path, never the body.
    return saveInvestigation(user, { ...(fields as SaveInvestigationInput), id });
  });
}
