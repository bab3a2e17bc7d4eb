import 'server-only';
import { desc, eq, inArray } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db, type DbOrTx } from '../../db/client';
import { batches, fillingRings, machines, products, users, weightChecks } from '../../db/schema';
import type { WeightMethod } from '../weight/evaluate';
import { type WeightBatchDto, type WeightCheckDto, batchStatusesTakingChecks } from './types';

/* Reads for weight checks: the batch a check is for (with product, machine, ring) and its checks. */

const ring = alias(fillingRings, 'ring');

const batchColumns = {
  id: batches.id,
  lotNumber: batches.lotNumber,
  status: batches.status,
  manufacturedOn: batches.manufacturedOn,
  productId: products.id,
  productCode: products.code,
  productName: products.name,
  strength: products.strength,
  capsuleSize: products.capsuleSize,
  regulatoryClass: products.regulatoryClass,
  targetFillMg: products.targetFillMg,
  fillLowerMg: products.fillLowerMg,
  fillUpperMg: products.fillUpperMg,
  machineId: machines.id,
  machineTag: machines.assetTag,
  machineName: machines.name,
  ringId: ring.id,
  ringSerial: ring.serial,
};

type BatchRow = { [K in keyof typeof batchColumns]: (typeof batchColumns)[K]['_']['data'] | null };

function toBatchDto(r: BatchRow): WeightBatchDto {
  return {
    id: r.id!,
    lotNumber: r.lotNumber!,
    status: r.status!,
    manufacturedOn: r.manufacturedOn!,
    product: {
      id: r.productId!,
      code: r.productCode!,
      name: r.productName!,
      strength: r.strength!,
      capsuleSize: r.capsuleSize!,
      regulatoryClass: r.regulatoryClass!,
      targetFillMg: Number(r.targetFillMg),
      fillLowerMg: Number(r.fillLowerMg),
      fillUpperMg: Number(r.fillUpperMg),
    },
    machine: r.machineId === null ? null : { id: r.machineId, assetTag: r.machineTag!, name: r.machineName! },
    ring: r.ringId === null ? null : { id: r.ringId, serial: r.ringSerial! },
  };
}

function batchQuery(database: DbOrTx) {
  return database
    .select(batchColumns)
    .from(batches)
    .innerJoin(products, eq(products.id, batches.productId))
    .leftJoin(machines, eq(machines.id, batches.machineId))
    .leftJoin(ring, eq(ring.id, batches.ringId));
}

export async function getWeightBatchByLot(lotNumber: string, database: DbOrTx = db): Promise<WeightBatchDto | null> {
  const [row] = await batchQuery(database).where(eq(batches.lotNumber, lotNumber.trim().toUpperCase())).limit(1);
  return row ? toBatchDto(row) : null;
}

export async function getWeightBatch(id: number, database: DbOrTx = db): Promise<WeightBatchDto | null> {
  const [row] = await batchQuery(database).where(eq(batches.id, id)).limit(1);
  return row ? toBatchDto(row) : null;
}

/** The product's tapped bulk density (g/mL) for fill-weight planning; null when none is recorded. */
export async function getProductTappedDensity(productId: number, database: DbOrTx = db): Promise<number | null> {
  const [row] = await database
    .select({ density: products.tappedDensityGPerMl })
    .from(products)
    .where(eq(products.id, productId))
    .limit(1);
  return row && row.density !== null ? Number(row.density) : null;
}

/** Lots that take checks now, newest first, for the lot-number suggestions. */
export async function listOpenLots(limit = 30, database: DbOrTx = db): Promise<{ lotNumber: string; productName: string }[]> {
  return database
    .select({ lotNumber: batches.lotNumber, productName: products.name })
    .from(batches)
    .innerJoin(products, eq(products.id, batches.productId))
    .where(inArray(batches.status, [...batchStatusesTakingChecks]))
    .orderBy(desc(batches.manufacturedOn), desc(batches.id))
    .limit(limit);
}

const checkColumns = {
  id: weightChecks.id,
  batchId: weightChecks.batchId,
  method: weightChecks.method,
  massMode: weightChecks.massMode,
  shellMassMg: weightChecks.shellMassMg,
  massesMg: weightChecks.massesMg,
  sampleSize: weightChecks.sampleSize,
  meanMg: weightChecks.meanMg,
  sdMg: weightChecks.sdMg,
  minMg: weightChecks.minMg,
  maxMg: weightChecks.maxMg,
  outOfLimitCount: weightChecks.outOfLimitCount,
  verdict: weightChecks.verdict,
  note: weightChecks.note,
  recordedById: users.id,
  recordedByName: users.name,
  checkedAt: weightChecks.checkedAt,
};

export function toCheckDto(r: {
  id: number;
  batchId: number;
  method: WeightMethod;
  massMode: 'gross' | 'net';
  shellMassMg: string | null;
  massesMg: string;
  sampleSize: number;
  meanMg: string;
  sdMg: string;
  minMg: string;
  maxMg: string;
  outOfLimitCount: number;
  verdict: 'pass' | 'fail';
  note: string | null;
  recordedById: number;
  recordedByName: string;
  checkedAt: Date;
}): WeightCheckDto {
  const massesMg = (JSON.parse(r.massesMg) as number[]).map(Number);
  const shell = r.shellMassMg === null ? null : Number(r.shellMassMg);
  return {
    id: r.id,
    batchId: r.batchId,
    method: r.method,
    massMode: r.massMode,
    shellMassMg: shell,
    massesMg,
    netMassesMg: r.massMode === 'gross' && shell !== null ? massesMg.map((m) => Math.round((m - shell) * 1000) / 1000) : massesMg,
    sampleSize: r.sampleSize,
    meanMg: Number(r.meanMg),
    sdMg: Number(r.sdMg),
    minMg: Number(r.minMg),
    maxMg: Number(r.maxMg),
    outOfLimitCount: r.outOfLimitCount,
    verdict: r.verdict,
    note: r.note,
    recordedBy: { id: r.recordedById, name: r.recordedByName },
    checkedAt: r.checkedAt.toISOString(),
  };
}

/** A batch's checks in time order (the control chart reads them left to right); the newest `limit`. */
export async function listBatchWeightChecks(batchId: number, limit = 100, database: DbOrTx = db): Promise<WeightCheckDto[]> {
  const rows = await database
    .select(checkColumns)
    .from(weightChecks)
    .innerJoin(users, eq(users.id, weightChecks.recordedBy))
    .where(eq(weightChecks.batchId, batchId))
    .orderBy(desc(weightChecks.checkedAt), desc(weightChecks.id))
    .limit(limit);
  return rows.map(toCheckDto).reverse();
}

export async function getWeightCheck(id: number, database: DbOrTx = db): Promise<WeightCheckDto | null> {
  const [row] = await database
    .select(checkColumns)
    .from(weightChecks)
    .innerJoin(users, eq(users.id, weightChecks.recordedBy))
    .where(eq(weightChecks.id, id))
    .limit(1);
  return row ? toCheckDto(row) : null;
}
