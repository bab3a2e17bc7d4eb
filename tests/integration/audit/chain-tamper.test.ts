import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, connect, db } from '@/db/client';
import { auditEntries } from '@/db/schema';
import { verifyAuditChain, writeAudit } from '@/lib/audit';
import { makeRing, makeUser } from '../support/fixtures';

/*
 * 21 CFR 11.10(e) (secure, computer-generated audit trail that does not obscure earlier entries)
 * and 11.10(a) (ability to discern invalid or altered records). Someone with direct database
 * access, here the admin account, changes one field of one entry; the chain check names that
 * entry. The chain is global, so the row is put back in a finally block.
 */

let admin: Awaited<ReturnType<typeof connect>>;

beforeAll(async () => {
  const url = process.env.DATABASE_ADMIN_URL;
  if (!url) throw new Error('DATABASE_ADMIN_URL is not set; run through npm test');
  admin = await connect(url);
});

afterAll(async () => {
  await admin?.conn.end();
  await closeDb();
});

async function entryFor(reason: string) {
  const [user, ring] = await Promise.all([makeUser('qa_investigator'), makeRing()]);
  await db.transaction((tx) =>
    writeAudit(tx, {
      actor: { id: user.id, name: user.name },
      recordType: 'filling_ring',
      recordId: ring.id,
      action: 'chain_check',
      changes: [{ field: 'condition', from: 'good', to: 'worn' }],
      reason,
    }),
  );
  const [row] = await db
    .select()
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, 'filling_ring'), eq(auditEntries.recordId, ring.id), eq(auditEntries.action, 'chain_check')));
  return row!;
}

describe('audit chain tamper detection', () => {
  it('is intact before anyone interferes', async () => {
    await entryFor('baseline');
    expect(await verifyAuditChain(db)).toMatchObject({ ok: true });
  });

  it("names the entry whose reason was changed behind the application's back", async () => {
    const entry = await entryFor('Ring measured, within tolerance');
    try {
      await admin.db.update(auditEntries).set({ reason: 'Ring scrapped' }).where(eq(auditEntries.id, entry.id));
      const report = await verifyAuditChain(db);
      expect(report).toMatchObject({ ok: false, id: entry.id });
      expect(report.ok === false && report.problem).toMatch(/changed after it was written/);
    } finally {
      await admin.db.update(auditEntries).set({ reason: entry.reason }).where(eq(auditEntries.id, entry.id));
    }
    expect(await verifyAuditChain(db)).toMatchObject({ ok: true });
  });

  it('names the entry whose recorded changes were rewritten', async () => {
    const entry = await entryFor('Condition downgraded');
    try {
      await admin.db
        .update(auditEntries)
        .set({ changes: JSON.stringify([{ field: 'condition', from: 'good', to: 'good' }]) })
        .where(eq(auditEntries.id, entry.id));
      expect(await verifyAuditChain(db)).toMatchObject({ ok: false, id: entry.id });
    } finally {
      await admin.db.update(auditEntries).set({ changes: entry.changes }).where(eq(auditEntries.id, entry.id));
    }
    expect(await verifyAuditChain(db)).toMatchObject({ ok: true });
  });
});
