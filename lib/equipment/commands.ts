import 'server-only';
import { eq } from 'drizzle-orm';
import { machines } from '../../db/schema';
import { ValidationError, fieldError } from '../errors';
import { type RecordActor } from '../records/kind';
import { type SignOptions, type WriteOutcome, createRecord, transitionRecord } from '../records/write-path';
import {
  type QuarantineRingInput,
  type RegisterRingInput,
  type RetireRingInput,
  type ReturnRingToServiceInput,
  type RingEventInput,
} from './schemas';
import { ringKind } from './ring-kind';

/*
 * Ring commands. Each goes through the write path; what is particular to rings is only which
 * columns an event changes besides the status.
 */

export type RingOutcome = WriteOutcome<typeof ringKind>;

export function quarantineRing(actor: RecordActor, input: QuarantineRingInput): Promise<RingOutcome> {
  return transitionRecord(ringKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'quarantine',
    actor,
    reason: input.reason,
    changes: (row) => ({ statusReason: input.reason, condition: input.condition ?? row.condition }),
  });
}

export function returnRingToService(actor: RecordActor, input: ReturnRingToServiceInput, options: SignOptions = {}): Promise<RingOutcome> {
  return transitionRecord(ringKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'return_to_service',
    actor,
    reason: input.reason,
    password: input.password,
    signer: options.signer,
    changes: () => ({ statusReason: null, condition: input.condition }),
  });
}

export function retireRing(actor: RecordActor, input: RetireRingInput, options: SignOptions = {}): Promise<RingOutcome> {
  return transitionRecord(ringKind, {
    id: input.id,
    expectedVersion: input.version,
    event: 'retire',
    actor,
    reason: input.reason,
    password: input.password,
    signer: options.signer,
    changes: (_row, { now }) => ({ statusReason: input.reason, retiredAt: now }),
  });
}

/** One entry point for the form action and the API route, which both name the event. */
export function applyRingEvent(actor: RecordActor, input: RingEventInput): Promise<RingOutcome> {
  switch (input.event) {
    case 'quarantine':
      return quarantineRing(actor, input);
    case 'return_to_service':
      return returnRingToService(actor, input);
    case 'retire':
      return retireRing(actor, input);
  }
}

const duplicateKey = (err: unknown) =>
  (err as { cause?: { errno?: number } })?.cause?.errno === 1062 || (err as { errno?: number })?.errno === 1062;

/** Puts a new ring into service on a machine (master data: administrators). */
export async function registerRing(actor: RecordActor, input: RegisterRingInput): Promise<RingOutcome> {
  try {
    return await createRecord(ringKind, actor, 'masterdata.manage', async (tx) => {
      const [machine] = await tx
        .select({ id: machines.id, capsuleSizes: machines.capsuleSizes, active: machines.active })
        .from(machines)
        .where(eq(machines.id, input.machineId));
      if (!machine || !machine.active) {
        throw new ValidationError('Pick an active machine.', { machineId: ['Pick an active machine.'] });
      }
      if (!machine.capsuleSizes.split(',').includes(input.capsuleSize)) {
        throw fieldError('capsuleSize', `This machine has no change parts for size ${input.capsuleSize} (it takes ${machine.capsuleSizes}).`);
      }
      return {
        values: { serial: input.serial, machineId: input.machineId, capsuleSize: input.capsuleSize, condition: input.condition },
      };
    });
  } catch (err) {
    if (duplicateKey(err)) {
      throw fieldError('serial', `A ring with serial ${input.serial} is already registered.`);
    }
    throw err;
  }
}
