import { and, eq, like, lte } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { capas, recordLinks, signatures } from '@/db/schema';
import { getCapaDetail } from '@/lib/capa/detail';
import { capaKind } from '@/lib/capa/kind';
import { loadRelated, signedContentOf } from '@/lib/records/write-path';
import { listSignatures } from '@/lib/signatures';
import { scenarioEnd } from '@/scripts/seed/scenario';
import { capaStates } from '@/workflows/states';

/*
 * The demo CAPAs as seeded: every state present, each linked to the deviation it came from, and the
 * signatures still matching what was signed (21 CFR 11.70). The seed numbers them CAPA-2026-0001...
 * Other files in this run add CAPAs of their own today; the seed's are dated inside its scenario.
 */

const seededBy = lte(capas.createdAt, new Date(`${scenarioEnd}T23:59:59.999Z`));

afterAll(closeDb);

describe('demo CAPAs', () => {
  it('hold every lifecycle state, each raised from a deviation and linked back', async () => {
    const demo = await db.select().from(capas).where(like(capas.number, 'CAPA-2026-%'));
    expect(new Set(demo.map((c) => c.status))).toEqual(new Set(capaStates));
    for (const c of demo.filter((c) => c.sourceType === 'deviation' && c.number <= 'CAPA-2026-0013')) {
      const links = await db.select().from(recordLinks).where(and(eq(recordLinks.toType, 'capa'), eq(recordLinks.toId, c.id)));
      expect(links.map((l) => [l.fromType, l.fromId])).toContainEqual(['deviation', c.sourceId]);
    }
  });

  it('show the recurrence evidence of the CAPAs in the effectiveness check, and signatures that still match', async () => {
    const inCheck = await db.select().from(capas).where(and(eq(capas.status, 'effectiveness_check'), seededBy));
    expect(inCheck.length).toBeGreaterThanOrEqual(1);
    const approver = { id: 0, name: 'Reader', role: 'qa_approver' as const };
    for (const c of inCheck) {
      const detail = await getCapaDetail(c.id, approver);
      expect(detail.recurrence?.since).not.toBeNull();
      expect(detail.actions.every((a) => a.completedAt !== null)).toBe(true);
    }
    const closed = await db.select().from(capas).where(and(eq(capas.status, 'closed_effective'), seededBy));
    for (const c of closed) {
      const detail = await getCapaDetail(c.id, approver);
      // A CAPA closed as effective met its recurrence criterion when it was decided (ICH Q10 §3.2.2).
      if (detail.recurrence) expect(detail.recurrence.met).toBe(true);
      const sigs = await db.select().from(signatures).where(and(eq(signatures.recordType, 'capa'), eq(signatures.recordId, c.id)));
      expect(sigs.map((s) => s.meaning)).toEqual(['approved', 'effective']);
      expect(detail.signatures.every((s) => s.matches && s.intact)).toBe(true);
    }
  });

  it('keep the signatures of CAPAs planned once matching what they signed, and replace a plan approval by the next round’s (21 CFR 11.70)', async () => {
    const demo = await db.select().from(capas).where(like(capas.number, 'CAPA-2026-%'));
    let checked = 0;
    for (const c of demo.filter((x) => x.number <= 'CAPA-2026-0013')) {
      const facts = await loadRelated(capaKind, db, c);
      const sigs = await listSignatures(db, 'capa', c.id, (meaning) => signedContentOf(capaKind, meaning, c, facts));
      for (const s of sigs) expect(s.intact, `${c.number} ${s.meaning}`).toBe(true);
      if (c.planRound === 1) {
        for (const s of sigs) expect(s.matches, `${c.number} ${s.meaning}: ${s.changedParts.join(', ')}`).toBe(true);
        checked += sigs.length;
      } else {
        const approvals = sigs.filter((s) => s.meaning === 'approved');
        expect(approvals.length, c.number).toBe(c.planRound);
        expect(approvals.slice(0, -1).every((s) => s.supersededBy !== null), c.number).toBe(true);
        expect(approvals.at(-1)!.matches, c.number).toBe(true);
      }
    }
    expect(checked).toBeGreaterThanOrEqual(8);
  });
});
