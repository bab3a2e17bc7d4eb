import 'server-only';
import type { Tx } from '../../db/client';
import type { weightChecks } from '../../db/schema';
import { now } from '../clock';
import { NotFoundError, ValidationError } from '../errors';
import type { RecordActor } from '../records/kind';
import { createRecord, insertRecord } from '../records/write-path';
import type { RecordWeightCheckInput } from '../validation/weight';
import { type WeightEvaluation, evaluateWeightCheck } from '../weight/evaluate';
import { weightCheckKind } from './kind';
import { getWeightBatch, getWeightCheck } from './queries';
import { type RecordedWeightCheck, type WeightBatchDto, batchStatusesTakingChecks } from './types';

/*
 * Recording a weight check. The server evaluates the masses again with the same pure code the
 * page ran (the browser's verdict is never trusted) and creates the check through the write path,
 * which stores the row with the full evaluation and its audit entry in one transaction
 * (21 CFR 11.10(e)). A check that cannot reach a verdict yet (too few units, or a stage that needs
 * more) is not stored: the operator weighs more.
 */

const d = (n: number, places: number) => n.toFixed(places);

/** Evaluates and builds the row; throws ValidationError when the check has no verdict yet. */
export function buildWeightCheckRow(
  batch: WeightBatchDto,
  input: RecordWeightCheckInput,
  recordedBy: number,
  checkedAt: Date,
): { values: typeof weightChecks.$inferInsert; evaluation: WeightEvaluation } {
  const evaluation = evaluateWeightCheck({
    method: input.method,
    massMode: input.massMode,
    massesMg: input.massesMg,
    shellMassMg: input.shellMassMg,
    product: { targetMg: batch.product.targetFillMg, lowerMg: batch.product.fillLowerMg, upperMg: batch.product.fillUpperMg },
    assayPercent: input.assayPercent ?? undefined,
    targetPercent: input.targetPercent ?? undefined,
  });
  if (evaluation.verdict === 'incomplete') {
    const open = evaluation.problems.length > 0 ? evaluation.problems : evaluation.rules.filter((r) => r.status === 'incomplete').map((r) => r.detail);
    const message = `No verdict yet: ${open.join(' ')}`;
    throw new ValidationError(message, { masses: [message] });
  }
  const s = evaluation.summary;
  return {
    evaluation,
    values: {
      batchId: batch.id,
      productId: batch.product.id,
      machineId: batch.machine?.id ?? null,
      ringId: batch.ring?.id ?? null,
      method: input.method,
      massMode: input.massMode,
      shellMassMg: input.shellMassMg === null ? null : d(input.shellMassMg, 2),
      massesMg: JSON.stringify(input.massesMg),
      sampleSize: input.massesMg.length,
      meanMg: d(s.mean, 3),
      sdMg: d(s.sd, 3),
      minMg: d(s.min, 3),
      maxMg: d(s.max, 3),
      outOfLimitCount: evaluation.outside.below + evaluation.outside.above,
      verdict: evaluation.verdict,
      evaluation: JSON.stringify(evaluation),
      note: input.note,
      recordedBy,
      checkedAt,
    },
  };
}

/**
 * Inserts a built check with its audit entry through the write path, inside the caller's
 * transaction (the demo seed records its checks this way, as the person who weighed them).
 */
export async function insertWeightCheck(
  tx: Tx,
  actor: RecordActor,
  values: typeof weightChecks.$inferInsert,
  action = 'record',
): Promise<number> {
  const { row } = await insertRecord(tx, weightCheckKind, { actor, permission: 'weight_check.record', values, action });
  return row.id;
}

export async function recordWeightCheck(actor: RecordActor, input: RecordWeightCheckInput): Promise<RecordedWeightCheck> {
  let evaluation: WeightEvaluation | undefined;
  const created = await createRecord(weightCheckKind, actor, 'weight_check.record', async (tx) => {
    const batch = await getWeightBatch(input.batchId, tx);
    if (!batch) throw new NotFoundError('The batch');
    if (!(batchStatusesTakingChecks as readonly string[]).includes(batch.status)) {
      const message = `Batch ${batch.lotNumber} is ${batch.status}; in-process weight checks are recorded while a batch is in process or on hold.`;
      throw new ValidationError(message, { batchId: [message] });
    }
    const built = buildWeightCheckRow(batch, input, actor.id, now());
    evaluation = built.evaluation;
    return { action: 'record', values: built.values };
  });
  const check = await getWeightCheck(created.row.id);
  return { check: check!, evaluation: evaluation! };
}
