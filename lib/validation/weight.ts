import { z } from 'zod';
import { formatLineError, parseMasses } from '../weight/parse';
import { weightMethods } from '../weight/evaluate';

/*
 * Recording a weight check. The masses arrive as pasted text (the form) or as a list of numbers
 * (the JSON API); both become milligrams here, with the balance parser's line-by-line messages
 * on the masses field. Shared by the server action, the route handler and the page.
 */

const optionalNumber = (label: string, min: number, max: number) =>
  z.preprocess(
    (v) => (v === '' || v === undefined || v === null ? null : typeof v === 'string' ? Number(v.replace(',', '.')) : v),
    z
      .number({ error: `${label} must be a number.` })
      .min(min, { error: `${label} must be at least ${min}.` })
      .max(max, { error: `${label} must be at most ${max}.` })
      .nullable(),
  );

export const maxMassesPerCheck = 60;

export const recordWeightCheckSchema = z
  .object({
    batchId: z.coerce.number({ error: 'Pick a batch.' }).int().positive({ error: 'Pick a batch.' }),
    method: z.enum(weightMethods, { error: 'Choose a method.' }),
    massMode: z.enum(['gross', 'net'], { error: 'Say whether the masses are gross or net.' }),
    shellMassMg: optionalNumber('Shell mass', 1, 500),
    masses: z.preprocess(
      (v) => (Array.isArray(v) ? v.join('\n') : v),
      z.string({ error: 'Enter the masses.' }).max(20_000, { error: 'That is more text than a weight check holds.' }),
    ),
    assayPercent: optionalNumber('Assay', 50, 150),
    targetPercent: optionalNumber('Target content', 90, 110),
    note: z.preprocess(
      (v) => (typeof v === 'string' && v.trim() === '' ? null : v),
      z.string().trim().max(1000, { error: 'Keep the note under 1000 characters.' }).nullable().optional(),
    ),
  })
  .transform((input, ctx) => {
    const parsed = parseMasses(input.masses);
    if (parsed.errors.length > 0) {
      ctx.addIssue({ code: 'custom', path: ['masses'], message: parsed.errors.map(formatLineError).join(' ') });
    } else if (parsed.massesMg.length === 0) {
      ctx.addIssue({ code: 'custom', path: ['masses'], message: 'Enter the masses, one per line.' });
    } else if (parsed.massesMg.length > maxMassesPerCheck) {
      ctx.addIssue({ code: 'custom', path: ['masses'], message: `A check holds at most ${maxMassesPerCheck} masses.` });
    }
    if (input.massMode === 'gross' && input.shellMassMg === null) {
      ctx.addIssue({ code: 'custom', path: ['shellMassMg'], message: 'Gross masses need the mean empty-shell mass.' });
    }
    return {
      batchId: input.batchId,
      method: input.method,
      massMode: input.massMode,
      shellMassMg: input.massMode === 'gross' ? input.shellMassMg : null,
      massesMg: parsed.massesMg,
      assayPercent: input.assayPercent ?? null,
      targetPercent: input.targetPercent ?? null,
      note: input.note ?? null,
    };
  });

export type RecordWeightCheckInput = z.output<typeof recordWeightCheckSchema>;
