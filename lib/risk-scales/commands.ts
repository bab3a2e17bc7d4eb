import 'server-only';
import { riskScaleLevels } from '../../db/schema';
import { diffFields } from '../audit';
import { assertCan } from '../auth/permissions';
import { now } from '../clock';
import { ConflictError, NotFoundError, ValidationError } from '../errors';
import type { RecordActor } from '../records/kind';
import { createRecord } from '../records/write-path';
import { riskDimensions, type RiskScales } from '../risk/scales';
import { parseInput } from '../validation/parse';
import { publishRiskScalesSchema, riskScalesToFields } from '../validation/risk';
import { riskScaleKind } from './kind';
import { getCurrentRiskScales, getRiskScaleVersion, type RiskScaleVersionDto } from './queries';

/*
 * Publishing the risk scales. A published version is never edited: a change of wording is a new
 * version (the highest number plus one) with all 30 steps, so every score already recorded still
 * reads with the words it was scored against. The publication is audited with each changed step,
 * old → new, and the administrator's note as the reason (21 CFR 11.10(e)).
 */

export type RiskScaleActor = RecordActor;

export const staleFormMessage =
  'Someone published the scales since you opened this form. Reload it to start from the newest version; nothing was saved.';

const isDuplicateKey = (err: unknown): boolean => {
  const e = err as { errno?: number; cause?: { errno?: number } };
  return (e?.cause?.errno ?? e?.errno) === 1062;
};

const auditView = (version: number, scales: RiskScales | null, note: string | null) => ({
  version,
  note,
  ...(scales ? riskScalesToFields(scales) : {}),
});

export async function publishRiskScales(actor: RiskScaleActor, input: unknown): Promise<RiskScaleVersionDto> {
  assertCan(actor, 'risk.manage_scales');
  const data = parseInput(publishRiskScalesSchema, input);
  let published: { row: { scaleVersion: number } };
  try {
    // No lock: two administrators publishing from the same version both ask for the next number,
    // and the unique index on it refuses the second (below), which then reloads the form.
    published = await createRecord(riskScaleKind, actor, 'risk.manage_scales', async (tx) => {
      const current = await getCurrentRiskScales(tx);
      const currentVersion = current?.version ?? 0;
      if (data.basedOnVersion !== currentVersion) throw new ConflictError(staleFormMessage);
      const version = currentVersion + 1;
      const changes = diffFields(
        auditView(currentVersion, current?.scales ?? null, current?.note ?? null),
        auditView(version, data.levels, data.note),
      );
      if (current && !changes.some((c) => c.field !== 'version' && c.field !== 'note')) {
        throw new ValidationError('The wording is the same as the current version. Change at least one step to publish.');
      }
      return {
        action: `published version ${version}`,
        reason: data.note,
        values: { scaleVersion: version, note: data.note, publishedBy: actor.id, publishedAt: now() },
        audit: changes,
        children: async (txc, row) => {
          await txc.insert(riskScaleLevels).values(
            riskDimensions.flatMap((dimension) =>
              data.levels[dimension].map((l) => ({
                scaleVersionId: row.id,
                dimension,
                score: l.score,
                label: l.label,
                description: l.description,
              })),
            ),
          );
        },
      };
    });
  } catch (err) {
    if (isDuplicateKey(err)) throw new ConflictError(staleFormMessage);
    throw err;
  }
  const dto = await getRiskScaleVersion(published.row.scaleVersion);
  if (!dto) throw new NotFoundError('The published risk scale version');
  return dto;
}
