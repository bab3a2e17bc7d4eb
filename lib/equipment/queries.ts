import 'server-only';
import { and, asc, count, eq, inArray, ne } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { fillingRings, machines } from '../../db/schema';
import { ringStates, type RingState } from '../../workflows/states';
import { assertCan, can } from '../auth/permissions';
import { type BlockedEvent, type RecordActor, abilitiesOf } from '../records/kind';
import { getVisibleRow, loadRelated, signedContentOf } from '../records/write-path';
import { type AuditEntryDto, type HistoryEntryDto, listAuditTrail, listStateHistory } from '../records/trail';
import type { AllowedEvent } from '../records/workflow';
import { type SignatureDto, listSignatures } from '../signatures';
import type { RingEventType } from '../../workflows/filling-ring';
import { type RingDto, ringKind, toRingDto } from './ring-kind';

export type { RingDto } from './ring-kind';

/* Reads for the Equipment pages and API: machines by room with their rings, and one ring in full. */

export interface MachineSummaryDto {
  id: number;
  assetTag: string;
  name: string;
  room: string;
  model: string;
  capsuleSizes: string[];
  active: boolean;
}

export interface MachineWithRingsDto extends MachineSummaryDto {
  ringCounts: Record<RingState, number>;
  /** In-service and quarantined rings, plus retired ones when asked for. */
  rings: RingDto[];
}

export interface RoomDto {
  room: string;
  machines: MachineWithRingsDto[];
}

/** A site has tens of fillers, not thousands; the cap keeps a misconfigured import from flooding the page. */
const machineLimit = 500;

const machineColumns = {
  id: machines.id,
  assetTag: machines.assetTag,
  name: machines.name,
  room: machines.room,
  model: machines.model,
  capsuleSizes: machines.capsuleSizes,
  active: machines.active,
};

type MachineRow = Pick<typeof machines.$inferSelect, keyof typeof machineColumns>;

const toMachineDto = (m: MachineRow): MachineSummaryDto => ({
  ...m,
  capsuleSizes: m.capsuleSizes.split(',').filter(Boolean),
});

export async function listMachinesByRoom(
  actor: RecordActor,
  options: { includeRetired?: boolean } = {},
  dbOrTx: DbOrTx = db,
): Promise<RoomDto[]> {
  assertCan(actor, 'equipment.read');
  const machineRows = await dbOrTx
    .select(machineColumns)
    .from(machines)
    .orderBy(asc(machines.room), asc(machines.assetTag))
    .limit(machineLimit);
  if (machineRows.length === 0) return [];
  const ids = machineRows.map((m) => m.id);

  const counts = await dbOrTx
    .select({ machineId: fillingRings.machineId, status: fillingRings.status, n: count() })
    .from(fillingRings)
    .where(inArray(fillingRings.machineId, ids))
    .groupBy(fillingRings.machineId, fillingRings.status);
  const ringRows = await dbOrTx
    .select()
    .from(fillingRings)
    .where(
      options.includeRetired
        ? inArray(fillingRings.machineId, ids)
        : and(inArray(fillingRings.machineId, ids), ne(fillingRings.status, 'retired')),
    )
    .orderBy(asc(fillingRings.machineId), asc(fillingRings.serial));

  const rooms = new Map<string, MachineWithRingsDto[]>();
  for (const m of machineRows) {
    const ringCounts = Object.fromEntries(ringStates.map((s) => [s, 0])) as Record<RingState, number>;
    for (const c of counts) if (c.machineId === m.id) ringCounts[c.status] = c.n;
    const entry: MachineWithRingsDto = {
      ...toMachineDto(m),
      ringCounts,
      rings: ringRows.filter((r) => r.machineId === m.id).map(toRingDto),
    };
    rooms.set(m.room, [...(rooms.get(m.room) ?? []), entry]);
  }
  return [...rooms.entries()].map(([room, list]) => ({ room, machines: list }));
}

export async function listRingsOfMachine(
  actor: RecordActor,
  machineId: number,
  options: { includeRetired?: boolean } = {},
  dbOrTx: DbOrTx = db,
): Promise<RingDto[]> {
  assertCan(actor, 'equipment.read');
  const rows = await dbOrTx
    .select()
    .from(fillingRings)
    .where(
      options.includeRetired
        ? eq(fillingRings.machineId, machineId)
        : and(eq(fillingRings.machineId, machineId), ne(fillingRings.status, 'retired')),
    )
    .orderBy(asc(fillingRings.serial));
  return rows.map(toRingDto);
}

export interface RingDetailDto {
  ring: RingDto;
  machine: MachineSummaryDto;
  /** What this person may do to the ring now, with the reason and signature each asks for. */
  allowedEvents: AllowedEvent<RingEventType>[];
  /** What their role does now but this ring keeps from them, and why (segregation of duties). */
  blockedEvents: BlockedEvent<RingEventType>[];
  history: HistoryEntryDto[];
  signatures: SignatureDto[];
  /** Null when the person's role may not read audit trails. */
  audit: AuditEntryDto[] | null;
}

export async function getRingDetail(actor: RecordActor, id: number, dbOrTx: DbOrTx = db): Promise<RingDetailDto> {
  const row = await getVisibleRow(dbOrTx, ringKind, id, actor);
  const facts = await loadRelated(ringKind, dbOrTx, row);
  const abilities = abilitiesOf(ringKind, actor, row, facts);
  const [machine] = await dbOrTx.select(machineColumns).from(machines).where(eq(machines.id, row.machineId));
  if (!machine) throw new Error(`ring ${id} points at missing machine ${row.machineId}`);
  const [history, signatures, audit] = await Promise.all([
    listStateHistory(dbOrTx, ringKind, id),
    listSignatures(dbOrTx, 'filling_ring', id, (meaning) => signedContentOf(ringKind, meaning, row, facts), ringKind.signedPartLabels),
    can(actor, 'audit.read') ? listAuditTrail(dbOrTx, 'filling_ring', id) : Promise.resolve(null),
  ]);
  return {
    ring: toRingDto(row),
    machine: toMachineDto(machine),
    allowedEvents: abilities.allowedEvents,
    blockedEvents: abilities.blockedEvents,
    history,
    signatures,
    audit,
  };
}
