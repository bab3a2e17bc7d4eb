import 'server-only';
import { and, eq, inArray, ne } from 'drizzle-orm';
import { fillingRings, machines, users } from '../../db/schema';
import { fillingRingMachine, ringGuardRefusals } from '../../workflows/filling-ring';
import type { RingState } from '../../workflows/states';
import { getEnv } from '../env';
import { enqueueMail } from '../mail/outbox';
import { renderMailLayout } from '../mail/templates/layout';
import { lastSenderOf } from '../records/facts';
import { defineRecordKind } from '../records/kind';
import { type RingCondition, ringConditionLabels, ringEventLabels, ringStateLabels } from './labels';

/* Filling rings on the write path: their table, machine, permissions, signed content and effects. */

export type RingRow = typeof fillingRings.$inferSelect;

export interface RingDto {
  id: number;
  serial: string;
  machineId: number;
  capsuleSize: string;
  condition: RingCondition;
  status: RingState;
  statusReason: string | null;
  /** ISO 8601, UTC. */
  retiredAt: string | null;
  version: number;
  updatedAt: string;
}

export function toRingDto(row: RingRow): RingDto {
  return {
    id: row.id,
    serial: row.serial,
    machineId: row.machineId,
    capsuleSize: row.capsuleSize,
    condition: row.condition,
    status: row.status,
    statusReason: row.statusReason,
    retiredAt: row.retiredAt?.toISOString() ?? null,
    version: row.version,
    updatedAt: row.updatedAt.toISOString(),
  };
}

/** What a signature on a ring vouches for: identity, placement, condition and status with its reason. */
function ringSignedContent(row: RingRow): Record<string, unknown> {
  return {
    ring: {
      serial: row.serial,
      machineId: row.machineId,
      capsuleSize: row.capsuleSize,
      condition: row.condition,
      status: row.status,
      statusReason: row.statusReason,
      retiredAt: row.retiredAt,
    },
  };
}

/** Who took the ring out of service most recently: they do not also judge it fit or retire it. */
export interface RingFacts {
  quarantinedBy: number | null;
}

export const ringKind = defineRecordKind({
  recordType: 'filling_ring',
  noun: 'filling ring',
  table: fillingRings,
  machine: fillingRingMachine,
  readPermission: 'equipment.read',
  eventPermissions: {
    quarantine: 'ring.quarantine',
    return_to_service: 'ring.return_to_service',
    retire: 'ring.retire',
  },
  eventLabels: ringEventLabels,
  stateLabels: ringStateLabels,
  guardRefusals: ringGuardRefusals,
  related: async (dbOrTx, row): Promise<RingFacts> => ({ quarantinedBy: await lastSenderOf(dbOrTx, 'filling_ring', row.id, 'quarantine') }),
  context: () => ({}),
  participants: {
    quarantiner: { did: 'took this ring out of service', of: (_row, facts) => [facts.quarantinedBy] },
  },
  // A second person inspects what the first found wrong (segregation of duties; common practice).
  independence: { return_to_service: ['quarantiner'], retire: ['quarantiner'] },
  signedContent: { verified: ringSignedContent, approved: ringSignedContent },
  signedPartLabels: { ring: 'the ring’s condition and status' },
  auditFields: ['condition', 'statusReason', 'retiredAt'],
  toDto: toRingDto,
  effects: {
    notifyQaOfQuarantine: {
      // In the transaction: the message is queued if and only if the quarantine commits. The person
      // who quarantined the ring knows already, so they get no copy.
      async inTransaction(tx, { actor, after }) {
        const [machine] = await tx
          .select({ assetTag: machines.assetTag, name: machines.name, room: machines.room })
          .from(machines)
          .where(eq(machines.id, after.machineId));
        const readers = await tx
          .select({ id: users.id, email: users.email })
          .from(users)
          .where(
            and(eq(users.active, true), inArray(users.role, ['qa_investigator', 'qa_approver']), ne(users.id, actor.id)),
          );
        const env = getEnv();
        const where = machine ? `${machine.name} (${machine.assetTag}, ${machine.room})` : `machine #${after.machineId}`;
        const mail = renderMailLayout({
          siteName: env.SITE_NAME,
          recordNumber: after.serial,
          heading: `Filling ring ${after.serial} quarantined`,
          paragraphs: [
            `${actor.name} took filling ring ${after.serial} (size ${after.capsuleSize}) on ${where} out of service.`,
            `Condition recorded: ${ringConditionLabels[after.condition]}. Reason: ${after.statusReason ?? '(none given)'}`,
            'The ring stays quarantined until QA inspects it and either returns it to service or retires it, ' +
              'each with an electronic signature. Check which batches were filled with it since its last good ' +
              'inspection and follow the site procedure for them.',
          ],
          link: { url: new URL(`/equipment/rings/${after.id}`, env.APP_URL).toString(), label: 'Open the ring' },
          footer: 'You receive this because you hold a QA role in Plumbline.',
        });
        for (const reader of readers) {
          await enqueueMail(tx, {
            dedupeKey: `ring-quarantined:${after.id}:v${after.version}:${reader.id}`,
            template: 'ring_quarantined',
            to: { address: reader.email, userId: reader.id },
            subject: `Filling ring ${after.serial} quarantined on ${machine?.assetTag ?? `machine #${after.machineId}`}`,
            text: mail.text,
            html: mail.html,
            recordType: 'filling_ring',
            recordId: after.id,
          });
        }
      },
    },
  },
});
