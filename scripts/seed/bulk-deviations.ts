import { inArray, like, sql } from 'drizzle-orm';
import { writeAudit } from '../../lib/audit';
import { deviationStates } from '../../workflows/states';
import { connect } from '../../db/client';
import { batches, capsuleDefects, classifications, deviations, users } from '../../db/schema';
import { mulberry32, pick, randomInt } from './prng';

/*
 * Synthetic deviations for scale tests: many rows, inserted in multi-row chunks, on top of the demo
 * master data (run the demo seed first), spread over every state. Numbers "DEV-BX-0000001", ...
 * continue after any earlier bulk run. This is benchmark tooling, not the demo: it inserts its
 * 100,000+ rows straight into the table as the admin database user, without the write path's
 * history, signatures or per-row audit entries, because replaying each through the product would
 * take far longer than the lists it exists to measure. One audit entry records the bulk load as a
 * whole; these rows are test load, not GMP records, and belong in no demo.
 */

const chunkSize = 2_000;
const bulkPrefix = 'DEV-BX-';
const dayMs = 86_400_000;

export async function seedBulkDeviations(adminDbUrl: string, count: number): Promise<{ inserted: number; firstNumber: string }> {
  if (!Number.isInteger(count) || count < 1) throw new Error(`count must be a positive whole number, got ${count}`);
  const { conn, db } = await connect(adminDbUrl);
  try {
    const batchRows = await db
      .select({ id: batches.id, productId: batches.productId, machineId: batches.machineId, ringId: batches.ringId })
      .from(batches)
      .orderBy(batches.id)
      .limit(500);
    const defectRows = await db.select({ id: capsuleDefects.id }).from(capsuleDefects);
    const people = await db
      .select({ id: users.id, name: users.name, role: users.role })
      .from(users)
      .where(inArray(users.role, ['operator', 'supervisor', 'qa_investigator', 'qa_approver', 'admin']));
    const raisers = people.filter((u) => u.role === 'operator' || u.role === 'supervisor');
    const qa = people.filter((u) => u.role === 'qa_investigator');
    const admin = people.find((u) => u.role === 'admin');
    if (batchRows.length === 0 || defectRows.length === 0 || raisers.length === 0 || qa.length === 0 || !admin) {
      throw new Error('no demo master data found: run the demo seed (npm run db:seed) first');
    }

    const [last] = await db
      .select({ n: sql<number>`COALESCE(MAX(CAST(SUBSTRING(${deviations.number}, ${bulkPrefix.length + 1}) AS UNSIGNED)), 0)` })
      .from(deviations)
      .where(like(deviations.number, `${bulkPrefix}%`));
    const start = Number(last?.n ?? 0) + 1;
    const rand = mulberry32(start);
    const day0 = Date.parse('2024-01-01T06:00:00.000Z');

    const firstNumber = `${bulkPrefix}${String(start).padStart(7, '0')}`;
    let firstId = 0;
    for (let offset = 0; offset < count; offset += chunkSize) {
      const rows: (typeof deviations.$inferInsert)[] = [];
      for (let i = offset; i < Math.min(count, offset + chunkSize); i++) {
        const batch = pick(rand, batchRows);
        const status = pick(rand, deviationStates);
        const createdAt = new Date(day0 + randomInt(rand, 0, 1_060) * dayMs + randomInt(rand, 0, 43_200_000));
        const triaged = status !== 'draft' && status !== 'reported';
        const classification = triaged ? pick(rand, classifications) : null;
        const [s, o, d] = [randomInt(rand, 1, 10), randomInt(rand, 1, 10), randomInt(rand, 1, 10)];
        const finished = status === 'closed' || status === 'cancelled';
        rows.push({
          number: status === 'draft' ? null : `${bulkPrefix}${String(start + i).padStart(7, '0')}`,
          status,
          title: `Synthetic scale-test deviation ${start + i}`,
          whatHappened: 'Synthetic row for list performance tests.',
          defectId: pick(rand, defectRows).id,
          productId: batch.productId,
          batchId: batch.id,
          machineId: batch.machineId,
          ringId: batch.ringId,
          classification,
          severity: triaged ? s : null,
          occurrence: triaged ? o : null,
          detection: triaged ? d : null,
          rpn: triaged ? s * o * d : null,
          raisedBy: pick(rand, raisers).id,
          ownerId: status === 'draft' ? null : pick(rand, qa).id,
          occurredAt: new Date(createdAt.getTime() - randomInt(rand, 0, 4) * 3_600_000),
          reportedAt: status === 'draft' ? null : createdAt,
          dueAt: status === 'draft' ? null : new Date(createdAt.getTime() + 30 * dayMs),
          closedAt: finished ? new Date(createdAt.getTime() + randomInt(rand, 1, 60) * dayMs) : null,
          createdAt,
          updatedAt: createdAt,
        });
      }
      const [first] = await db.insert(deviations).values(rows).$returningId();
      if (offset === 0) firstId = first!.id;
    }
    await db.transaction((tx) =>
      writeAudit(tx, {
        actor: admin,
        recordType: 'deviation',
        recordId: firstId,
        action: 'created (synthetic scale-test data)',
        changes: [{ field: 'bulk_deviations', from: null, to: { count, firstNumber } }],
      }),
    );
    return { inserted: count, firstNumber };
  } finally {
    await conn.end();
  }
}
