import { z } from 'zod';
import { isIsoDate } from '../clocks/dates';
import { complaintEvents } from '../../workflows/complaint';
import { complainantKinds, intakeChannels } from './labels';

/*
 * Input of the complaint commands, shared by server actions (FormData: every value a string, so
 * numbers, booleans and dates are coerced) and the JSON routes. Checks that need the database (the
 * lot, the product, the received date against the lot and the site's today) are in the commands.
 */

const id = z.coerce.number({ error: 'must be a record id' }).int().positive().max(2_147_483_647);
const blank = (v: unknown) => (v === '' || v === null ? undefined : v);
const optionalId = z.preprocess(blank, id.optional());
const version = z.coerce.number({ error: 'Reload the page and try again.' }).int().positive();
const reason = z
  .string({ error: 'Give the reason.' })
  .trim()
  .min(3, 'Give the reason (a few words at least).')
  .max(2000, 'Keep the reason under 2,000 characters.');
/** Checked by the write path, which asks for it exactly when the transition is signed (or takes a verified signer). */
const password = z.string().max(256).optional();
const checkbox = z.preprocess((v) => v === true || v === 'true' || v === 'on' || v === '1', z.boolean());
/** A yes/no radio: required, so an unanswered question is not read as "no". */
const yesNo = (message: string) =>
  z.preprocess((v) => (v === true || v === 'yes' || v === 'true' ? true : v === false || v === 'no' || v === 'false' ? false : undefined), z.boolean({ error: message }));
const optionalText = (max: number, message: string) =>
  z.preprocess((v) => (typeof v === 'string' && v.trim() === '' ? undefined : v), z.string().trim().max(max, message).optional());
const isoDate = (message: string) =>
  z
    .string({ error: message })
    .trim()
    .refine((s) => isIsoDate(s), message);

const versioned = { id, version };

export const intakeSchema = z
  .object({
    complainantName: z
      .string({ error: 'Give the complainant’s name.' })
      .trim()
      .min(2, 'Give the complainant’s name.')
      .max(160, 'Keep the name under 160 characters.'),
    complainantContact: z
      .string({ error: 'Say how to reach them: e-mail, telephone or postal address.' })
      .trim()
      .min(3, 'Say how to reach them: e-mail, telephone or postal address.')
      .max(255, 'Keep the contact under 255 characters.'),
    complainantKind: z.enum(complainantKinds, { error: 'Pick who is complaining.' }),
    channel: z.enum(intakeChannels, { error: 'Pick how the complaint reached us.' }),
    receivedOn: isoDate('Enter the date we received it (YYYY-MM-DD).'),
    lot: optionalText(60, 'Keep the lot under 60 characters.'),
    productId: optionalId,
    description: z
      .string({ error: 'Say what they found.' })
      .trim()
      .min(10, 'Say what they found in a sentence or two.')
      .max(5000, 'Keep the description under 5,000 characters; attach longer documents.'),
    unitsAffected: z.preprocess(
      blank,
      z.coerce
        .number({ error: 'Enter a number of capsules.' })
        .int('Enter a whole number.')
        .min(0, 'Cannot be negative.')
        .max(10_000_000, 'That is more than a batch holds.')
        .optional(),
    ),
    personHarmed: checkbox.default(false),
    harmDescription: optionalText(5000, 'Keep the description under 5,000 characters.'),
    samplesReturning: checkbox.default(false),
  })
  .superRefine((v, ctx) => {
    if (v.personHarmed && !v.harmDescription) {
      ctx.addIssue({ code: 'custom', path: ['harmDescription'], message: 'Say how the person was harmed.' });
    }
  });
export type IntakeInput = z.input<typeof intakeSchema>;

export const versionSchema = z.object(versioned);
export type VersionInput = z.input<typeof versionSchema>;

export const signedSchema = z.object({ ...versioned, password });
export type SignedInput = z.input<typeof signedSchema>;

export const signedReasonSchema = z.object({ ...versioned, reason, password });
export type SignedReasonInput = z.input<typeof signedReasonSchema>;

export const reopenSchema = z.object({ ...versioned, reason, to: z.enum(['assessment', 'investigation'], { error: 'Pick the step to reopen.' }) });
export type ReopenInput = z.input<typeof reopenSchema>;

export const assessmentSchema = z
  .object({
    ...versioned,
    category: z.string({ error: 'Pick a category.' }).trim().min(1, 'Pick a category.').max(48),
    adverseEvent: yesNo('Say whether it is an adverse event.'),
    seriousAdverseEvent: z.preprocess(
      (v) => (v === 'yes' || v === true || v === 'true' ? true : v === 'no' || v === false || v === 'false' ? false : undefined),
      z.boolean().optional(),
    ),
    reportable: yesNo('Say whether it must be reported.'),
    assessmentRationale: z
      .string({ error: 'Give the rationale for the decision.' })
      .trim()
      .min(10, 'Give the rationale for the decision in a sentence or two.')
      .max(5000, 'Keep the rationale under 5,000 characters.'),
  })
  .superRefine((v, ctx) => {
    // A serious adverse event is an adverse event first (21 CFR 314.80(a), 21 U.S.C. 379aa-1(a)).
    if (v.adverseEvent && v.seriousAdverseEvent === undefined) {
      ctx.addIssue({ code: 'custom', path: ['seriousAdverseEvent'], message: 'Say whether the adverse event is serious.' });
    }
  });
export type AssessmentInput = z.input<typeof assessmentSchema>;

export const investigationSchema = z.object({
  ...versioned,
  retainedSamplesChecked: z.preprocess(
    (v) => (v === 'yes' || v === true || v === 'true' ? true : v === 'no' || v === false || v === 'false' ? false : undefined),
    z.boolean().optional(),
  ),
  retainedSamplesNote: optionalText(5000, 'Keep the note under 5,000 characters.'),
  investigationSummary: optionalText(10_000, 'Keep the summary under 10,000 characters; attach longer reports as evidence.'),
});
export type InvestigationInput = z.input<typeof investigationSchema>;

/** A deviation or CAPA named by its number (DEV-2026-0042) or its id. */
export const linkSchema = z.object({
  ...versioned,
  target: z.enum(['deviation', 'capa'], { error: 'Pick what to link.' }),
  reference: z
    .string({ error: 'Enter the record’s number.' })
    .trim()
    .min(1, 'Enter the record’s number.')
    .max(20, 'Enter a number like DEV-2026-0042.'),
});
export type LinkInput = z.input<typeof linkSchema>;

export const raiseCapaSchema = z.object({
  ...versioned,
  title: z.string({ error: 'Give the CAPA a title.' }).trim().min(5, 'Give the CAPA a short title (5 characters at least).').max(200),
  problemStatement: z
    .string({ error: 'State the problem.' })
    .trim()
    .min(10, 'State the problem in a sentence or two.')
    .max(10_000, 'Keep the problem statement under 10,000 characters.'),
  ownerId: id,
});
export type RaiseCapaInput = z.input<typeof raiseCapaSchema>;

export const responseDraftSchema = z.object({
  ...versioned,
  letter: z.string({ error: 'Write the letter.' }).max(100_000, 'The letter is too long; keep it under a few pages.'),
});
export type ResponseDraftInput = z.input<typeof responseDraftSchema>;

export const sendResponseSchema = z.object({
  ...versioned,
  channel: z.enum(['email', 'post'], { error: 'Pick e-mail or post.' }),
});
export type SendResponseInput = z.input<typeof sendResponseSchema>;

export const reportSubmittedSchema = z.object({
  ...versioned,
  submittedOn: isoDate('Enter the date the report was submitted (YYYY-MM-DD).'),
});
export type ReportSubmittedInput = z.input<typeof reportSubmittedSchema>;

/** A lifecycle event as the page's forms and POST /api/complaints/:id send it. */
export const complaintEventRequestSchema = z.object({
  event: z.enum(complaintEvents, { error: `Event is one of: ${complaintEvents.join(', ')}.` }),
  version,
  reason: z.preprocess(blank, z.string().optional()),
  password: z.preprocess(blank, z.string().optional()),
});
