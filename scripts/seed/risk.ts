import type { AuditActor } from '../../lib/audit';
import type { RecordType } from '../../lib/records/types';
import { defaultRiskScales, riskDimensions } from '../../lib/risk/scales';
import { riskScalesToFields } from '../../lib/validation/risk';
import type { Tx } from '../../db/client';
import { riskScaleLevels, riskScaleVersions } from '../../db/schema';

/* Version 1 of the risk scales: Plumbline's default capsule wording, published by the demo administrator. */

export const firstRiskScaleNote =
  'First version: default 1-10 severity, occurrence and detection scales for hard-capsule filling, to be reviewed by the site.';

export async function seedRiskScales(
  tx: Tx,
  actor: AuditActor,
  created: (recordType: RecordType, recordId: number, values: Record<string, unknown>) => Promise<unknown>,
): Promise<void> {
  const [row] = await tx
    .insert(riskScaleVersions)
    .values({ version: 1, note: firstRiskScaleNote, publishedBy: actor.id!, publishedAt: new Date('2026-07-01T06:00:00.000Z') })
    .$returningId();
  await tx.insert(riskScaleLevels).values(
    riskDimensions.flatMap((dimension) =>
      defaultRiskScales[dimension].map((l) => ({ scaleVersionId: row!.id, dimension, ...l })),
    ),
  );
  await created('risk_scale', row!.id, { version: 1, note: firstRiskScaleNote, ...riskScalesToFields(defaultRiskScales) });
}
