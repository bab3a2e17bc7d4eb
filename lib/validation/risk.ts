import { z } from 'zod';
import {
  riskDescriptionMaxLength,
  riskDimensionLabels,
  riskDimensions,
  riskLabelMaxLength,
  riskScores,
  type RiskDimension,
  type RiskLevel,
  type RiskScales,
} from '../risk/scales';

/*
 * Input for risk scoring and for publishing a new version of the scales. The publish form is flat
 * (one field per step and part, e.g. `severity_7_label`) so each message sits next to its field;
 * the JSON API sends the same flat shape.
 */

const score = (dimension: RiskDimension) => {
  const message = `Choose the ${riskDimensionLabels[dimension].toLowerCase()} score, a whole number from 1 to 10.`;
  return z.coerce.number({ error: message }).int(message).min(1, message).max(10, message);
};

/** A score as recorded on a deviation, with the version of the scales it was scored on. */
export const riskScoreSchema = z.object({
  severity: score('severity'),
  occurrence: score('occurrence'),
  detection: score('detection'),
  scaleVersion: z.coerce
    .number({ error: 'The form is missing the risk scale version. Reload the page.' })
    .int()
    .positive('The form is missing the risk scale version. Reload the page.'),
});
export type RiskScoreInput = z.output<typeof riskScoreSchema>;

export type RiskLevelPart = 'label' | 'description';

export const riskLevelFieldName = (dimension: RiskDimension, score: number, part: RiskLevelPart): string =>
  `${dimension}_${score}_${part}`;

const text = (what: string, max: number) =>
  z
    .string({ error: `${what} is required.` })
    .trim()
    .min(1, `${what} is required.`)
    .max(max, `${what} must be at most ${max} characters.`);

const levelFields: Record<string, z.ZodType<string>> = {};
for (const d of riskDimensions) {
  for (const s of riskScores) {
    const name = `${riskDimensionLabels[d]} ${s}`;
    levelFields[riskLevelFieldName(d, s, 'label')] = text(`${name}: the short label`, riskLabelMaxLength);
    levelFields[riskLevelFieldName(d, s, 'description')] = text(`${name}: the description`, riskDescriptionMaxLength);
  }
}

export const riskScaleNoteMaxLength = 500;

export const publishRiskScalesSchema = z
  .object({
    basedOnVersion: z.coerce
      .number({ error: 'The form is missing the version it was based on. Reload the page.' })
      .int()
      .min(0, 'The form is missing the version it was based on. Reload the page.'),
    note: z
      .string({ error: 'Say what changed and why.' })
      .trim()
      .min(10, 'Say what changed and why (at least 10 characters); it goes into the audit trail.')
      .max(riskScaleNoteMaxLength, `Keep the note to ${riskScaleNoteMaxLength} characters.`),
    ...levelFields,
  })
  .transform((input) => {
    const raw = input as Record<string, unknown>;
    const levels = Object.fromEntries(
      riskDimensions.map((d) => [
        d,
        riskScores.map(
          (s): RiskLevel => ({
            score: s,
            label: raw[riskLevelFieldName(d, s, 'label')] as string,
            description: raw[riskLevelFieldName(d, s, 'description')] as string,
          }),
        ),
      ]),
    ) as unknown as RiskScales;
    return { basedOnVersion: input.basedOnVersion, note: input.note, levels };
  });
export type PublishRiskScalesInput = z.output<typeof publishRiskScalesSchema>;

/** The flat form values for a set of scales, to prefill the publish form. */
export function riskScalesToFields(scales: RiskScales): Record<string, string> {
  const out: Record<string, string> = {};
  for (const d of riskDimensions) {
    for (const level of scales[d]) {
      out[riskLevelFieldName(d, level.score, 'label')] = level.label;
      out[riskLevelFieldName(d, level.score, 'description')] = level.description;
    }
  }
  return out;
}
