import { z } from 'zod';
import { capsuleSizes, ringConditions } from '../../db/schema/master-data';
import { serviceableConditions } from './labels';

/*
 * Input of the ring commands, shared by the server actions (FormData: every value a string, so
 * numbers are coerced) and the JSON route. What an event asks for (reason, password) is also
 * enforced by the write path from the machine; these give the field-level messages and limits.
 */

const id = z.coerce.number({ error: 'must be a record id' }).int().positive();
const version = z.coerce.number({ error: 'Reload the page and try again.' }).int().positive();
const reason = z
  .string({ error: 'Give the reason for this change.' })
  .trim()
  .min(3, 'Give the reason for this change (a few words at least).')
  .max(500, 'Keep the reason under 500 characters; put details in a deviation.');
/** Checked by the write path, which asks for it exactly when the transition is signed (or takes a verified signer). */
const password = z.string().max(256).optional();
const optionalCondition = z.preprocess(
  (v) => (v === '' ? undefined : v),
  z.enum(ringConditions, { error: 'Pick a condition from the list.' }).optional(),
);

export const quarantineRingSchema = z.object({
  id,
  version,
  reason,
  /** What was found, e.g. "dented"; left as it was when not given. */
  condition: optionalCondition,
});

export const returnRingToServiceSchema = z.object({
  id,
  version,
  reason,
  condition: z.enum(serviceableConditions, {
    error: 'Only a ring in good or worn condition can go back into service; retire a dented or damaged ring.',
  }),
  password,
});

export const retireRingSchema = z.object({ id, version, reason, password });

export const ringEventSchema = z.discriminatedUnion(
  'event',
  [
    quarantineRingSchema.extend({ event: z.literal('quarantine') }),
    returnRingToServiceSchema.extend({ event: z.literal('return_to_service') }),
    retireRingSchema.extend({ event: z.literal('retire') }),
  ],
  { error: 'Name the action: quarantine, return_to_service or retire.' },
);

export type QuarantineRingInput = z.output<typeof quarantineRingSchema>;
export type ReturnRingToServiceInput = z.output<typeof returnRingToServiceSchema>;
export type RetireRingInput = z.output<typeof retireRingSchema>;
export type RingEventInput = z.output<typeof ringEventSchema>;

export const registerRingSchema = z.object({
  machineId: id,
  serial: z
    .string({ error: 'Enter the serial engraved on the ring.' })
    .trim()
    .toUpperCase()
    .regex(/^[A-Z0-9][A-Z0-9-]{1,38}[A-Z0-9]$/, 'Use letters, digits and dashes (3 to 40 characters).'),
  capsuleSize: z.enum(capsuleSizes, { error: 'Pick a capsule size.' }),
  condition: z.enum(ringConditions).default('good'),
});
export type RegisterRingInput = z.output<typeof registerRingSchema>;
