import { eq, like, sql } from 'drizzle-orm';
import { writeAudit } from '../../lib/audit';
import { connect } from '../../db/client';
import { batches, fillingRings, products, users } from '../../db/schema';
import { mulberry32, pick, randomInt } from './prng';

/*
 * Synthetic batches for scale tests: many rows, inserted in multi-row chunks, on top of the demo
 * master data (run the demo seed first). Lot numbers "BWX-0000001", ... continue after any earlier
 * bulk run. This is benchmark tooling, not the demo: it inserts its 100,000+ rows straight into the
 * table as the admin database user, because going through the product row by row would take far
 * longer than the lists it exists to measure. One audit entry records the bulk load as a whole;
 * these rows are test load, not GMP records.
 */

const chunkSize = 2_000;
const bulkPrefix = 'BWX-';

export async function seedBulkBatches(adminDbUrl: string, count: number): Promise<{ inserted: number; firstLot: string }> {
  if (!Number.isInteger(count) || count < 1) throw new Error(`count must be a positive whole number, got ${count}`);
  const { conn, db } = await connect(adminDbUrl);
  try {
    const productRows = await db.select({ id: products.id, size: products.capsuleSize }).from(products);
    const ringRows = await db
      .select({ id: fillingRings.id, machineId: fillingRings.machineId, size: fillingRings.capsuleSize })
      .from(fillingRings)
      .where(eq(fillingRings.status, 'in_service'));
    const [admin] = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.role, 'admin')).limit(1);
    const usable = productRows
      .map((p) => ({ product: p, rings: ringRows.filter((r) => r.size === p.size) }))
      .filter((x) => x.rings.length > 0);
    if (usable.length === 0 || !admin) throw new Error('no demo master data found: run the demo seed (npm run db:seed) first');

    const [last] = await db
      .select({ n: sql<number>`COALESCE(MAX(CAST(SUBSTRING(${batches.lotNumber}, 5) AS UNSIGNED)), 0)` })
      .from(batches)
      .where(like(batches.lotNumber, `${bulkPrefix}%`));
    const start = Number(last?.n ?? 0) + 1;
    const rand = mulberry32(start);
    const day0 = Date.parse('2024-01-01T00:00:00.000Z');

    const firstLot = `${bulkPrefix}${String(start).padStart(7, '0')}`;
    let firstId = 0;
    for (let offset = 0; offset < count; offset += chunkSize) {
      const rows = [];
      for (let i = offset; i < Math.min(count, offset + chunkSize); i++) {
        const { product, rings } = pick(rand, usable);
        const ring = pick(rand, rings);
        const manufacturedOn = new Date(day0 + randomInt(rand, 0, 1_000) * 86_400_000).toISOString().slice(0, 10);
        const released = rand() < 0.9;
        const sizeCapsules = randomInt(rand, 10, 60) * 5_000;
        rows.push({
          lotNumber: `${bulkPrefix}${String(start + i).padStart(7, '0')}`,
          productId: product.id,
          machineId: ring.machineId,
          ringId: ring.id,
          sizeCapsules,
          unitsShipped: released ? sizeCapsules : 0,
          status: released ? ('released' as const) : ('in_process' as const),
          manufacturedOn,
        });
      }
      const [first] = await db.insert(batches).values(rows).$returningId();
      if (offset === 0) firstId = first!.id;
    }
    await db.transaction((tx) =>
      writeAudit(tx, {
        actor: admin,
        recordType: 'batch',
        recordId: firstId,
        action: 'created (synthetic scale-test data)',
        changes: [{ field: 'bulk_batches', from: null, to: { count, firstLot } }],
      }),
    );
    return { inserted: count, firstLot };
  } finally {
    await conn.end();
  }
}
