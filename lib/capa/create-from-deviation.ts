import 'server-only';
import { and, asc, eq } from 'drizzle-orm';
import type { DbOrTx, Tx } from '../../db/client';
import { capas, deviations, recordLinks, stateHistory } from '../../db/schema';
import { diffFields, writeAudit } from '../audit';
import type { RecordActor } from '../records/kind';
import { allocateNumber } from '../records/numbers';

/*
 * An investigation that says a CAPA is needed raises one, in state "proposed", linked to the
 * deviation, in the same transaction as the investigation save (ICH Q10 3.2.2: the
 * corrective action follows from the investigation and is traceable to it). The CAPA workflow itself
 * is built elsewhere; this only opens the record. A CAPA is never deleted here or anywhere: saying
 * "no" afterwards leaves it for the CAPA owner to cancel with a reason.
 */

export const raisedCapaRelation = 'raised_capa';

const capaAuditFields = ['number', 'status', 'title', 'sourceType', 'sourceId', 'problemStatement', 'rootCause', 'ownerId', 'createdBy'] as const;

export interface LinkedCapa {
  id: number;
  number: string;
  status: (typeof capas.$inferSelect)['status'];
}

/** The CAPAs a deviation raised, oldest first. */
export async function listCapasRaisedBy(dbOrTx: DbOrTx, deviationId: number): Promise<LinkedCapa[]> {
  return dbOrTx
    .select({ id: capas.id, number: capas.number, status: capas.status })
    .from(recordLinks)
    .innerJoin(capas, eq(capas.id, recordLinks.toId))
    .where(
      and(
        eq(recordLinks.fromType, 'deviation'),
        eq(recordLinks.fromId, deviationId),
        eq(recordLinks.toType, 'capa'),
        eq(recordLinks.relation, raisedCapaRelation),
      ),
    )
    .orderBy(asc(capas.id));
}

function problemStatementOf(deviation: typeof deviations.$inferSelect): string {
  const label = deviation.number ?? `draft #${deviation.id}`;
  const parts = [`Raised from deviation ${label}: ${deviation.title}.`, `What happened: ${deviation.whatHappened}`];
  if (deviation.rootCause?.trim()) parts.push(`Root cause found by the investigation: ${deviation.rootCause.trim()}`);
  return parts.join('\n\n');
}

/**
 * Opens a proposed CAPA for the deviation unless it already raised one. Call inside the transaction
 * that saves the investigation, with the deviation row as saved. Returns the CAPA and whether it is new.
 */
export async function ensureCapaForDeviation(
  tx: Tx,
  actor: RecordActor,
  deviation: typeof deviations.$inferSelect,
  now: Date = new Date(),
): Promise<{ capa: LinkedCapa; created: boolean }> {
  const existing = await listCapasRaisedBy(tx, deviation.id);
  if (existing[0]) return { capa: existing[0], created: false };

  const number = await allocateNumber(tx, 'capa', now.getUTCFullYear());
  const values = {
    number,
    status: 'proposed' as const,
    version: 1,
    title: deviation.title,
    sourceType: 'deviation' as const,
    sourceId: deviation.id,
    problemStatement: problemStatementOf(deviation),
    rootCause: deviation.rootCause?.trim() || null,
    ownerId: deviation.investigatorId ?? actor.id,
    createdBy: actor.id,
  };
  const [inserted] = await tx.insert(capas).values(values).$returningId();
  const id = inserted!.id;
  await tx.insert(recordLinks).values({
    fromType: 'deviation',
    fromId: deviation.id,
    toType: 'capa',
    toId: id,
    relation: raisedCapaRelation,
    createdBy: actor.id,
  });
  await tx.insert(stateHistory).values({
    recordType: 'capa',
    recordId: id,
    event: 'create',
    fromState: null,
    toState: 'proposed',
    userId: actor.id,
    comment: `Raised from deviation ${deviation.number ?? `#${deviation.id}`}`,
    at: now,
  });
  await writeAudit(tx, {
    actor: { id: actor.id, name: actor.name },
    recordType: 'capa',
    recordId: id,
    action: 'create',
    changes: diffFields(null, values, capaAuditFields),
    reason: `The investigation of deviation ${deviation.number ?? `#${deviation.id}`} says a CAPA is needed.`,
  });
  return { capa: { id, number, status: 'proposed' }, created: true };
}
