import 'server-only';
import { count, desc, eq, inArray } from 'drizzle-orm';
import { z } from 'zod';
import { db, type DbOrTx } from '../../db/client';
import { batchStatuses, batches, products } from '../../db/schema';

/* Read-only master data for lists and pickers. Writes belong to master-data administration. */

export type BatchStatus = (typeof batchStatuses)[number];
export { batchStatuses };

export const batchStatusLabels: Record<BatchStatus, string> = {
  in_process: 'In process',
  on_hold: 'On hold',
  released: 'Released',
  rejected: 'Rejected',
};

export interface BatchRowDto {
  id: number;
  lotNumber: string;
  productCode: string;
  productName: string;
  strength: string;
  sizeCapsules: number;
  status: BatchStatus;
  /** YYYY-MM-DD, the plant's calendar date. */
  manufacturedOn: string;
  expiresOn: string | null;
  regulatoryClass: 'drug' | 'supplement';
}

export interface BatchPage {
  page: number;
  pageSize: number;
  total: number;
  status: BatchStatus | null;
  rows: BatchRowDto[];
}

export const batchPageSize = 50;

/** `?page=&status=` from a page URL or an API request; anything unreadable falls back to the first page of all. */
export const batchListQuerySchema = z.object({
  page: z.coerce.number().int().min(1).max(100_000).catch(1),
  status: z.enum(batchStatuses).nullable().catch(null),
});

export function parseBatchListQuery(params: Record<string, string | string[] | undefined>) {
  const first = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v);
  return batchListQuerySchema.parse({ page: first(params.page) ?? 1, status: first(params.status) ?? null });
}

/**
 * Newest first, paged in SQL. The page's ids come from the batches index alone (manufactured_on, id
 * or status, manufactured_on); only those 50 rows are then joined to their products. Joined in one
 * statement, MariaDB starts from the small products table and sorts every batch in a temporary table
 * (measured: 400-600 ms at 100,000 batches, against a few ms this way).
 */
export async function listBatches(
  options: { page: number; status?: BatchStatus | null; pageSize?: number },
  database: DbOrTx = db,
): Promise<BatchPage> {
  const pageSize = options.pageSize ?? batchPageSize;
  const status = options.status ?? null;
  const where = status ? eq(batches.status, status) : undefined;
  const [totalRow] = await database.select({ n: count() }).from(batches).where(where);
  const order = [desc(batches.manufacturedOn), desc(batches.id)];
  const pageIds = (
    await database
      .select({ id: batches.id })
      .from(batches)
      .where(where)
      .orderBy(...order)
      .limit(pageSize)
      .offset((options.page - 1) * pageSize)
  ).map((r) => r.id);
  const rows =
    pageIds.length === 0
      ? []
      : await database
          .select({
            id: batches.id,
            lotNumber: batches.lotNumber,
            productCode: products.code,
            productName: products.name,
            strength: products.strength,
            sizeCapsules: batches.sizeCapsules,
            status: batches.status,
            manufacturedOn: batches.manufacturedOn,
            expiresOn: batches.expiresOn,
            regulatoryClass: products.regulatoryClass,
          })
          .from(batches)
          .innerJoin(products, eq(products.id, batches.productId))
          .where(inArray(batches.id, pageIds))
          .orderBy(...order);
  return { page: options.page, pageSize, total: totalRow?.n ?? 0, status, rows };
}

/** How many batches sit in each status, for the overview. */
export async function countBatchesByStatus(database: DbOrTx = db): Promise<Record<BatchStatus, number>> {
  const rows = await database
    .select({ status: batches.status, n: count() })
    .from(batches)
    .groupBy(batches.status);
  const counts = Object.fromEntries(batchStatuses.map((s) => [s, 0])) as Record<BatchStatus, number>;
  for (const row of rows) counts[row.status] = row.n;
  return counts;
}
