import { and, asc, desc, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { auditEntries, riskScaleLevels, riskScaleVersions } from '@/db/schema';
import { ConflictError, ForbiddenError, ValidationError } from '@/lib/errors';
import { publishRiskScales, staleFormMessage } from '@/lib/risk-scales/commands';
import { getCurrentRiskScales, getRiskScaleVersion, listRiskScaleVersions, listScoringDefects } from '@/lib/risk-scales/queries';
import { defaultRiskScales } from '@/lib/risk/scales';
import { riskLevelFieldName, riskScalesToFields } from '@/lib/validation/risk';
import { makeUser } from '../support/fixtures';

/*
 * Publishing the risk scales against the real database. Other test files may publish too, so each
 * test starts from whatever version is current and never assumes version 1 is the newest.
 */

afterAll(async () => {
  await closeDb();
});

async function current() {
  const scales = await getCurrentRiskScales();
  if (!scales) throw new Error('the demo seed publishes version 1 of the risk scales');
  return scales;
}

const levelRows = async (versionId: number) =>
  db
    .select()
    .from(riskScaleLevels)
    .where(eq(riskScaleLevels.scaleVersionId, versionId))
    .orderBy(asc(riskScaleLevels.dimension), asc(riskScaleLevels.score));

describe('risk scales', () => {
  it('the demo has version 1 with ten steps on each of the three scales, published through the product and in the audit trail (21 CFR 11.10(e))', async () => {
    const v1 = await getRiskScaleVersion(1);
    expect(v1?.version).toBe(1);
    expect(v1?.scales).toEqual(defaultRiskScales);
    const entries = await db
      .select()
      .from(auditEntries)
      .where(and(eq(auditEntries.recordType, 'risk_scale'), eq(auditEntries.recordId, v1!.id), eq(auditEntries.action, 'published version 1')));
    expect(entries).toHaveLength(1);
  });

  it('publishes a new version (highest + 1) with all 30 steps, audited with the changes and the note (21 CFR 11.10(e))', async () => {
    const admin = await makeUser('admin');
    const before = await current();
    const beforeRows = await levelRows(before.id);
    const newLabel = `Caught at weight check ${Date.now()}`;
    const published = await publishRiskScales(admin, {
      ...riskScalesToFields(before.scales),
      [riskLevelFieldName('detection', 5, 'label')]: newLabel,
      basedOnVersion: String(before.version),
      note: 'Detection 5 names the in-process weight check.',
    });

    expect(published.version).toBe(before.version + 1);
    expect(published.publishedByName).toBe(admin.name);
    expect(published.scales.detection[4]!.label).toBe(newLabel);
    expect(await levelRows(published.id)).toHaveLength(30);
    expect((await current()).version).toBe(published.version);

    // The old version is exactly as it was (versions are never edited).
    expect(await levelRows(before.id)).toEqual(beforeRows);
    expect((await getRiskScaleVersion(before.version))?.scales).toEqual(before.scales);

    const [entry] = await db
      .select()
      .from(auditEntries)
      .where(and(eq(auditEntries.recordType, 'risk_scale'), eq(auditEntries.recordId, published.id)));
    expect(entry).toMatchObject({
      userId: admin.id,
      userName: admin.name,
      action: `published version ${published.version}`,
      reason: 'Detection 5 names the in-process weight check.',
    });
    const changes = JSON.parse(entry!.changes) as { field: string; from: unknown; to: unknown }[];
    expect(changes).toContainEqual({ field: 'detection_5_label', from: before.scales.detection[4]!.label, to: newLabel });
    expect(changes).toContainEqual({ field: 'version', from: before.version, to: published.version });
    expect(changes.filter((c) => c.field.endsWith('_label') || c.field.endsWith('_description'))).toHaveLength(1);

    const history = await listRiskScaleVersions();
    expect(history[0]?.version).toBe(published.version);
    expect(history.map((h) => h.version)).toContain(before.version);
  });

  it.each(['qa_approver', 'qa_investigator', 'operator'] as const)('refuses a %s: only an administrator manages the scales', async (role) => {
    const person = await makeUser(role);
    const before = await current();
    const [latestBefore] = await db.select({ id: riskScaleVersions.id }).from(riskScaleVersions).orderBy(desc(riskScaleVersions.id)).limit(1);
    await expect(
      publishRiskScales(person, {
        ...riskScalesToFields(before.scales),
        [riskLevelFieldName('severity', 2, 'label')]: 'Changed by the wrong role',
        basedOnVersion: String(before.version),
        note: 'This should never be published.',
      }),
    ).rejects.toBeInstanceOf(ForbiddenError);
    const [latestAfter] = await db.select({ id: riskScaleVersions.id }).from(riskScaleVersions).orderBy(desc(riskScaleVersions.id)).limit(1);
    expect(latestAfter).toEqual(latestBefore);
  });

  it('refuses a form based on an older version, so a second administrator never overwrites the first', async () => {
    const admin = await makeUser('admin');
    const before = await current();
    await expect(
      publishRiskScales(admin, {
        ...riskScalesToFields(before.scales),
        [riskLevelFieldName('occurrence', 1, 'label')]: 'Stale edit',
        basedOnVersion: String(before.version - 1),
        note: 'Edited from a form opened long ago.',
      }),
    ).rejects.toThrow(new ConflictError(staleFormMessage));
    expect((await current()).version).toBe(before.version);
  });

  it('publishes once when two administrators publish from the same version at the same moment; the other is told to reload (21 CFR 11.10(e): nothing overwritten)', async () => {
    const [first, second] = await Promise.all([makeUser('admin'), makeUser('admin')]);
    const before = await current();
    const publish = (who: typeof first, label: string) =>
      publishRiskScales(who, {
        ...riskScalesToFields(before.scales),
        [riskLevelFieldName('occurrence', 3, 'label')]: label,
        basedOnVersion: String(before.version),
        note: `Occurrence 3 reworded by ${who.name}.`,
      });
    const results = await Promise.allSettled([publish(first, `Raced wording A ${Date.now()}`), publish(second, `Raced wording B ${Date.now()}`)]);
    const won = results.filter((r) => r.status === 'fulfilled');
    const lost = results.filter((r): r is PromiseRejectedResult => r.status === 'rejected');
    expect(won).toHaveLength(1);
    expect(lost).toHaveLength(1);
    expect(lost[0]!.reason).toBeInstanceOf(ConflictError);
    expect((lost[0]!.reason as Error).message).toBe(staleFormMessage);
    const versions = (await listRiskScaleVersions()).map((v) => v.version);
    expect(versions.filter((v) => v === before.version + 1)).toHaveLength(1);
    expect(versions).not.toContain(before.version + 2);
  });

  it('refuses to publish the same wording again', async () => {
    const admin = await makeUser('admin');
    const before = await current();
    await expect(
      publishRiskScales(admin, { ...riskScalesToFields(before.scales), basedOnVersion: String(before.version), note: 'Nothing really changed here.' }),
    ).rejects.toBeInstanceOf(ValidationError);
    expect((await current()).version).toBe(before.version);
  });

  it('refuses a step left empty, with the message on that field', async () => {
    const admin = await makeUser('admin');
    const before = await current();
    const error = await publishRiskScales(admin, {
      ...riskScalesToFields(before.scales),
      [riskLevelFieldName('severity', 10, 'description')]: ' ',
      basedOnVersion: String(before.version),
      note: 'Severity 10 left empty by mistake.',
    }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ValidationError);
    expect((error as ValidationError).fieldErrors.severity_10_description).toEqual(['Severity 10: the description is required.']);
  });

  it('lists the active defect catalogue for scoring, critical ones with their quarantine caution', async () => {
    const defects = await listScoringDefects();
    const foreign = defects.find((d) => d.code === 'foreign_matter');
    expect(foreign).toMatchObject({ defaultClassification: 'critical' });
    expect(foreign?.caution).toMatch(/quarantine/i);
    for (const code of ['empty_capsule', 'mix_up']) expect(defects.find((d) => d.code === code)?.caution).toMatch(/quarantine/i);
  });
});
