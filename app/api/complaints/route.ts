import { assertCan } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { createComplaint } from '@/lib/complaints/commands';
import { parseComplaintListQueryStrict } from '@/lib/complaints/list-query';
import { listComplaints } from '@/lib/complaints/queries';
import { readJson, respond } from '@/lib/define-action';

/**
 * GET /api/complaints?page=&pageSize=&sort=number|received|status|due|report_due&dir=&status=&productId=
 * &category=&lot=&reportable=&lotUnknown= → { page, pageSize, total, sort, dir, rows }; rows never carry
 * the complainant's personal data, whatever the caller's role. A bad parameter is a 422 naming it.
 * POST /api/complaints { complainantName, complainantContact, complainantKind, channel, receivedOn,
 * lot?, productId?, description, unitsAffected?, personHarmed?, harmDescription?, samplesReturning? }
 * → 201 { record, allowedEvents, signature: null } (record without personal data).
 */
export async function GET(request: Request) {
  return respond(async () => {
    const user = await requireUser();
    assertCan(user, 'complaint.read');
    return listComplaints(parseComplaintListQueryStrict(new URL(request.url).searchParams), user);
  });
}

export async function POST(request: Request) {
  return respond(async () => {
    const user = await requireUser();
    return createComplaint(user, (await readJson(request)) as Parameters<typeof createComplaint>[1]);
  }, 201);
}
