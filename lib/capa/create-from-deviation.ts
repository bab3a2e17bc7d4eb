import 'server-only';
import { and, asc, eq } from 'drizzle-orm';
import type { DbOrTx, Tx } from '../../db/client';
import { capas, deviations, recordLinks } from '../../db/schema';
import type { RecordActor } from '../records/kind';
import { insertCapa, raisedCapaRelation } from './commands';

/*
 * An investigation that says a CAPA is needed raises one, in state "proposed", linked to the
 * deviation, in the same transaction as the investigation save (ICH Q10 3.2.2: the
 * corrective action follows from the investigation and is traceable to it). The CAPA workflow itself
 * is built elsewhere; this only opens the record. A CAPA is never deleted here or anywhere: saying
 * "no" afterwards leaves it for the CAPA owner to cancel with a reason.
 */

export { raisedCapaRelation };

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
 * that saves the investigation, with the deviation row as saved; run afterCommit once it commits.
 * The CAPA goes through the CAPA's own insert path (number, history, audit, the owner's notice, the
 * link back to the deviation).
 */
export async function ensureCapaForDeviation(
  tx: Tx,
  actor: RecordActor,
  deviation: typeof deviations.$inferSelect,
): Promise<{ capa: LinkedCapa; created: boolean; afterCommit: () => Promise<void> }> {
  const existing = await listCapasRaisedBy(tx, deviation.id);
  if (existing[0]) return { capa: existing[0], created: false, afterCommit: async () => {} };
  const label = deviation.number ?? `#${deviation.id}`;
  const { row, afterCommit } = await insertCapa(
    tx,
    actor,
    {
      title: deviation.title,
      sourceType: 'deviation',
      sourceId: deviation.id,
      problemStatement: problemStatementOf(deviation),
      rootCause: deviation.rootCause?.trim() || null,
      ownerId: deviation.investigatorId ?? actor.id,
    },
    `The investigation of deviation ${label} says a CAPA is needed.`,
  );
  return { capa: { id: row.id, number: row.number, status: row.status }, created: true, afterCommit };
}
