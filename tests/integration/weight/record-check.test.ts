import { randomBytes } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { auditEntries, batches, products, weightChecks } from '@/db/schema';
import { ForbiddenError, NotFoundError, ValidationError } from '@/lib/errors';
import { parseInput } from '@/lib/validation/parse';
import { recordWeightCheckSchema } from '@/lib/validation/weight';
import { recordWeightCheck } from '@/lib/weight-checks/commands';
import { listBatchWeightChecks } from '@/lib/weight-checks/queries';
import { makeMachine, makeRing, makeUser } from '../support/fixtures';

/*
 * Recording a weight check stores the row and its audit entry in one transaction (21 CFR 11.10(e));
 * only roles with weight_check.record may record (21 CFR 11.10(g), authority checks): operators
 * yes, administrators no. Verdicts follow Ph. Eur. 2.9.5 (20 units; 7.5 % from 300 mg).
 */

afterAll(closeDb);

const tag = () => randomBytes(3).toString('hex').toUpperCase();
let batchId = 0;
let releasedBatchId = 0;
let machineId = 0;

beforeAll(async () => {
  const [p] = await db
    .insert(products)
    .values({
      code: `IT-WC-${tag()}`,
      name: 'Test fill product',
      strength: 'test',
      capsuleSize: '0',
      shellMaterial: 'gelatin',
      regulatoryClass: 'drug',
      targetFillMg: '500.00',
      fillLowerMg: '462.50',
      fillUpperMg: '537.50',
    })
    .$returningId();
  const machine = await makeMachine();
  machineId = machine.id;
  const ring = await makeRing({ machineId });
  const batch = (status: 'in_process' | 'released') =>
    db
      .insert(batches)
      .values({ lotNumber: `IT-WC-${tag()}`, productId: p!.id, machineId, ringId: ring.id, sizeCapsules: 50_000, status, manufacturedOn: '2026-11-20' })
      .$returningId();
  batchId = (await batch('in_process'))[0]!.id;
  releasedBatchId = (await batch('released'))[0]!.id;
});

const twenty = (centre: number, extra: string[] = []) =>
  [...extra, ...Array.from({ length: 20 - extra.length }, (_, i) => String(centre + (i % 2 === 0 ? 2 : -2)))].join('\n');

const input = (over: Record<string, unknown> = {}) =>
  parseInput(recordWeightCheckSchema, { batchId, method: 'ph_eur_2_9_5', massMode: 'net', masses: twenty(500), ...over });

describe('recording a weight check', () => {
  it('stores a passing check with its audit entry (21 CFR 11.10(e))', async () => {
    const operator = await makeUser('operator');
    const out = await recordWeightCheck(operator, input({ note: 'start of shift' }));
    expect(out.check).toMatchObject({ batchId, verdict: 'pass', sampleSize: 20, meanMg: 500, outOfLimitCount: 0, note: 'start of shift' });
    expect(out.check.recordedBy).toEqual({ id: operator.id, name: operator.name });
    const [row] = await db.select().from(weightChecks).where(eq(weightChecks.id, out.check.id));
    expect(row).toMatchObject({ machineId, method: 'ph_eur_2_9_5', massMode: 'net', verdict: 'pass' });
    expect(JSON.parse(row!.evaluation).rules.map((r: { id: string }) => r.id)).toContain('ph_eur_double');
    const entries = await db
      .select()
      .from(auditEntries)
      .where(and(eq(auditEntries.recordType, 'weight_check'), eq(auditEntries.recordId, out.check.id)));
    expect(entries).toHaveLength(1);
    expect(entries[0]).toMatchObject({ action: 'record', userId: operator.id, userName: operator.name });
    expect(JSON.parse(entries[0]!.changes)).toEqual(expect.arrayContaining([{ field: 'verdict', from: null, to: 'pass' }]));
  });

  it('stores gross masses as entered, with the shell mass, and evaluates the net fill', async () => {
    const supervisor = await makeUser('supervisor');
    const out = await recordWeightCheck(supervisor, input({ massMode: 'gross', shellMassMg: '96', masses: twenty(596) }));
    expect(out.check.massesMg[0]).toBe(598);
    expect(out.check.netMassesMg[0]).toBe(502);
    expect(out.check).toMatchObject({ shellMassMg: 96, meanMg: 500, verdict: 'pass' });
  });

  it('stores a failing check (3 units beyond 7.5 %, Ph. Eur. 2.9.5) with the fail verdict', async () => {
    const operator = await makeUser('operator');
    const out = await recordWeightCheck(operator, input({ masses: twenty(500, ['545', '545', '455']) }));
    expect(out.check.verdict).toBe('fail');
    expect(out.evaluation.hints.length).toBeGreaterThan(0);
    expect((await listBatchWeightChecks(batchId)).map((c) => c.id)).toContain(out.check.id);
  });

  it('refuses an administrator: recording checks is not their role', async () => {
    const admin = await makeUser('admin');
    const before = await db.select({ id: weightChecks.id }).from(weightChecks).where(eq(weightChecks.batchId, batchId));
    await expect(recordWeightCheck(admin, input())).rejects.toBeInstanceOf(ForbiddenError);
    const after = await db.select({ id: weightChecks.id }).from(weightChecks).where(eq(weightChecks.batchId, batchId));
    expect(after).toHaveLength(before.length);
  });

  it('refuses QA approvers too (read-only on weight checks)', async () => {
    await expect(recordWeightCheck(await makeUser('qa_approver'), input())).rejects.toBeInstanceOf(ForbiddenError);
  });

  it('stores nothing without a verdict (19 units for Ph. Eur. 2.9.5)', async () => {
    const operator = await makeUser('operator');
    const masses = twenty(500).split('\n').slice(0, 19).join('\n');
    const err = await recordWeightCheck(operator, input({ masses })).catch((e) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors.masses?.[0]).toMatch(/19 of 20/);
  });

  it('refuses a released batch and an unknown one', async () => {
    const operator = await makeUser('operator');
    const err = await recordWeightCheck(operator, input({ batchId: releasedBatchId })).catch((e) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors.batchId?.[0]).toMatch(/released/);
    await expect(recordWeightCheck(operator, input({ batchId: 999_999_999 }))).rejects.toBeInstanceOf(NotFoundError);
  });

  it('reports unreadable lines on the masses field before anything runs', () => {
    let err: unknown = null;
    try {
      input({ masses: '500\nfive hundred', massMode: 'gross' });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).fieldErrors.masses?.[0]).toMatch(/^Line 2:/);
    expect((err as ValidationError).fieldErrors.shellMassMg?.[0]).toMatch(/shell mass/);
  });
});
