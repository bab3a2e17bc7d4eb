import { and, asc, eq, gt, isNull, lte, or } from 'drizzle-orm';
import { complaints, products, users } from '../../db/schema';
import type { ReminderSource } from '../reminders/run';
import { regulatoryRules, type RegulatoryClockKind } from '../clocks/regulatory';

/*
 * Reminders of report deadlines: every reportable complaint whose report has not been recorded as
 * submitted, to its owner, from three days before the deadline and every day once it has passed
 * (lib/reminders/rules.ts). The deadline is a date column; the sweep's cursor is midnight UTC of it.
 */

const midnight = (day: string) => new Date(`${day}T00:00:00.000Z`);

export const complaintReportSource: ReminderSource = async (database, horizon, after, limit) => {
  const horizonDay = horizon.toISOString().slice(0, 10);
  const afterDay = after ? after.dueAt.toISOString().slice(0, 10) : null;
  const rows = await database
    .select({
      id: complaints.id,
      number: complaints.number,
      reportKind: complaints.reportKind,
      reportDueOn: complaints.reportDueOn,
      product: products.name,
      ownerId: users.id,
      ownerEmail: users.email,
    })
    .from(complaints)
    .innerJoin(users, and(eq(users.id, complaints.ownerId), eq(users.active, true)))
    .leftJoin(products, eq(products.id, complaints.productId))
    .where(
      and(
        eq(complaints.reportable, true),
        isNull(complaints.reportSubmittedAt),
        lte(complaints.reportDueOn, horizonDay),
        after && afterDay
          ? or(gt(complaints.reportDueOn, afterDay), and(eq(complaints.reportDueOn, afterDay), gt(complaints.id, after.id)))
          : undefined,
      ),
    )
    .orderBy(asc(complaints.reportDueOn), asc(complaints.id))
    .limit(limit);
  return rows
    .filter((r): r is typeof r & { reportDueOn: string } => r.reportDueOn !== null)
    .map((r) => {
      const rule = r.reportKind ? regulatoryRules[r.reportKind as RegulatoryClockKind] : null;
      return {
        recordType: 'complaint',
        recordId: r.id,
        cursorId: r.id,
        itemKey: `complaint_report:${r.id}`,
        noun: 'report to FDA',
        number: r.number,
        title: `${rule ? `${rule.title} (${rule.citation})` : 'Report'}${r.product ? `: ${r.product}` : ''}`,
        dueAt: midnight(r.reportDueOn),
        recipient: { id: r.ownerId, email: r.ownerEmail },
        role: 'You receive this because you own this complaint and its report to FDA is not recorded as submitted.',
        path: `/complaints/${r.id}`,
      };
    });
};
