import { z } from 'zod';
import { capaActionCategories, capaActionKinds, capaSources } from '../../workflows/capa-terms';
import { capaEvents } from '../../workflows/capa';

/*
 * Input of the CAPA commands, shared by server actions (FormData: every value a string, so numbers
 * and dates are coerced) and the JSON routes. What an event asks for (reason, password) is also
 * enforced by the write path from the machine; these give field-level messages.
 */

const id = z.coerce.number({ error: 'must be a record id' }).int().positive().max(2_147_483_647);
const blankToUndefined = (v: unknown) => (v === '' || v === null ? undefined : v);
const optionalId = z.preprocess(blankToUndefined, id.optional());
const version = z.coerce.number({ error: 'Reload the page and try again.' }).int().positive();
const reason = z
  .string({ error: 'Give the reason for this change.' })
  .trim()
  .min(3, 'Give the reason for this change (a few words at least).')
  .max(2000, 'Keep the reason under 2,000 characters.');
/** Checked by the write path, which asks for it exactly when the transition is signed (or takes a verified signer). */
const password = z.string().max(256).optional();
const requiredText = (min: number, max: number, missing: string, tooLong: string) =>
  z.string({ error: missing }).trim().min(min, missing).max(max, tooLong);
const optionalText = (max: number, message: string) =>
  z.preprocess((v) => (typeof v === 'string' && v.trim() === '' ? undefined : v), z.string().trim().max(max, message).optional());
/** A calendar day from a date input (YYYY-MM-DD), stored as midnight UTC. */
const day = (missing: string) =>
  z
    .string({ error: missing })
    .trim()
    .regex(/^\d{4}-\d{2}-\d{2}$/, missing)
    .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s), 'That is not a calendar date.')
    .transform((s) => new Date(`${s}T00:00:00.000Z`));
const optionalDay = (missing: string) => z.preprocess(blankToUndefined, day(missing).optional());
const whole = (what: string, max: number) =>
  z.preprocess(
    blankToUndefined,
    z.coerce
      .number({ error: `Enter the number of ${what}.` })
      .int(`Enter a whole number of ${what}.`)
      .min(1, `Enter at least 1 ${what.replace(/s$/, '')}.`)
      .max(max, `At most ${max} ${what}.`)
      .optional(),
  );

/**
 * A recurrence criterion the product can compute from its own records: deviations with this defect
 * on this machine or ring, counted from the day the actions were completed, over a number of batches
 * or days. Stored as JSON in capas.recurrence_criterion.
 */
export const recurrenceCriterionSchema = z
  .object({
    defectId: z.number().int().positive().optional(),
    machineId: z.number().int().positive().optional(),
    ringId: z.number().int().positive().optional(),
    batches: z.number().int().min(1).max(1000).optional(),
    days: z.number().int().min(1).max(730).optional(),
  })
  .strict();
export type RecurrenceCriterion = z.output<typeof recurrenceCriterionSchema>;

/** The stored JSON read back; anything unreadable counts as no criterion rather than a crash. */
export function parseRecurrenceCriterion(json: string | null): RecurrenceCriterion | null {
  if (!json) return null;
  try {
    const parsed = recurrenceCriterionSchema.safeParse(JSON.parse(json));
    return parsed.success ? parsed.data : null;
  } catch {
    return null;
  }
}

/** JSON with a fixed key order, so the same criterion is stored (and signed) as the same text. */
export function serializeRecurrenceCriterion(c: RecurrenceCriterion | null): string | null {
  if (!c) return null;
  const ordered = { defectId: c.defectId, machineId: c.machineId, ringId: c.ringId, batches: c.batches, days: c.days };
  return JSON.stringify(Object.fromEntries(Object.entries(ordered).filter(([, v]) => v !== undefined)));
}

const criterionFields = {
  criterionDefectId: optionalId,
  criterionMachineId: optionalId,
  criterionRingId: optionalId,
  criterionBatches: whole('batches', 1000),
  criterionDays: whole('days', 730),
};

type CriterionFields = {
  criterionDefectId?: number;
  criterionMachineId?: number;
  criterionRingId?: number;
  criterionBatches?: number;
  criterionDays?: number;
};

/** A criterion needs a defect, a place (machine or ring) and a span (batches or days), or nothing at all. */
function checkCriterion(v: CriterionFields, ctx: z.RefinementCtx): void {
  const any = [v.criterionDefectId, v.criterionMachineId, v.criterionRingId, v.criterionBatches, v.criterionDays].some((x) => x !== undefined);
  if (!any) return;
  if (v.criterionDefectId === undefined) {
    ctx.addIssue({ code: 'custom', path: ['criterionDefectId'], message: 'Pick the defect whose recurrence is counted.' });
  }
  if (v.criterionMachineId === undefined && v.criterionRingId === undefined) {
    ctx.addIssue({ code: 'custom', path: ['criterionMachineId'], message: 'Pick the machine or the filling ring where it is counted.' });
  }
  if (v.criterionBatches === undefined && v.criterionDays === undefined) {
    ctx.addIssue({ code: 'custom', path: ['criterionBatches'], message: 'Say over how many batches or days it is counted.' });
  }
}

export function criterionFromFields(v: CriterionFields): RecurrenceCriterion | null {
  const c: RecurrenceCriterion = {
    ...(v.criterionDefectId !== undefined ? { defectId: v.criterionDefectId } : {}),
    ...(v.criterionMachineId !== undefined ? { machineId: v.criterionMachineId } : {}),
    ...(v.criterionRingId !== undefined ? { ringId: v.criterionRingId } : {}),
    ...(v.criterionBatches !== undefined ? { batches: v.criterionBatches } : {}),
    ...(v.criterionDays !== undefined ? { days: v.criterionDays } : {}),
  };
  return Object.keys(c).length === 0 ? null : c;
}

const title = requiredText(5, 200, 'Give the CAPA a short title (5 characters at least).', 'Keep the title under 200 characters.');
const problemStatement = requiredText(10, 10_000, 'State the problem in a sentence or two.', 'Keep the problem statement under 10,000 characters.');

export const createCapaSchema = z
  .object({
    title,
    sourceType: z.enum(capaSources, { error: 'Say where the CAPA comes from: a deviation, a complaint or a trend.' }),
    sourceId: optionalId,
    problemStatement,
    rootCause: optionalText(10_000, 'Keep the root cause under 10,000 characters.'),
    ownerId: id,
    dueAt: optionalDay('Enter the due date.'),
  })
  .superRefine((v, ctx) => {
    if (v.sourceType !== 'trend' && v.sourceId === undefined) {
      ctx.addIssue({ code: 'custom', path: ['sourceId'], message: `Pick the ${v.sourceType} this CAPA comes from.` });
    }
  });
export type CreateCapaInput = z.input<typeof createCapaSchema>;

export const updatePlanSchema = z
  .object({
    id,
    version,
    title,
    problemStatement,
    rootCause: optionalText(10_000, 'Keep the root cause under 10,000 characters.'),
    effectivenessCriteria: optionalText(5000, 'Keep the effectiveness criteria under 5,000 characters.'),
    /** Accepted only when it names the current owner; reassigning is reassignOwnerSchema. */
    ownerId: optionalId,
    dueAt: optionalDay('Enter the due date.'),
    ...criterionFields,
  })
  .superRefine(checkCriterion);
export type UpdatePlanInput = z.input<typeof updatePlanSchema>;

export const reassignOwnerSchema = z.object({
  id,
  version,
  ownerId: z.preprocess(blankToUndefined, z.coerce.number({ error: 'Pick the new owner.' }).int().positive()),
  reason,
});
export type ReassignOwnerInput = z.input<typeof reassignOwnerSchema>;

const actionFields = {
  kind: z.enum(capaActionKinds, { error: 'Say whether the action is corrective or preventive.' }),
  category: z.enum(capaActionCategories, { error: 'Pick what the action changes.' }),
  description: requiredText(10, 5000, 'Describe the action in a sentence or two.', 'Keep the description under 5,000 characters.'),
  ownerId: z.preprocess(blankToUndefined, z.coerce.number({ error: 'Pick who does this action.' }).int().positive()),
  dueAt: day('Enter the due date of the action.'),
};

export const addActionSchema = z.object({ id, version, ...actionFields });
export type AddActionInput = z.input<typeof addActionSchema>;

export const updateActionSchema = z.object({ id, version, actionId: id, ...actionFields });
export type UpdateActionInput = z.input<typeof updateActionSchema>;

export const evidenceMissingMessage = 'Describe the evidence that the action was done (10 characters at least).';

/**
 * Evidence of completion is rich text (HTML from the editor; plain text from a JSON client is kept as
 * it is). Only a ceiling here against absurd bodies: the command cleans it, then checks what is left.
 */
export const completeActionSchema = z.object({
  id,
  actionId: id,
  actionVersion: version,
  evidence: z.string({ error: evidenceMissingMessage }).max(1_000_000, 'The evidence is far too long; attach long documents as files.'),
});
export type CompleteActionInput = z.input<typeof completeActionSchema>;

const versioned = { id, version };
export const capaVersionSchema = z.object(versioned);
export type CapaVersionInput = z.input<typeof capaVersionSchema>;
export const signedSchema = z.object({ ...versioned, password });
export type SignedInput = z.input<typeof signedSchema>;
export const signedReasonSchema = z.object({ ...versioned, reason, password });
export type SignedReasonInput = z.input<typeof signedReasonSchema>;

/** What the detail page's event forms and POST /api/capa/[id] send: one lifecycle event. */
export const capaEventRequestSchema = z.object({
  event: z.enum(capaEvents, { error: 'Unknown event for a CAPA.' }),
  version,
  reason: z.string().optional(),
  password: z.string().optional(),
});
export type CapaEventRequest = z.input<typeof capaEventRequestSchema>;
