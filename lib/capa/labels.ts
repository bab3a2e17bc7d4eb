import type { capaActionCategories, capaActionKinds, capaSources } from '../../workflows/capa-terms';
import type { CapaEventType } from '../../workflows/capa';
import type { CapaState } from '../../workflows/states';

/* Words for the CAPA lifecycle, its sources and its actions, shared by pages, messages and mail. Pure. */

export type CapaSource = (typeof capaSources)[number];
export type CapaActionKind = (typeof capaActionKinds)[number];
export type CapaActionCategory = (typeof capaActionCategories)[number];

export const capaStateLabels: Record<CapaState, string> = {
  proposed: 'Planning',
  plan_approved: 'Plan approved',
  implementation: 'In implementation',
  effectiveness_check: 'Effectiveness check',
  closed_effective: 'Closed, effective',
  cancelled: 'Cancelled',
};

export const capaEventLabels: Record<CapaEventType, string> = {
  approve_plan: 'Approve the plan',
  start_implementation: 'Start the implementation',
  open_effectiveness_check: 'Open the effectiveness check',
  record_effective: 'Record as effective',
  record_not_effective: 'Record as not effective',
  cancel: 'Cancel the CAPA',
};

export const capaSourceLabels: Record<CapaSource, string> = {
  deviation: 'Deviation',
  complaint: 'Complaint',
  trend: 'Trend',
};

export const capaActionKindLabels: Record<CapaActionKind, string> = {
  corrective: 'Corrective',
  preventive: 'Preventive',
};

export const capaActionCategoryLabels: Record<CapaActionCategory, string> = {
  machine_setting: 'Machine setting',
  procedure: 'Procedure',
  training: 'Training',
  ring_retirement: 'Ring retirement',
  supplier_change: 'Supplier change',
  other: 'Other',
};
