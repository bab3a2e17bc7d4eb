import { and, asc, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { deviations, stateHistory, users } from '@/db/schema';
import { deviationKind } from '@/lib/deviations/kind';
import { loadRelated, signedContentOf } from '@/lib/records/write-path';
import { listSignatures } from '@/lib/signatures';
import { buildDemoDeviations } from '@/scripts/seed/deviations';
import { buildDemoScenario } from '@/scripts/seed/scenario';

/*
 * The demo deviations as the write path left them, against the plan the seed told them from
 * (scripts/seed/deviations.ts): the product gave the numbers the plan expects and reached the
 * planned states, scores and dates, and every signature still matches what it signed (21 CFR 11.70)
 * unless a later signature of the same meaning replaced it after a rework.
 */

afterAll(closeDb);

const scenario = buildDemoScenario();
const planned = buildDemoDeviations(scenario);
const minute = (iso: string | null) => iso?.slice(0, 16) ?? null;

async function rowOf(d: (typeof planned)[number]) {
  if (d.columns.number) return (await db.select().from(deviations).where(eq(deviations.number, d.columns.number)))[0];
  const [author] = await db.select({ id: users.id }).from(users).where(eq(users.email, d.raisedBy));
  const rows = await db
    .select()
    .from(deviations)
    .where(and(eq(deviations.title, d.columns.title), eq(deviations.raisedBy, author!.id)))
    .orderBy(asc(deviations.id));
  return rows[0];
}

describe('demo deviations', () => {
  it('are in the database as planned: number, state, triage and dates', async () => {
    for (const d of planned) {
      const row = await rowOf(d);
      expect(row, d.key).toBeDefined();
      const c = d.columns;
      // Other test files do not touch the demo's deviations; these are the values the seed left.
      expect(
        {
          status: row!.status,
          classification: row!.classification,
          rpn: row!.rpn,
          dueAt: row!.dueAt?.toISOString().slice(0, 10) ?? null,
          reportedAt: minute(row!.reportedAt?.toISOString() ?? null),
          closedAt: minute(row!.closedAt?.toISOString() ?? null),
          capaRequired: row!.capaRequired,
          createdAt: minute(row!.createdAt.toISOString()),
        },
        d.key,
      ).toEqual({
        status: d.status,
        classification: c.classification,
        rpn: c.rpn,
        dueAt: c.dueAt?.slice(0, 10) ?? null,
        reportedAt: minute(c.reportedAt),
        closedAt: minute(c.closedAt),
        capaRequired: c.capaRequired,
        createdAt: minute(d.steps[0]!.at),
      });
    }
  });

  it('carry the history of every planned lifecycle step, by the planned person, at its time', async () => {
    const people = new Map((await db.select({ id: users.id, email: users.email }).from(users)).map((u) => [u.id, u.email]));
    for (const d of planned) {
      const row = await rowOf(d);
      const history = await db
        .select({ event: stateHistory.event, userId: stateHistory.userId, at: stateHistory.at })
        .from(stateHistory)
        .where(and(eq(stateHistory.recordType, 'deviation'), eq(stateHistory.recordId, row!.id)))
        .orderBy(asc(stateHistory.id));
      const lifecycle = d.steps.filter((s) => s.fromState !== s.toState || s.event === 'create');
      expect(
        history.map((h) => ({ event: h.event, by: people.get(h.userId), at: minute(h.at.toISOString()) })),
        d.key,
      ).toEqual(lifecycle.map((s) => ({ event: s.event, by: s.by, at: minute(s.at) })));
    }
  });

  it('keep every signature matching what it signed, or replaced by a later one of its meaning (21 CFR 11.70)', async () => {
    let signed = 0;
    for (const d of planned) {
      const row = await rowOf(d);
      const facts = await loadRelated(deviationKind, db, row!);
      const signatures = await listSignatures(db, 'deviation', row!.id, (meaning) => signedContentOf(deviationKind, meaning, row!, facts));
      expect(signatures.length, d.key).toBe(d.steps.filter((s) => s.signature !== null).length);
      for (const s of signatures) {
        signed++;
        expect(s.intact, `${d.key} ${s.meaning}`).toBe(true);
        expect(s.matches || s.supersededBy !== null, `${d.key} ${s.meaning}: ${s.changedParts.join(', ')}`).toBe(true);
      }
    }
    expect(signed).toBeGreaterThan(30);
  });
});
