import { z } from 'zod';
import { dispositions as dispositionValues } from '../../db/schema/deviations';
import { classifications } from '../../db/schema/master-data';
import { aqlValues, inspectionLevels } from '../sampling/master-tables';
import { severities } from '../sampling/plan';

/*
 * Input of the deviation commands, shared by server actions (FormData: every value a string, so
 * numbers, booleans and dates are coerced) and the JSON routes. What an event asks for (reason,
 * password) is also enforced by the write path from the machine; these give field-level messages.
 */

const id = z.coerce.number({ error: 'must be a record id' }).int().positive();
const optionalId = z.preprocess((v) => (v === '' || v === null ? undefined : v), id.optional());
const version = z.coerce.number({ error: 'Reload the page and try again.' }).int().positive();
const reason = z
  .string({ error: 'Give the reason for this change.' })
  .trim()
  .min(3, 'Give the reason for this change (a few words at least).')
  .max(2000, 'Keep the reason under 2,000 characters.');
/** Checked by the write path, which asks for it exactly when the transition is signed (or takes a verified signer). */
const password = z.string().max(256).optional();
const checkbox = z.preprocess((v) => v === true || v === 'true' || v === 'on' || v === '1', z.boolean());
const optionalText = (max: number, message: string) =>
  z.preprocess((v) => (typeof v === 'string' && v.trim() === '' ? undefined : v), z.string().trim().max(max, message).optional());
/** 1–10 scale, as the risk module scores S, O and D. */
const riskScore = (what: string) =>
  z.coerce
    .number({ error: `Score ${what} from 1 to 10.` })
    .int(`Score ${what} with a whole number from 1 to 10.`)
    .min(1, `Score ${what} from 1 to 10.`)
    .max(10, `Score ${what} from 1 to 10.`);

const draftFields = {
  title: z
    .string({ error: 'Give the deviation a short title.' })
    .trim()
    .min(5, 'Give the deviation a short title (5 characters at least).')
    .max(200, 'Keep the title under 200 characters.'),
  whatHappened: z
    .string({ error: 'Say what happened.' })
    .trim()
    .min(10, 'Say what happened in a sentence or two.')
    .max(10_000, 'Keep the description under 10,000 characters; attach longer documents.'),
  defectId: optionalId,
  batchId: optionalId,
  machineId: optionalId,
  ringId: optionalId,
  occurredAt: z.coerce
    .date({ error: 'Enter when it happened.' })
    .refine((d) => d.getTime() <= Date.now() + 5 * 60_000, 'When it happened cannot be in the future.'),
  immediateActions: optionalText(5000, 'Keep the immediate actions under 5,000 characters.'),
  lineStopped: checkbox.default(false),
  capsulesSegregated: checkbox.default(false),
  affectedCount: z.preprocess(
    (v) => (v === '' || v === null ? undefined : v),
    z.coerce.number({ error: 'Enter a number of capsules.' }).int('Enter a whole number.').min(0, 'Cannot be negative.').optional(),
  ),
  sampleDescription: optionalText(255, 'Keep the sample description under 255 characters.'),
  heldBatchIds: z
    .preprocess(
      (v) => (v === undefined || v === '' ? [] : Array.isArray(v) ? v : [v]),
      z.array(id).max(50, 'Hold at most 50 batches on one deviation.'),
    )
    .transform((ids) => [...new Set(ids)]),
};

export const createDraftSchema = z.object(draftFields);
export type CreateDraftInput = z.input<typeof createDraftSchema>;

export const updateDraftSchema = z.object({ id, version, ...draftFields });
export type UpdateDraftInput = z.input<typeof updateDraftSchema>;

const versioned = { id, version };
export const deviationVersionSchema = z.object(versioned);
export type DeviationVersionInput = z.input<typeof deviationVersionSchema>;

export const recordTriageSchema = z.object({
  ...versioned,
  classification: z.enum(classifications, { error: 'Pick a classification.' }),
  severity: riskScore('severity'),
  occurrence: riskScore('occurrence'),
  detection: riskScore('detection'),
  classificationReason: optionalText(2000, 'Keep the justification under 2,000 characters.'),
  investigatorId: optionalId,
  dueAt: z.preprocess((v) => (v === '' || v === null ? undefined : v), z.coerce.date({ error: 'Enter a due date.' }).optional()),
});
export type RecordTriageInput = z.input<typeof recordTriageSchema>;

export const signedSchema = z.object({ ...versioned, password });
export type SignedInput = z.input<typeof signedSchema>;

export const reasonSchema = z.object({ ...versioned, reason });
export type ReasonInput = z.input<typeof reasonSchema>;

export const signedReasonSchema = z.object({ ...versioned, reason, password });
export type SignedReasonInput = z.input<typeof signedReasonSchema>;

/*
 * The triage decision as the form sends it: the class may be left empty when the computed class
 * stands (the server works it out from the defect's catalogue class and the score).
 */
export const triageDecisionSchema = recordTriageSchema.extend({
  classification: z.preprocess(
    (v) => (v === '' || v === null ? undefined : v),
    z.enum(classifications, { error: 'Pick a classification.' }).optional(),
  ),
});
export type TriageDecisionInput = z.input<typeof triageDecisionSchema>;

/* Held batches: a disposition per batch, and holds extended at triage. */

const blankToUndefined = (v: unknown) => (v === '' || v === null ? undefined : v);

export const recordDispositionSchema = z.object({
  ...versioned,
  batchId: id,
  disposition: z.enum(dispositionValues, { error: 'Pick a disposition.' }),
  note: optionalText(2000, 'Keep the note under 2,000 characters.'),
  inspectionLevel: z.preprocess(blankToUndefined, z.enum(inspectionLevels, { error: 'Pick an inspection level.' }).optional()),
  aql: z.preprocess(blankToUndefined, z.enum(aqlValues, { error: 'Pick an AQL from ISO 2859-1.' }).optional()),
  inspectionSeverity: z.preprocess(blankToUndefined, z.enum(severities, { error: 'Pick normal, tightened or reduced.' }).optional()),
});
export type RecordDispositionInput = z.input<typeof recordDispositionSchema>;

export const extendHoldsSchema = z.object({
  ...versioned,
  batchIds: z
    .preprocess(
      (v) => (v === undefined || v === '' ? [] : Array.isArray(v) ? v : [v]),
      z.array(id).min(1, 'Tick at least one batch to put on hold.').max(50, 'Hold at most 50 batches at once.'),
    )
    .transform((ids) => [...new Set(ids)]),
});
export type ExtendHoldsInput = z.input<typeof extendHoldsSchema>;
