/*
 * The state tuples of every record lifecycle, kept beside the machines so the database enums are
 * built from the same list the machines use (tests/unit/workflows/states.test.ts checks they agree).
 * Pure: no imports.
 */

export const deviationStates = [
  'draft',
  'reported',
  'triage',
  'investigation',
  'approval',
  'closed',
  'cancelled',
  'discarded',
] as const;
export type DeviationState = (typeof deviationStates)[number];

export const capaStates = [
  'proposed',
  'plan_approved',
  'implementation',
  'effectiveness_check',
  'closed_effective',
  'cancelled',
] as const;
export type CapaState = (typeof capaStates)[number];

export const complaintStates = ['received', 'assessment', 'investigation', 'response', 'closed'] as const;
export type ComplaintState = (typeof complaintStates)[number];

export const ringStates = ['in_service', 'quarantined', 'retired'] as const;
export type RingState = (typeof ringStates)[number];
