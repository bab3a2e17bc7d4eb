import type { ringConditions } from '../../db/schema/master-data';
import type { RingState } from '../../workflows/states';
import type { RingEventType } from '../../workflows/filling-ring';

/* Words for the ring lifecycle and conditions, shared by pages, components, messages and mail. Pure. */

export type RingCondition = (typeof ringConditions)[number];

export const ringStateLabels: Record<RingState, string> = {
  in_service: 'In service',
  quarantined: 'Quarantined',
  retired: 'Retired',
};

export const ringEventLabels: Record<RingEventType, string> = {
  quarantine: 'Quarantine',
  return_to_service: 'Return to service',
  retire: 'Retire',
};

export const ringConditionLabels: Record<RingCondition, string> = {
  good: 'Good',
  worn: 'Worn',
  dented: 'Dented',
  damaged: 'Damaged',
};

/** Best to worst, for pickers. */
export const ringConditionOrder = Object.keys(ringConditionLabels) as RingCondition[];

/** Conditions a ring may be in when it goes back on a machine (common practice: no dents, no damage). */
export const serviceableConditions = ['good', 'worn'] as const satisfies readonly RingCondition[];
