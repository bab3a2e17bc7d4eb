import 'server-only';
import { asc, desc, eq } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { capsuleDefects, riskScaleLevels, riskScaleVersions, users } from '../../db/schema';
import type { Classification } from '../risk/classify';
import { riskDimensions, type RiskLevel, type RiskScales } from '../risk/scales';

/* Reads of the published risk scales and of the defect catalogue the scoring screen offers. */

export interface RiskScaleVersionSummaryDto {
  id: number;
  version: number;
  note: string;
  publishedByName: string;
  /** ISO 8601, UTC. */
  publishedAt: string;
}

export interface RiskScaleVersionDto extends RiskScaleVersionSummaryDto {
  scales: RiskScales;
}

export interface ScoringDefectDto {
  id: number;
  code: string;
  name: string;
  description: string;
  defaultClassification: Classification;
  defaultSeverity: number;
  caution: string | null;
}

const summaryColumns = {
  id: riskScaleVersions.id,
  version: riskScaleVersions.scaleVersion,
  note: riskScaleVersions.note,
  publishedByName: users.name,
  publishedAt: riskScaleVersions.publishedAt,
};

type SummaryRow = { id: number; version: number; note: string; publishedByName: string; publishedAt: Date };

const toSummary = (row: SummaryRow): RiskScaleVersionSummaryDto => ({ ...row, publishedAt: row.publishedAt.toISOString() });

async function levelsOf(versionId: number, database: DbOrTx): Promise<RiskScales> {
  const rows = await database
    .select()
    .from(riskScaleLevels)
    .where(eq(riskScaleLevels.scaleVersionId, versionId))
    .orderBy(asc(riskScaleLevels.dimension), asc(riskScaleLevels.score));
  const scales = Object.fromEntries(riskDimensions.map((d) => [d, [] as RiskLevel[]])) as Record<
    (typeof riskDimensions)[number],
    RiskLevel[]
  >;
  for (const r of rows) scales[r.dimension].push({ score: r.score, label: r.label, description: r.description });
  return scales;
}

async function withLevels(row: SummaryRow | undefined, database: DbOrTx): Promise<RiskScaleVersionDto | null> {
  if (!row) return null;
  return { ...toSummary(row), scales: await levelsOf(row.id, database) };
}

/** The newest published version: what new scores use. Null only before the first version is seeded. */
export async function getCurrentRiskScales(database: DbOrTx = db): Promise<RiskScaleVersionDto | null> {
  const [row] = await database
    .select(summaryColumns)
    .from(riskScaleVersions)
    .innerJoin(users, eq(users.id, riskScaleVersions.publishedBy))
    .orderBy(desc(riskScaleVersions.scaleVersion))
    .limit(1);
  return withLevels(row, database);
}

/** One version by its number, as it was published (versions are never edited). */
export async function getRiskScaleVersion(version: number, database: DbOrTx = db): Promise<RiskScaleVersionDto | null> {
  const [row] = await database
    .select(summaryColumns)
    .from(riskScaleVersions)
    .innerJoin(users, eq(users.id, riskScaleVersions.publishedBy))
    .where(eq(riskScaleVersions.scaleVersion, version))
    .limit(1);
  return withLevels(row, database);
}

export const riskScaleHistoryLimit = 200;

/** Newest first. Versions are published rarely, so one page of the newest is the whole history in practice. */
export async function listRiskScaleVersions(database: DbOrTx = db): Promise<RiskScaleVersionSummaryDto[]> {
  const rows = await database
    .select(summaryColumns)
    .from(riskScaleVersions)
    .innerJoin(users, eq(users.id, riskScaleVersions.publishedBy))
    .orderBy(desc(riskScaleVersions.scaleVersion))
    .limit(riskScaleHistoryLimit);
  return rows.map(toSummary);
}

/** The active catalogue, by name, for the defect picker. */
export async function listScoringDefects(database: DbOrTx = db): Promise<ScoringDefectDto[]> {
  return database
    .select({
      id: capsuleDefects.id,
      code: capsuleDefects.code,
      name: capsuleDefects.name,
      description: capsuleDefects.description,
      defaultClassification: capsuleDefects.defaultClassification,
      defaultSeverity: capsuleDefects.defaultSeverity,
      caution: capsuleDefects.caution,
    })
    .from(capsuleDefects)
    .where(eq(capsuleDefects.active, true))
    .orderBy(asc(capsuleDefects.name));
}
