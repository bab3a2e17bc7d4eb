import { z } from 'zod';
import { aqlValues, inspectionLevels } from '../sampling/master-tables';
import { severities } from '../sampling/plan';

/*
 * Input of the re-inspection sampling calculator: from the form as the person types (every value a
 * string) and from the page address, so a plan can be bookmarked or pasted into a deviation.
 * The defect-class defaults (major 0.65, minor 2.5, critical 100 %) are common practice for
 * capsule lines, not values from a standard; the site's SOP decides and the fields stay editable.
 */

export const maxLotSize = 1_000_000_000;

export const criticalChoices = ['hundred_percent', ...aqlValues] as const;
export type CriticalChoice = (typeof criticalChoices)[number];

export const samplingDefaults = {
  lotSize: '',
  level: 'II',
  severity: 'normal',
  critical: 'hundred_percent',
  major: '0.65',
  minor: '2.5',
} as const;

export const samplingInputSchema = z.object({
  lotSize: z
    .string({ error: 'Enter the lot size.' })
    .trim()
    .min(1, 'Enter the lot size (number of capsules in the lot).')
    .regex(/^\d[\d,\s]*$/, 'Enter the lot size as a whole number of capsules, e.g. 250000.')
    .transform((s) => Number(s.replace(/[,\s]/g, '')))
    .pipe(
      z
        .number()
        .min(2, 'ISO 2859-1 Table 1 starts at a lot of 2 units.')
        .max(maxLotSize, 'Enter a lot of at most 1,000,000,000 capsules.'),
    ),
  level: z.enum(inspectionLevels, { error: 'Choose an inspection level.' }),
  severity: z.enum(severities, { error: 'Choose normal, tightened or reduced inspection.' }),
  critical: z.enum(criticalChoices, { error: 'Choose 100 % inspection or an AQL for critical defects.' }),
  major: z.enum(aqlValues, { error: 'Choose an AQL for major defects.' }),
  minor: z.enum(aqlValues, { error: 'Choose an AQL for minor defects.' }),
});

export type SamplingInput = z.output<typeof samplingInputSchema>;
export type SamplingFormValues = { [K in keyof typeof samplingDefaults]: string };

/** The form's starting values from the page address; anything unknown falls back to the default. */
export function samplingFormValuesFrom(params: Record<string, string | string[] | undefined>): SamplingFormValues {
  const pick = <K extends keyof SamplingFormValues>(key: K, allowed: readonly string[] | null): string => {
    const raw = params[key];
    const value = typeof raw === 'string' ? raw : undefined;
    if (value === undefined) return samplingDefaults[key];
    if (allowed && !allowed.includes(value)) return samplingDefaults[key];
    return value.slice(0, 20);
  };
  return {
    lotSize: pick('lotSize', null),
    level: pick('level', inspectionLevels),
    severity: pick('severity', severities),
    critical: pick('critical', criticalChoices),
    major: pick('major', aqlValues),
    minor: pick('minor', aqlValues),
  };
}
