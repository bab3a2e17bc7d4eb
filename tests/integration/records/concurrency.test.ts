import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { recordCounters } from '@/db/schema';
import { verifyAuditChain } from '@/lib/audit';
import { addAction, createCapa, updatePlan } from '@/lib/capa/commands';
import { addComment } from '@/lib/comments/commands';
import { createComplaint } from '@/lib/complaints/commands';
import { createDraft, discardDraft, submitDeviation, updateDraft } from '@/lib/deviations/commands';
import { quarantineRing, returnRingToService } from '@/lib/equipment/commands';
import { parseRecordNumber } from '@/lib/records/numbers';
import { writeTransactionStats } from '@/lib/records/transaction';
import { makeRing, makeUser, testPassword } from '../support/fixtures';
import { makeTestBatch } from '../support/stories';

/*
 * Concurrent writers never fail (the issue's finding: four parallel "raise a draft" requests from one
 * operator answered 500 one time in eight, a deadlock on the audit-chain head). Sixteen writers
 * across every record kind run for a bounded time, sharing what a site shares: the record counters,
 * the audit chain, the same batches put on hold, the same deviation commented on. Every write must
 * succeed (the write path takes the serialised rows in one order and retries what the database
 * aborts), the numbers each prefix gave out must be gap-free, and the audit chain must verify
 * (21 CFR 11.10(e); gap-free numbering is common practice for controlled records).
 */

afterAll(closeDb);

const seconds = Number(process.env.PLUMBLINE_CONCURRENCY_SECONDS ?? 8);
const year = new Date().getUTCFullYear();

async function counter(prefix: string): Promise<number> {
  const [row] = await db
    .select({ value: recordCounters.lastValue })
    .from(recordCounters)
    .where(and(eq(recordCounters.prefix, prefix), eq(recordCounters.year, year)));
  return row?.value ?? 0;
}

const isoDay = (ms: number) => new Date(ms).toISOString().slice(0, 10);

describe('sixteen concurrent writers across every record kind', () => {
  let shared: { batches: { id: number; lot: string }[]; commentedOn: number };

  beforeAll(async () => {
    const batches = await Promise.all([makeTestBatch(), makeTestBatch(), makeTestBatch()]);
    const author = await makeUser('operator');
    const d = await createDraft(author, {
      title: 'Shared for comments',
      whatHappened: 'A deviation everybody comments on at once.',
      occurredAt: new Date(Date.now() - 60_000),
      heldBatchIds: [],
    });
    const submitted = await submitDeviation(author, { id: d.record.id, version: d.record.version });
    shared = { batches, commentedOn: submitted.record.id };
  });

  it(`write for ${seconds} s with no error, gap-free numbers and an intact audit chain`, async () => {
    const before = { DEV: await counter('DEV'), CAPA: await counter('CAPA'), CMP: await counter('CMP') };
    const retriesBefore = writeTransactionStats.retries;
    const numbers: Record<'DEV' | 'CAPA' | 'CMP', string[]> = { DEV: [], CAPA: [], CMP: [] };
    const errors: string[] = [];
    const done: Record<string, number> = {};
    const until = Date.now() + seconds * 1000;
    const pick = <T,>(list: T[]) => list[Math.floor(Math.random() * list.length)]!;

    const loop = async (name: string, step: () => Promise<void>) => {
      done[name] = 0;
      while (Date.now() < until) {
        try {
          await step();
          done[name]!++;
        } catch (err) {
          errors.push(`${name}: ${err instanceof Error ? `${err.name}: ${err.message}` : String(err)}`);
        }
      }
    };

    // Raise and report deviations holding two of three shared batches, in random order.
    const raiser = async () => {
      const operator = await makeUser('operator');
      return async () => {
        const held = [pick(shared.batches), pick(shared.batches)].map((b) => b.id);
        const d = await createDraft(operator, {
          title: 'Split bodies under load',
          whatHappened: 'Split bodies at the outfeed while everyone writes at once.',
          occurredAt: new Date(Date.now() - 60_000),
          heldBatchIds: held,
        });
        const s = await submitDeviation(operator, { id: d.record.id, version: d.record.version });
        numbers.DEV.push(s.record.number!);
      };
    };
    // Write, rewrite and discard drafts (no number, but the audit chain and the batches).
    const drafter = async () => {
      const operator = await makeUser('supervisor');
      return async () => {
        const input = { title: 'A draft that goes away', whatHappened: 'Written, changed, then discarded under load.', occurredAt: new Date(Date.now() - 60_000) };
        const d = await createDraft(operator, { ...input, heldBatchIds: [pick(shared.batches).id] });
        const u = await updateDraft(operator, { ...input, heldBatchIds: [], id: d.record.id, version: d.record.version, title: 'A draft that goes away, changed' });
        await discardDraft(operator, { id: u.record.id, version: u.record.version });
      };
    };
    const capaPlanner = async () => {
      const [qa, doer] = await Promise.all([makeUser('qa_investigator'), makeUser('operator')]);
      return async () => {
        let r = (await createCapa(qa, { title: 'CAPA under load', sourceType: 'trend', problemStatement: 'A trend seen while everyone writes at once.', ownerId: qa.id })).record;
        numbers.CAPA.push(r.number);
        r = (
          await addAction(qa, {
            id: r.id,
            version: r.version,
            kind: 'corrective',
            category: 'procedure',
            description: 'Add a bore check to the changeover sheet.',
            ownerId: doer.id,
            dueAt: isoDay(Date.now() + 7 * 86_400_000),
          })
        ).record;
        await updatePlan(qa, { id: r.id, version: r.version, title: r.title, problemStatement: r.problemStatement, effectivenessCriteria: 'No recurrence over 20 batches.' });
      };
    };
    const intake = async () => {
      const operator = await makeUser('operator');
      return async () => {
        const c = await createComplaint(operator, {
          complainantName: 'Tamsin Orrery-Vale',
          complainantContact: 't.orrery@customers.example',
          complainantKind: 'pharmacy',
          channel: 'email',
          receivedOn: isoDay(Date.now() - 2 * 86_400_000),
          lot: pick(shared.batches).lot,
          description: 'Capsules stuck together in two bottles of the lot.',
          personHarmed: 'false',
        });
        numbers.CMP.push(c.record.number);
      };
    };
    const commenter = async () => {
      const qa = await makeUser('qa_approver');
      return async () => {
        await addComment(qa, { recordType: 'deviation', recordId: shared.commentedOn, body: 'Seen; checking the ring log.' });
      };
    };
    // A ring quarantined by the floor and returned to service by QA, with a signature each time.
    const ringPair = async () => {
      const [floor, qa] = await Promise.all([makeUser('operator'), makeUser('qa_investigator')]);
      let ring = await makeRing();
      return async () => {
        const q = await quarantineRing(floor, { id: ring.id, version: ring.version, reason: 'Burr on a bore', condition: 'worn' });
        const back = await returnRingToService(qa, { id: ring.id, version: q.record.version, reason: 'Deburred and gauged', condition: 'good', password: testPassword });
        ring = { ...ring, version: back.record.version };
      };
    };

    const writers: [string, Promise<() => Promise<void>>][] = [
      ['raiser 1', raiser()],
      ['raiser 2', raiser()],
      ['raiser 3', raiser()],
      ['raiser 4', raiser()],
      ['drafter 1', drafter()],
      ['drafter 2', drafter()],
      ['capa 1', capaPlanner()],
      ['capa 2', capaPlanner()],
      ['capa 3', capaPlanner()],
      ['intake 1', intake()],
      ['intake 2', intake()],
      ['intake 3', intake()],
      ['comments 1', commenter()],
      ['comments 2', commenter()],
      ['rings 1', ringPair()],
      ['rings 2', ringPair()],
    ];
    const steps = await Promise.all(writers.map(([, w]) => w));
    await Promise.all(writers.map(([name], i) => loop(name, steps[i]!)));

    const retried = writeTransactionStats.retries - retriesBefore;
    const total = Object.values(done).reduce((a, b) => a + b, 0);
    console.log(`[concurrency] ${writers.length} writers, ${seconds} s: ${total} stories written, ${retried} transactions retried after a deadlock or lock wait, ${errors.length} errors`);
    expect(errors).toEqual([]);
    for (const name of Object.keys(done)) expect(done[name], name).toBeGreaterThan(0);

    for (const prefix of ['DEV', 'CAPA', 'CMP'] as const) {
      const values = numbers[prefix].map((n) => parseRecordNumber(n)!.value).sort((a, b) => a - b);
      const after = await counter(prefix);
      expect(values, `${prefix} numbers given out`).toEqual(Array.from({ length: after - before[prefix] }, (_, i) => before[prefix] + i + 1));
    }
    expect(await verifyAuditChain(db)).toMatchObject({ ok: true });
  }, 120_000 + seconds * 1000);
});
