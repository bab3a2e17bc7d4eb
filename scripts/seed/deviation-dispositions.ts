import { and, asc, desc, eq, inArray } from 'drizzle-orm';
import { diffFields, writeDemoAuditAt } from '../../lib/audit';
import { defaultAql, defaultInspectionLevel, defaultSeverity, reInspectionPlan } from '../../lib/deviations/disposition-plan';
import type { Tx } from '../../db/client';
import { batches, deviationBatches, deviations, type dispositions, stateHistory, users } from '../../db/schema';

/*
 * Demo dispositions of the batches the seeded deviations hold, recorded as lib/deviations/batches.ts
 * records them: in approval and closed every held batch has its disposition (closed ones agree with
 * the batch status the scenario set: released → release, rejected → reject); under investigation
 * those the investigator has recommended carry the recommendation as the proposal, the others are
 * still open. A re-inspection gets its ISO 2859-1 plan from the batch size. Each change is audited
 * on the deviation by the person who would have made it, dated just before the next step, so the
 * timeline reads in order. Deterministic: everything follows from the rows the seed wrote.
 */

type Disposition = (typeof dispositions)[number];

const fields = ['recommendedDisposition', 'disposition', 'dispositionNote', 'samplingPlan'] as const;

const fromBatchStatus = (status: (typeof batches.$inferSelect)['status']): Disposition | null =>
  status === 'released' ? 'release' : status === 'rejected' ? 'reject' : null;

function planFor(lotSize: number): string | null {
  const plan = reInspectionPlan({ lotSize, level: defaultInspectionLevel, aql: defaultAql, severity: defaultSeverity });
  return plan.ok ? plan.summary : null;
}

export async function seedDeviationDispositions(tx: Tx): Promise<void> {
  const held = await tx
    .select({
      row: deviationBatches,
      status: deviations.status,
      number: deviations.number,
      investigatorId: deviations.investigatorId,
      lot: batches.lotNumber,
      lotSize: batches.sizeCapsules,
      batchStatus: batches.status,
    })
    .from(deviationBatches)
    .innerJoin(deviations, eq(deviations.id, deviationBatches.deviationId))
    .innerJoin(batches, eq(batches.id, deviationBatches.batchId))
    .where(and(eq(deviationBatches.onHold, true), inArray(deviations.status, ['investigation', 'approval', 'closed'])))
    .orderBy(asc(deviations.id), asc(batches.lotNumber));

  for (const h of held) {
    const before = h.row;
    let disposition = before.disposition;
    if (disposition === null) {
      disposition = h.status === 'closed' ? fromBatchStatus(h.batchStatus) ?? before.recommendedDisposition : before.recommendedDisposition;
      // In approval nothing may stay open; with no recommendation on record the batch is re-inspected (common practice).
      if (disposition === null && h.status === 'approval') disposition = 're_inspect';
    }
    if (disposition === null) continue;
    const after = {
      ...before,
      recommendedDisposition: before.recommendedDisposition ?? disposition,
      disposition,
      samplingPlan: disposition === 're_inspect' && before.samplingPlan === null ? planFor(h.lotSize) : before.samplingPlan,
    };
    const changes = diffFields(before, after, fields).map((c) => ({ ...c, field: `${c.field} (${h.lot})` }));
    if (changes.length === 0) continue;

    await tx
      .update(deviationBatches)
      .set({ recommendedDisposition: after.recommendedDisposition, disposition: after.disposition, samplingPlan: after.samplingPlan })
      .where(and(eq(deviationBatches.deviationId, before.deviationId), eq(deviationBatches.batchId, before.batchId)));

    // The investigator records it during the investigation: a minute before it went for approval, or a
    // day after it opened for those still under investigation; on a closed one the approver who closed it.
    const [step] = await tx
      .select({ at: stateHistory.at, userId: stateHistory.userId })
      .from(stateHistory)
      .where(
        and(
          eq(stateHistory.recordType, 'deviation'),
          eq(stateHistory.recordId, before.deviationId),
          eq(stateHistory.toState, h.status),
        ),
      )
      .orderBy(desc(stateHistory.at))
      .limit(1);
    if (!step) throw new Error(`demo deviation ${h.number} has no step into ${h.status}`);
    const at = new Date(step.at.getTime() + (h.status === 'investigation' ? 86_400_000 : -60_000));
    const actorId = h.status === 'closed' ? step.userId : (h.investigatorId ?? step.userId);
    const [actor] = await tx.select({ id: users.id, name: users.name }).from(users).where(eq(users.id, actorId));
    await writeDemoAuditAt(
      tx,
      { actor: actor!, recordType: 'deviation', recordId: before.deviationId, action: 'record_disposition', changes },
      at,
    );
  }
}
