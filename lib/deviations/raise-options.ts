import 'server-only';
import { and, asc, desc, eq, gte, inArray, like, ne } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { batches, capsuleDefects, fillingRings, machines, products } from '../../db/schema';
import type { Classification } from './labels';

/*
 * What the operator picks from when raising a deviation. Only batches still on the line (in process)
 * or already held can take one: a released or rejected batch has left the operator's hands and a
 * problem with it comes in as a complaint or a QA finding instead (common practice).
 */

export const raisableBatchStatuses = ['in_process', 'on_hold'] as const;
export type RaisableBatchStatus = (typeof raisableBatchStatuses)[number];

export interface RaiseBatchOption {
  id: number;
  lotNumber: string;
  status: RaisableBatchStatus;
  manufacturedOn: string;
  productName: string;
  productStrength: string;
  machineId: number | null;
  machineName: string | null;
  ringId: number | null;
  ringSerial: string | null;
}

export interface RaiseDefectOption {
  id: number;
  code: string;
  name: string;
  description: string;
  defaultClassification: Classification;
  defaultSeverity: number;
  caution: string | null;
}

export interface RaiseMachineOption {
  id: number;
  label: string;
}

export interface RaiseRingOption {
  id: number;
  serial: string;
  machineId: number;
  capsuleSize: string;
}

const batchColumns = {
  id: batches.id,
  lotNumber: batches.lotNumber,
  status: batches.status,
  manufacturedOn: batches.manufacturedOn,
  productName: products.name,
  productStrength: products.strength,
  machineId: batches.machineId,
  machineName: machines.name,
  ringId: batches.ringId,
  ringSerial: fillingRings.serial,
};

function batchQuery(database: DbOrTx) {
  return database
    .select(batchColumns)
    .from(batches)
    .innerJoin(products, eq(products.id, batches.productId))
    .leftJoin(machines, eq(machines.id, batches.machineId))
    .leftJoin(fillingRings, eq(fillingRings.id, batches.ringId));
}

const narrow = (rows: Awaited<ReturnType<ReturnType<typeof batchQuery>['execute']>>): RaiseBatchOption[] =>
  rows.flatMap((r) => (r.status === 'in_process' || r.status === 'on_hold' ? [{ ...r, status: r.status }] : []));

/** Escapes LIKE wildcards so a lot typed with % or _ matches literally. */
const likePrefix = (term: string) => `${term.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

/**
 * Batches that can take a deviation whose lot number starts with what was typed (a scanner types the
 * whole lot; a person the first characters). Prefix match, so the unique lot index serves it.
 */
export async function searchRaisableBatches(
  term: string,
  options: { limit?: number } = {},
  database: DbOrTx = db,
): Promise<RaiseBatchOption[]> {
  const lot = term.trim().toUpperCase().slice(0, 40);
  const rows = await batchQuery(database)
    .where(
      and(
        inArray(batches.status, [...raisableBatchStatuses]),
        lot === '' ? undefined : like(batches.lotNumber, likePrefix(lot)),
      ),
    )
    .orderBy(desc(batches.manufacturedOn), desc(batches.id))
    .limit(options.limit ?? 20);
  return narrow(rows);
}

export async function getRaisableBatch(id: number, database: DbOrTx = db): Promise<RaiseBatchOption | null> {
  const rows = await batchQuery(database)
    .where(and(eq(batches.id, id), inArray(batches.status, [...raisableBatchStatuses])))
    .limit(1);
  return narrow(rows)[0] ?? null;
}

/**
 * Other in-process or held batches filled on the same filler since `sinceDays` days before the chosen
 * batch: candidates for a precautionary hold, since a worn part rarely fails on one batch only
 * (21 CFR 211.192: the investigation extends to other batches that may have been affected).
 */
export async function listHoldCandidates(
  batchId: number,
  options: { sinceDays?: number; limit?: number } = {},
  database: DbOrTx = db,
): Promise<RaiseBatchOption[]> {
  const chosen = await getRaisableBatch(batchId, database);
  if (!chosen?.machineId) return [];
  const since = new Date(`${chosen.manufacturedOn}T00:00:00Z`);
  since.setUTCDate(since.getUTCDate() - (options.sinceDays ?? 7));
  const rows = await batchQuery(database)
    .where(
      and(
        eq(batches.machineId, chosen.machineId),
        ne(batches.id, batchId),
        gte(batches.manufacturedOn, since.toISOString().slice(0, 10)),
        inArray(batches.status, [...raisableBatchStatuses]),
      ),
    )
    .orderBy(desc(batches.manufacturedOn), desc(batches.id))
    .limit(options.limit ?? 10);
  return narrow(rows);
}

/** The active defect catalogue, critical first, each with the caution the form shows when it is picked. */
export async function listDefectOptions(database: DbOrTx = db): Promise<RaiseDefectOption[]> {
  const rows = await database
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
    .orderBy(asc(capsuleDefects.defaultClassification), desc(capsuleDefects.defaultSeverity), asc(capsuleDefects.name));
  return rows;
}

export async function listMachineOptions(database: DbOrTx = db): Promise<RaiseMachineOption[]> {
  const rows = await database
    .select({ id: machines.id, name: machines.name, assetTag: machines.assetTag })
    .from(machines)
    .where(eq(machines.active, true))
    .orderBy(asc(machines.name));
  return rows.map((m) => ({ id: m.id, label: `${m.name} (${m.assetTag})` }));
}

/** Rings that can be on a filler now: retired rings are left out. */
export async function listRingOptions(database: DbOrTx = db): Promise<RaiseRingOption[]> {
  return database
    .select({ id: fillingRings.id, serial: fillingRings.serial, machineId: fillingRings.machineId, capsuleSize: fillingRings.capsuleSize })
    .from(fillingRings)
    .where(ne(fillingRings.status, 'retired'))
    .orderBy(asc(fillingRings.serial));
}
