import { and, asc, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { auditEntries, deviations, fillingRings, stateHistory } from '@/db/schema';
import { writeAudit } from '@/lib/audit';
import { writeTransaction, writeTransactionStats } from '@/lib/records/transaction';
import { assertCan } from '@/lib/auth/permissions';
import { quarantineRing } from '@/lib/equipment/commands';
import { ConflictError, ForbiddenError, NotFoundError } from '@/lib/errors';
import type { EffectContext } from '@/lib/records/kind';
import { createRecord, transitionRecord } from '@/lib/records/write-path';
import { getRing, makeRing, makeUser } from '../support/fixtures';
import { draftDeviationKind } from '../support/test-kinds';

/*
 * The write path's own promises, apart from any one workflow: a stale version never overwrites
 * (21 CFR 11.10(e) and ALCOA+ "original": a change made meanwhile is not silently lost; optimistic
 * locking itself is common practice), 'own'-scoped permissions hold per record, and the machine's
 * effects run in the transaction or strictly after it commits.
 */

afterAll(closeDb);

type DeviationRow = typeof deviations.$inferSelect;

async function draftBy(user: Awaited<ReturnType<typeof makeUser>>, kind = draftDeviationKind()) {
  const out = await createRecord(kind, user, 'deviation.raise', {
    values: {
      title: `Write path check ${Date.now()}`,
      whatHappened: 'Capsules found unseparated in the reject bin',
      raisedBy: user.id,
      occurredAt: new Date(),
    },
  });
  return out.record;
}

describe('optimistic locking', () => {
  it('lets one of two concurrent changes with the same expected version win and refuses the other', async () => {
    const [a, b] = await Promise.all([makeUser('operator'), makeUser('supervisor')]);
    const ring = await makeRing();
    const results = await Promise.allSettled([
      quarantineRing(a, { id: ring.id, version: ring.version, reason: 'Dent seen by A', condition: 'dented' }),
      quarantineRing(b, { id: ring.id, version: ring.version, reason: 'Crack seen by B', condition: 'damaged' }),
    ]);
    const won = results.filter((r) => r.status === 'fulfilled');
    const lost = results.filter((r): r is PromiseRejectedResult => r.status === 'rejected');
    expect(won).toHaveLength(1);
    expect(lost).toHaveLength(1);
    expect(lost[0]!.reason).toBeInstanceOf(ConflictError);
    expect((lost[0]!.reason as Error).message).toMatch(/changed by someone else.*nothing was overwritten/i);

    const winner = results[0]!.status === 'fulfilled' ? 'Dent seen by A' : 'Crack seen by B';
    const stored = await getRing(ring.id);
    expect(stored).toMatchObject({ version: ring.version + 1, statusReason: winner });
    const history = await db
      .select()
      .from(stateHistory)
      .where(and(eq(stateHistory.recordType, 'filling_ring'), eq(stateHistory.recordId, ring.id)));
    expect(history).toHaveLength(1);
  });

  it('refuses a change based on a version that is no longer current', async () => {
    const operator = await makeUser('operator');
    const ring = await makeRing({ version: 4 });
    await expect(quarantineRing(operator, { id: ring.id, version: 3, reason: 'Dent' })).rejects.toThrow(ConflictError);
    expect(await getRing(ring.id)).toMatchObject({ status: 'in_service', version: 4, statusReason: null });
  });
});

describe("'own' scope", () => {
  it("keeps user B from touching user A's draft while A may change it", async () => {
    const [a, b] = await Promise.all([makeUser('operator'), makeUser('operator')]);
    const kind = draftDeviationKind();
    const draft = await draftBy(a, kind);
    const [row] = await db.select().from(deviations).where(eq(deviations.id, draft.id));

    expect(() => assertCan(b, 'deviation.edit_draft', { ownerIds: [row!.raisedBy, row!.ownerId] })).toThrow(
      /only on your own records/,
    );
    const err = await transitionRecord(kind, { id: draft.id, expectedVersion: 1, event: 'submit', actor: b }).catch((e) => e);
    expect(err).toBeInstanceOf(ForbiddenError);
    expect((err as Error).message).toMatch(/only on your own records \(deviation: edit draft\)/);

    const out = await transitionRecord(kind, { id: draft.id, expectedVersion: 1, event: 'submit', actor: a });
    expect(out.record).toMatchObject({ status: 'reported', version: 2 });
  });

  it('tells a role without the permission that it is forbidden, and an unknown id that it is not found', async () => {
    const [operator, admin] = await Promise.all([makeUser('operator'), makeUser('admin')]);
    const kind = draftDeviationKind();
    const draft = await draftBy(operator, kind);
    // Administrators read deviations but may not edit drafts, so they are told it is forbidden...
    await expect(transitionRecord(kind, { id: draft.id, expectedVersion: 1, event: 'submit', actor: admin })).rejects.toThrow(
      ForbiddenError,
    );
    // ...while an id that does not exist is simply not found.
    await expect(
      transitionRecord(kind, { id: 2_000_000_000, expectedVersion: 1, event: 'submit', actor: operator }),
    ).rejects.toThrow(NotFoundError);
  });
});

describe('creation and effects', () => {
  it('writes the new record, its first history row and a "create" audit entry together', async () => {
    const operator = await makeUser('operator');
    const draft = await draftBy(operator);
    const history = await db
      .select()
      .from(stateHistory)
      .where(and(eq(stateHistory.recordType, 'deviation'), eq(stateHistory.recordId, draft.id)));
    expect(history).toMatchObject([{ event: 'create', fromState: null, toState: 'draft', userId: operator.id }]);
    const [entry] = await db
      .select()
      .from(auditEntries)
      .where(and(eq(auditEntries.recordType, 'deviation'), eq(auditEntries.recordId, draft.id)));
    expect(entry!.action).toBe('create');
    expect(JSON.parse(entry!.changes)).toEqual(expect.arrayContaining([{ field: 'status', from: null, to: 'draft' }]));
  });

  it('runs in-transaction effects with the change and after-commit effects only once it has committed', async () => {
    const operator = await makeUser('operator');
    const seen: string[] = [];
    const kind = draftDeviationKind({
      inTransaction: async (tx, ctx: EffectContext<DeviationRow>) => {
        const [inside] = await tx.select({ status: deviations.status }).from(deviations).where(eq(deviations.id, ctx.after.id));
        seen.push(`in:${inside!.status}`);
      },
      afterCommit: async (ctx: EffectContext<DeviationRow>) => {
        const [outside] = await db.select({ status: deviations.status }).from(deviations).where(eq(deviations.id, ctx.after.id));
        seen.push(`after:${outside!.status}`);
      },
    });
    const draft = await draftBy(operator, kind);
    await transitionRecord(kind, { id: draft.id, expectedVersion: 1, event: 'submit', actor: operator });
    expect(seen).toEqual(['in:reported', 'after:reported']);
  });

  it('rolls the whole change back when an in-transaction effect fails, and skips the after-commit ones', async () => {
    const operator = await makeUser('operator');
    const seen: string[] = [];
    const kind = draftDeviationKind({
      inTransaction: async () => {
        throw new Error('outbox refused the message');
      },
      afterCommit: () => {
        seen.push('after');
      },
    });
    const draft = await draftBy(operator, kind);
    await expect(
      transitionRecord(kind, { id: draft.id, expectedVersion: 1, event: 'submit', actor: operator }),
    ).rejects.toThrow(/outbox refused/);
    const [row] = await db.select().from(deviations).where(eq(deviations.id, draft.id));
    expect(row).toMatchObject({ status: 'draft', version: 1 });
    const history = await db
      .select()
      .from(stateHistory)
      .where(and(eq(stateHistory.recordType, 'deviation'), eq(stateHistory.recordId, draft.id)))
      .orderBy(asc(stateHistory.id));
    expect(history.map((h) => h.event)).toEqual(['create']);
    expect(seen).toEqual([]);
  });
});

describe('a transaction the database aborts', () => {
  it('is run again from the start after a deadlock, so both writers succeed and each audit entry is written once', async () => {
    const [first, second] = await Promise.all([makeRing(), makeRing()]);
    const marker = `deadlock check ${Date.now()}`;
    let attempts = 0;
    let waiting = 0;
    let release: () => void = () => {};
    const bothHoldOne = new Promise<void>((resolve) => (release = resolve));
    // Each takes one ring's row, waits until the other holds the other, then wants it: InnoDB breaks
    // the cycle by aborting one of them (1213), which the write path runs again.
    const writer = (mine: number, theirs: number) =>
      writeTransaction(async (tx) => {
        attempts++;
        await tx.select().from(fillingRings).where(eq(fillingRings.id, mine)).for('update');
        if (attempts <= 2) {
          if (++waiting === 2) release();
          await bothHoldOne;
        }
        await tx.select().from(fillingRings).where(eq(fillingRings.id, theirs)).for('update');
        await writeAudit(tx, { actor: { id: null, name: 'test' }, recordType: 'filling_ring', recordId: mine, action: 'deadlock_check', reason: marker });
      });
    const retriesBefore = writeTransactionStats.retries;
    await Promise.all([writer(first.id, second.id), writer(second.id, first.id)]);
    expect(attempts).toBe(3);
    expect(writeTransactionStats.retries - retriesBefore).toBe(1);
    const entries = await db.select().from(auditEntries).where(and(eq(auditEntries.action, 'deadlock_check'), eq(auditEntries.reason, marker)));
    expect(entries.map((e) => e.recordId).sort()).toEqual([first.id, second.id].sort());
  });

  it('is not run again for an error that is not a lock conflict', async () => {
    let attempts = 0;
    await expect(
      writeTransaction(async () => {
        attempts++;
        throw new ConflictError();
      }),
    ).rejects.toBeInstanceOf(ConflictError);
    expect(attempts).toBe(1);
  });
});
