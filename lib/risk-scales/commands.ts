import 'server-only';
import { desc } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { riskScaleLevels, riskScaleVersions } from '../../db/schema';
import { diffFields, writeAudit } from '../audit';
import { assertCan, type Actor } from '../auth/permissions';
import { now } from '../clock';
import { ConflictError, NotFoundError, ValidationError } from '../errors';
import { riskDimensions, type RiskScales } from '../risk/scales';
import { parseInput } from '../validation/parse';
import { publishRiskScalesSchema, riskScalesToFields } from '../validation/risk';
import { getRiskScaleVersion, type RiskScaleVersionDto } from './queries';

/*
 * Publishing the risk scales. A published version is never edited: a change of wording is a new
 * version (the highest number plus one) with all 30 steps, so every score already recorded still
 * reads with the words it was scored against. The publication is audited with each changed step,
 * old → new, and the administrator's note as the reason (21 CFR 11.10(e)).
 */

export interface RiskScaleActor extends Actor {
  name: string;
}

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

export async function publishRiskScales(
  actor: RiskScaleActor,
  input: unknown,
  database: DbOrTx = db,
): Promise<RiskScaleVersionDto> {
  assertCan(actor, 'risk.manage_scales');
  const data = parseInput(publishRiskScalesSchema, input);
  let newVersion: number;
  try {
    newVersion = await database.transaction(async (tx) => {
      // Locking the newest row makes two publishers queue; the unique version index backs it up.
      const [latest] = await tx
        .select({ id: riskScaleVersions.id, version: riskScaleVersions.version, note: riskScaleVersions.note })
        .from(riskScaleVersions)
        .orderBy(desc(riskScaleVersions.version))
        .limit(1)
        .for('update');
      const currentVersion = latest?.version ?? 0;
      if (data.basedOnVersion !== currentVersion) throw new ConflictError(staleFormMessage);
      const current = latest ? await getRiskScaleVersion(latest.version, tx) : null;
      const version = currentVersion + 1;
      const before = auditView(currentVersion, current?.scales ?? null, latest?.note ?? null);
      const after = auditView(version, data.levels, data.note);
      const changes = diffFields(before, after);
      if (current && !changes.some((c) => c.field !== 'version' && c.field !== 'note')) {
        throw new ValidationError('The wording is the same as the current version. Change at least one step to publish.');
      }

      const [row] = await tx
        .insert(riskScaleVersions)
        .values({ version, note: data.note, publishedBy: actor.id, publishedAt: now() })
        .$returningId();
      await tx.insert(riskScaleLevels).values(
        riskDimensions.flatMap((dimension) =>
          data.levels[dimension].map((l) => ({
            scaleVersionId: row!.id,
            dimension,
            score: l.score,
            label: l.label,
            description: l.description,
          })),
        ),
      );
      await writeAudit(tx, {
        actor: { id: actor.id, name: actor.name },
        recordType: 'risk_scale',
        recordId: row!.id,
        action: `published version ${version}`,
        changes,
        reason: data.note,
      });
      return version;
    });
  } catch (err) {
    if (isDuplicateKey(err)) throw new ConflictError(staleFormMessage);
    throw err;
  }
  const published = await getRiskScaleVersion(newVersion, database);
  if (!published) throw new NotFoundError('The published risk scale version');
  return published;
}
