import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, connect, db } from '@/db/client';
import { auditEntries, signatures, users } from '@/db/schema';
import { quarantineRing, retireRing, returnRingToService } from '@/lib/equipment/commands';
import { getRingDetail } from '@/lib/equipment/queries';
import { type RingRow, ringKind } from '@/lib/equipment/ring-kind';
import { signedContentOf } from '@/lib/records/write-path';
import { ValidationError } from '@/lib/errors';
import { listSignatures, signatureContentHash, signWithPassword } from '@/lib/signatures';
import { getRing, makeRing, makeUser, testPassword } from '../support/fixtures';

/*
 * Electronic signatures against the real database.
 * 21 CFR 11.50(a): the signed record shows printed name, date and time, and meaning.
 * 21 CFR 11.70: the signature is linked to its record (here by a hash of the signed content).
 * 21 CFR 11.200(a)(1): a signature needs both components, the user and the password, re-entered.
 * 21 CFR 11.300(d): a wrong password is detected and counted (toward the lock-out).
 */

let admin: Awaited<ReturnType<typeof connect>>;
beforeAll(async () => {
  admin = await connect(process.env.DATABASE_ADMIN_URL!);
});
afterAll(async () => {
  await admin?.conn.end();
  await closeDb();
});

/** What the ring kind says a "verified" signature covers (it does not depend on who quarantined the ring). */
const ringSignedContent = (row: RingRow) => signedContentOf(ringKind, 'verified', row, { quarantinedBy: null })!;

const failedSignins = async (userId: number) =>
  (await db.select({ n: users.failedSignins }).from(users).where(eq(users.id, userId)))[0]!.n;

describe('electronic signatures', () => {
  it('stores name, title, meaning, UTC time, version and content hash, and audits the signing', async () => {
    const signer = await makeUser('qa_investigator', { title: 'QA Specialist' });
    const ring = await makeRing({ status: 'quarantined', statusReason: 'Suspected dent' });
    const before = Date.now();
    const out = await returnRingToService(signer, {
      id: ring.id,
      version: ring.version,
      reason: 'Gauge check passed',
      condition: 'good',
      password: testPassword,
    });
    const [row] = await db.select().from(signatures).where(eq(signatures.id, out.signature!.id));
    expect(row).toMatchObject({
      recordType: 'filling_ring',
      recordId: ring.id,
      userId: signer.id,
      printedName: signer.name,
      printedTitle: 'QA Specialist',
      meaning: 'verified',
      recordVersion: ring.version + 1,
    });
    const signedAt = Date.parse(`${row!.signedAt.replace(' ', 'T')}Z`);
    expect(signedAt).toBeGreaterThanOrEqual(before - 1000);
    expect(signedAt).toBeLessThanOrEqual(Date.now() + 1000);
    const current = await getRing(ring.id);
    expect(row!.contentHash).toBe(
      signatureContentHash('filling_ring', ring.id, ring.version + 1, ringSignedContent(current)),
    );

    const [entry] = await db
      .select()
      .from(auditEntries)
      .where(and(eq(auditEntries.recordType, 'filling_ring'), eq(auditEntries.recordId, ring.id), eq(auditEntries.action, 'signed')));
    expect(entry).toMatchObject({ userId: signer.id, reason: 'Gauge check passed' });
    expect(JSON.parse(entry!.changes)[0].to).toMatchObject({ id: row!.id, meaning: 'verified' });
  });

  it('signs nothing on a wrong password, changes nothing, and counts the failure', async () => {
    const approver = await makeUser('qa_approver');
    const ring = await makeRing({ status: 'quarantined', statusReason: 'Cracked segment' });
    expect(await failedSignins(approver.id)).toBe(0);
    const err = await retireRing(approver, {
      id: ring.id,
      version: ring.version,
      reason: 'Cracked',
      password: 'not the password',
    }).catch((e) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors.password?.[0]).toMatch(/password is not correct/i);
    expect(await failedSignins(approver.id)).toBe(1);
    expect(await db.select().from(signatures).where(and(eq(signatures.recordType, 'filling_ring'), eq(signatures.recordId, ring.id)))).toHaveLength(0);
    const after = await getRing(ring.id);
    expect(after).toMatchObject({ status: 'quarantined', version: ring.version, retiredAt: null });
    const failures = await db
      .select()
      .from(auditEntries)
      .where(and(eq(auditEntries.recordType, 'user'), eq(auditEntries.recordId, approver.id)));
    expect(failures.map((f) => f.action)).toContain('signature_password_failed');
  });

  it('shows a signature as no longer matching once the record changes after signing', async () => {
    const investigator = await makeUser('qa_investigator');
    const ring = await makeRing({ status: 'quarantined', statusReason: 'Suspected dent' });
    await returnRingToService(investigator, {
      id: ring.id,
      version: ring.version,
      reason: 'Within tolerance',
      condition: 'worn',
      password: testPassword,
    });
    let detail = await getRingDetail(investigator, ring.id);
    expect(detail.signatures.map((s) => s.matches)).toEqual([true]);

    await quarantineRing(investigator, { id: ring.id, version: ring.version + 1, reason: 'New dent', condition: 'dented' });
    detail = await getRingDetail(investigator, ring.id);
    expect(detail.signatures.map((s) => s.matches)).toEqual([false]);
    expect(detail.signatures[0]!.intact).toBe(true);
  });

  it('signs a record without changing it, binding the signature to the content given', async () => {
    const reviewer = await makeUser('qa_approver');
    const ring = await makeRing();
    const content = ringSignedContent(ring);
    const sig = await signWithPassword(reviewer.id, testPassword, {
      recordType: 'filling_ring',
      recordId: ring.id,
      recordVersion: ring.version,
      content,
      meaning: 'reviewed',
    });
    expect(sig).toMatchObject({ meaning: 'reviewed', meaningLabel: 'Reviewed', matches: true, intact: true });
    const [listed] = await listSignatures(db, 'filling_ring', ring.id, () => ringSignedContent({ ...ring, condition: 'worn' }));
    expect(listed).toMatchObject({ id: sig.id, matches: false });
  });

  it('shows a signature whose printed name was edited in the database as not intact', async () => {
    const reviewer = await makeUser('qa_approver');
    const ring = await makeRing();
    const sig = await signWithPassword(reviewer.id, testPassword, {
      recordType: 'filling_ring',
      recordId: ring.id,
      recordVersion: ring.version,
      content: ringSignedContent(ring),
      meaning: 'reviewed',
    });
    await admin.db.update(signatures).set({ printedName: 'Somebody Else' }).where(eq(signatures.id, sig.id));
    const [listed] = await listSignatures(db, 'filling_ring', ring.id, () => ringSignedContent(ring));
    expect(listed).toMatchObject({ printedName: 'Somebody Else', matches: true, intact: false });
  });
});
