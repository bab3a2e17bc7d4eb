import { z } from 'zod';
import { causeBranches, type CauseBranch } from '../causes/branches';

/*
 * The investigation section's shapes and input schema. Pure (zod only), so the form can use the same
 * lists and labels the server checks against. Five whys and the cause-and-effect marks are stored as
 * JSON text in deviations.five_whys and deviations.cause_analysis.
 */

/** The class of root cause recorded for trending; the six branches plus an honest "not found". */
export const rootCauseCategories = [...causeBranches, 'not_determined'] as const;
export type RootCauseCategory = (typeof rootCauseCategories)[number];

export const rootCauseCategoryLabels: Record<RootCauseCategory, string> = {
  method: 'Method or procedure',
  machine: 'Machine or equipment',
  material: 'Material (shells, powder)',
  measurement: 'Measurement or inspection',
  people: 'People or training',
  environment: 'Environment (room, humidity)',
  not_determined: 'Not determined after investigation',
};

export function rootCauseCategoryLabel(value: string | null): string | null {
  if (value === null) return null;
  return (rootCauseCategoryLabels as Record<string, string>)[value] ?? value;
}

/** What the investigator concluded about one probable cause. */
export const causeStates = ['not_assessed', 'ruled_out', 'contributing', 'root_cause'] as const;
export type CauseState = (typeof causeStates)[number];

export const causeStateLabels: Record<CauseState, string> = {
  not_assessed: 'Not assessed',
  ruled_out: 'Ruled out',
  contributing: 'Contributing',
  root_cause: 'Root cause',
};

export const maxWhys = 5;
export const maxOwnCausesPerBranch = 8;

export interface WhyStep {
  why: string;
  because: string;
}

/** A mark on a cause from the defect's catalogue (lib/causes), by its id. */
export interface CatalogueMark {
  causeId: string;
  state: CauseState;
  note: string;
}

/** A cause the investigator added on a branch. */
export interface OwnCause {
  branch: CauseBranch;
  cause: string;
  state: CauseState;
  note: string;
}

export interface CauseAnalysis {
  catalogue: CatalogueMark[];
  own: OwnCause[];
}

export const emptyCauseAnalysis: CauseAnalysis = { catalogue: [], own: [] };

const text = (max: number, what: string) =>
  z
    .string({ error: `${what} must be text.` })
    .trim()
    .max(max, `Keep ${what.toLowerCase()} under ${max.toLocaleString('en-US')} characters.`);

const whyStepSchema = z.object({ why: text(1000, 'Each why'), because: text(1000, 'Each answer') });

export const fiveWhysSchema = z
  .array(whyStepSchema)
  .transform((rows) => rows.filter((r) => r.why !== '' || r.because !== ''))
  .pipe(z.array(whyStepSchema).max(maxWhys, `Record at most ${maxWhys} whys.`));

const causeState = z.enum(causeStates, { error: 'Pick a state for each cause.' });

export const causeAnalysisSchema = z.object({
  catalogue: z
    .array(z.object({ causeId: z.string().min(1).max(64), state: causeState, note: text(2000, 'A note') }))
    .max(200)
    // Only what carries information is kept: an unassessed cause without a note is the default.
    .transform((marks) => marks.filter((m) => m.state !== 'not_assessed' || m.note !== '')),
  own: z
    .array(
      z.object({
        branch: z.enum(causeBranches, { error: 'Pick a branch for each cause you add.' }),
        cause: text(500, 'A cause'),
        state: causeState,
        note: text(2000, 'A note'),
      }),
    )
    .max(maxOwnCausesPerBranch * causeBranches.length)
    .transform((own) => own.filter((c) => c.cause !== ''))
    .refine(
      (own) => causeBranches.every((b) => own.filter((c) => c.branch === b).length <= maxOwnCausesPerBranch),
      `Add at most ${maxOwnCausesPerBranch} causes of your own on one branch.`,
    ),
});

/** Forms post the structured parts as JSON in one field; the JSON API sends them as they are. */
const jsonField = <S extends z.ZodType>(schema: S, fallback: unknown, what: string) =>
  z.preprocess((v) => {
    if (v === undefined || v === null || v === '') return fallback;
    if (typeof v !== 'string') return v;
    try {
      return JSON.parse(v);
    } catch {
      return { invalid: what };
    }
  }, schema);

const blankToUndefined = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : v === null ? undefined : v);

export const saveInvestigationSchema = z.object({
  id: z.coerce.number({ error: 'must be a record id' }).int().positive(),
  version: z.coerce.number({ error: 'Reload the page and try again.' }).int().positive(),
  // The raw editor HTML; cleaned and measured on the server (lib/rich-text). The cap here only stops
  // an absurd body before it is parsed.
  investigationReport: z.preprocess(blankToUndefined, z.string().max(1_000_000, 'The report is far too long.').optional()),
  fiveWhys: jsonField(fiveWhysSchema, [], 'five whys'),
  causeAnalysis: jsonField(causeAnalysisSchema, emptyCauseAnalysis, 'cause analysis'),
  rootCauseCategory: z.preprocess(
    blankToUndefined,
    z.enum(rootCauseCategories, { error: 'Pick a root-cause category from the list.' }).optional(),
  ),
  rootCause: z.preprocess(blankToUndefined, text(10_000, 'The root cause').optional()),
  productImpact: z.preprocess(blankToUndefined, text(10_000, 'The product impact').optional()),
  capaRequired: z.preprocess(
    (v) => (v === 'yes' || v === true || v === 'true' ? true : v === 'no' || v === false || v === 'false' ? false : v === '' || v == null ? null : v),
    z.boolean({ error: 'Say whether a CAPA is needed: yes or no.' }).nullable(),
  ),
});
/** What callers send (zod's own input type is all `unknown` because of the preprocessing). */
export interface SaveInvestigationInput {
  id: number | string;
  version: number | string;
  investigationReport?: string | null;
  /** An array, or its JSON text as a form posts it. */
  fiveWhys?: WhyStep[] | string;
  causeAnalysis?: CauseAnalysis | string;
  rootCauseCategory?: string | null;
  rootCause?: string | null;
  productImpact?: string | null;
  capaRequired?: boolean | 'yes' | 'no' | '' | null;
}
export type SaveInvestigationFields = z.output<typeof saveInvestigationSchema>;

/** Reads stored JSON leniently: a value that no longer parses shows as empty rather than breaking the page. */
export function parseStoredFiveWhys(stored: string | null): WhyStep[] {
  if (!stored) return [];
  try {
    const result = fiveWhysSchema.safeParse(JSON.parse(stored));
    return result.success ? result.data : [];
  } catch {
    return [];
  }
}

export function parseStoredCauseAnalysis(stored: string | null): CauseAnalysis {
  if (!stored) return emptyCauseAnalysis;
  try {
    const result = causeAnalysisSchema.safeParse(JSON.parse(stored));
    return result.success ? result.data : emptyCauseAnalysis;
  } catch {
    return emptyCauseAnalysis;
  }
}

/** What submit_for_approval needs filled in, with the field each message belongs to. */
export function missingForApproval(row: {
  investigationReport: string | null;
  rootCauseCategory: string | null;
  rootCause: string | null;
  productImpact: string | null;
  capaRequired: boolean | null;
}, reportIsEmpty: (html: string) => boolean): Record<string, string[]> {
  const missing: Record<string, string[]> = {};
  if (!row.investigationReport || reportIsEmpty(row.investigationReport)) missing.investigationReport = ['Write the investigation report.'];
  if (!row.rootCauseCategory) missing.rootCauseCategory = ['Pick the root-cause category.'];
  if (!row.rootCause?.trim()) missing.rootCause = ['State the root cause (or why it could not be found).'];
  if (!row.productImpact?.trim()) missing.productImpact = ['Describe the impact on the product.'];
  if (row.capaRequired === null) missing.capaRequired = ['Say whether a CAPA is needed.'];
  return missing;
}
