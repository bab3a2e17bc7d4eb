import { and, eq, like } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { complaints, products } from '@/db/schema';
import { regulatoryDeadline } from '@/lib/clocks/regulatory';
import { complaintKind } from '@/lib/complaints/kind';
import { listSignatures } from '@/lib/signatures';
import { loadRelated, signedContentOf } from '@/lib/records/write-path';
import { complaintStates } from '@/workflows/states';

/*
 * The demo complaints (scripts/seed/complaints.ts) as a reviewer would look at them: every state present,
 * a lot with more than one complaint, a serious adverse event with a dietary supplement reported within
 * 15 business days (21 U.S.C. 379aa-1(c)(1)), a drug field alert within 3 working days
 * (21 CFR 314.81(b)(1)), and every seeded signature still matching the content it signed (21 CFR 11.70).
 */

afterAll(closeDb);

const demo = () => db.select().from(complaints).where(like(complaints.number, 'CMP-2026-%'));
/*
 * The seeded ones: the seed dates them inside the scenario; other test files add complaints of their
 * own today (and reopen one after closing it, which rightly breaks its closing signature).
 */
const seeded = async () => (await demo()).filter((r) => r.createdAt < new Date('2026-11-28T00:00:00Z'));

describe('demo complaints', () => {
  it('hold complaints in every state, July to November 2026', async () => {
    const rows = await demo();
    const seeded = rows.filter((r) => r.receivedOn >= '2026-07-01' && r.receivedOn <= '2026-11-27' && r.createdAt < new Date('2026-11-28T00:00:00Z'));
    expect(new Set(seeded.map((r) => r.status))).toEqual(new Set(complaintStates));
    expect(seeded.length).toBeGreaterThanOrEqual(20);
  });

  it('show one lot with more than one complaint (trending, EU GMP 8.16)', async () => {
    const byBatch = new Map<number, number>();
    for (const r of await demo()) if (r.batchId) byBatch.set(r.batchId, (byBatch.get(r.batchId) ?? 0) + 1);
    expect(Math.max(...byBatch.values())).toBeGreaterThanOrEqual(3);
  });

  it('report a serious adverse event with a supplement on the 15-business-day clock, and a drug field alert on the 3-working-day clock', async () => {
    const rows = await db
      .select({ c: complaints, regulatoryClass: products.regulatoryClass })
      .from(complaints)
      .innerJoin(products, eq(products.id, complaints.productId))
      .where(and(eq(complaints.reportable, true), like(complaints.number, 'CMP-2026-%')));
    const sae = rows.filter((r) => r.regulatoryClass === 'supplement' && r.c.seriousAdverseEvent);
    const alert = rows.filter((r) => r.regulatoryClass === 'drug');
    expect(sae.length).toBeGreaterThanOrEqual(1);
    expect(alert.length).toBeGreaterThanOrEqual(1);
    for (const r of sae) expect(r.c.reportDueOn).toBe(regulatoryDeadline('dietary_supplement_sae', r.c.receivedOn, r.c.receivedOn).deadline);
    for (const r of alert) expect(r.c.reportDueOn).toBe(regulatoryDeadline('field_alert_report', r.c.receivedOn, r.c.receivedOn).deadline);
    // The submitted ones went in on time.
    for (const r of rows.filter((x) => x.c.reportSubmittedAt)) expect(r.c.reportSubmittedAt!.toISOString().slice(0, 10) <= r.c.reportDueOn!).toBe(true);
  });

  it('keep every seeded signature matching what it signed (21 CFR 11.70)', async () => {
    const rows = await seeded();
    expect(rows.length).toBeGreaterThanOrEqual(20);
    for (const row of rows) {
      const facts = await loadRelated(complaintKind, db, row);
      const content = (meaning: string) => signedContentOf(complaintKind, meaning, row, facts);
      for (const s of await listSignatures(db, 'complaint', row.id, content)) expect(s.matches || s.supersededBy !== null, `${row.number} ${s.meaning}`).toBe(true);
    }
  });

  it('use invented complainants on example domains or the reserved 555-01xx numbers', async () => {
    for (const row of await demo()) {
      if (row.createdAt >= new Date('2026-11-28T00:00:00Z')) continue;
      expect(row.complainantContact).toMatch(/\.example$|^\+1 555 01\d\d$|Brackwater$/);
    }
  });
});
