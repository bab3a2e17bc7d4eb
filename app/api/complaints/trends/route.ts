import { requireUser } from '@/lib/auth/session';
import { assertCanReadTrends, getComplaintTrendsFor } from '@/lib/complaints/trending';
import { respond } from '@/lib/define-action';

/**
 * GET /api/complaints/trends?from=YYYY-MM&to=YYYY-MM (both optional: the last twelve months on the
 * site's calendar) → { range, today, timeZone, totals, months, categories, products, lots,
 * lotsWithComplaints, repeatLots, unmatched }, rates per million units shipped. No personal data.
 * 401 signed out; 403 for a role that reads only its own complaints; 422 naming a bad month.
 */
export async function GET(request: Request) {
  return respond(async () => {
    const user = await requireUser();
    assertCanReadTrends(user);
    return getComplaintTrendsFor(Object.fromEntries(new URL(request.url).searchParams));
  });
}
