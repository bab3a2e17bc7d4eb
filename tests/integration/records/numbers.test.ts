import { and, eq, like } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { capas, recordCounters } from '@/db/schema';
import { allocateNumber, parseRecordNumber } from '@/lib/records/numbers';
import { createRecord } from '@/lib/records/write-path';
import { makeUser } from '../support/fixtures';
import { numberedCapaKind } from '../support/test-kinds';

/*
 * Human record numbers are unique and gap-free within a year, so a record that went missing shows
 * as a hole (common practice for controlled quality records; ALCOA+ "complete"). The years used
 * here (2091 and random later ones) keep these numbers apart from real ones.
 */

afterAll(closeDb);

const isolatedYear = 2091;

async function counter(prefix: string, year: number): Promise<number> {
  const [row] = await db
    .select({ v: recordCounters.lastValue })
    .from(recordCounters)
    .where(and(eq(recordCounters.prefix, prefix), eq(recordCounters.year, year)));
  return row?.v ?? 0;
}

/** A year with no number taken yet under this prefix. */
async function unusedYear(prefix: string): Promise<number> {
  for (;;) {
    const year = 2100 + Math.floor(Math.random() * 7800);
    if ((await counter(prefix, year)) === 0) return year;
  }
}

async function createMany(year: number, ok: number, failing: number) {
  const investigator = await makeUser('qa_investigator');
  const attempts = Array.from({ length: ok + failing }, (_, i) => i % Math.ceil((ok + failing) / failing) === 1);
  return Promise.allSettled(
    attempts.map((fails, i) =>
      createRecord(numberedCapaKind, investigator, 'capa.create', {
        number: { type: 'capa', year },
        values: {
          title: `Numbering check ${i}`,
          sourceType: 'trend',
          problemStatement: 'Concurrent creation',
          // An owner that does not exist fails the insert after the number was taken.
          ownerId: fails ? 2_000_000_000 : investigator.id,
          createdBy: investigator.id,
        },
      }),
    ),
  ).then((results) => ({ results, expectedFailures: attempts.filter(Boolean).length }));
}

describe('record numbers', () => {
  it('stay unique and gap-free under 50 concurrent creations, with rolled-back creations giving theirs back', async () => {
    const start = await counter('CAPA', isolatedYear);
    const { results, expectedFailures } = await createMany(isolatedYear, 50, 10);
    const created = results.flatMap((r) => (r.status === 'fulfilled' ? [r.value.record.number] : []));
    expect(results.filter((r) => r.status === 'rejected')).toHaveLength(expectedFailures);
    expect(created).toHaveLength(50);
    expect(new Set(created).size).toBe(50);
    const values = created.map((n) => parseRecordNumber(n)!.value).sort((a, b) => a - b);
    expect(values).toEqual(Array.from({ length: 50 }, (_, i) => start + i + 1));
    expect(created.every((n) => n.startsWith(`CAPA-${isolatedYear}-`))).toBe(true);
    expect(await counter('CAPA', isolatedYear)).toBe(start + 50);

    const stored = await db
      .select({ number: capas.number })
      .from(capas)
      .where(like(capas.number, `CAPA-${isolatedYear}-%`));
    expect(stored.map((s) => s.number)).toEqual(expect.arrayContaining(created));
  });

  it('starts a new year at 0001 even when its first numbers are taken concurrently', async () => {
    const year = await unusedYear('CAPA');
    const { results } = await createMany(year, 20, 5);
    const created = results.flatMap((r) => (r.status === 'fulfilled' ? [r.value.record.number] : []));
    expect(created.sort()).toEqual(Array.from({ length: 20 }, (_, i) => `CAPA-${year}-${String(i + 1).padStart(4, '0')}`));
  });

  it('does not deadlock when the creation that opened a new year rolls back while others wait', async () => {
    for (let round = 0; round < 5; round++) {
      const year = await unusedYear('DEV');
      const results = await Promise.allSettled(
        Array.from({ length: 12 }, (_, i) =>
          db.transaction(async (tx) => {
            const number = await allocateNumber(tx, 'deviation', year);
            await new Promise((resolve) => setTimeout(resolve, 5));
            if (i % 3 === 0) throw new Error('planned rollback');
            return number;
          }),
        ),
      );
      const unexpected = results.filter((r) => r.status === 'rejected' && !/planned rollback/.test(String(r.reason)));
      expect(unexpected).toEqual([]);
      const numbers = results.flatMap((r) => (r.status === 'fulfilled' ? [r.value] : [])).sort();
      expect(numbers).toEqual(Array.from({ length: 8 }, (_, i) => `DEV-${year}-${String(i + 1).padStart(4, '0')}`));
    }
  });

  it('goes past 9999 with a fifth digit', async () => {
    const year = await unusedYear('DEV');
    await db.insert(recordCounters).values({ prefix: 'DEV', year, lastValue: 9998 });
    const numbers = [];
    for (let i = 0; i < 2; i++) numbers.push(await db.transaction((tx) => allocateNumber(tx, 'deviation', year)));
    expect(numbers).toEqual([`DEV-${year}-9999`, `DEV-${year}-10000`]);
  });

  it('gives a number back when the creating transaction rolls back', async () => {
    const year = await unusedYear('CMP');
    await db
      .transaction(async (tx) => {
        expect(await allocateNumber(tx, 'complaint', year)).toBe(`CMP-${year}-0001`);
        tx.rollback();
      })
      .catch(() => undefined);
    expect(await db.transaction((tx) => allocateNumber(tx, 'complaint', year))).toBe(`CMP-${year}-0001`);
  });
});
