import type { dispositions } from '../../db/schema/deviations';
import type { classifications } from '../../db/schema/master-data';
import type { DeviationEventType } from '../../workflows/deviation';
import type { DeviationState } from '../../workflows/states';

/* Words for the deviation lifecycle, classifications and dispositions, shared by pages, messages and mail. Pure. */

export type Disposition = (typeof dispositions)[number];
export type Classification = (typeof classifications)[number];

export const deviationStateLabels: Record<DeviationState, string> = {
  draft: 'Draft',
  reported: 'Reported',
  triage: 'In triage',
  investigation: 'Under investigation',
  approval: 'Awaiting approval',
  closed: 'Closed',
  cancelled: 'Cancelled',
  discarded: 'Discarded draft',
};

export const deviationEventLabels: Record<DeviationEventType, string> = {
  submit: 'Submit',
  discard: 'Discard the draft',
  start_triage: 'Start triage',
  close_minor: 'Close as minor',
  assign_investigation: 'Open the investigation',
  submit_for_approval: 'Submit for approval',
  return_for_rework: 'Return for rework',
  approve: 'Approve',
  cancel: 'Cancel the deviation',
};

export const classificationLabels: Record<Classification, string> = {
  critical: 'Critical',
  major: 'Major',
  minor: 'Minor',
};

export const dispositionLabels: Record<Disposition, string> = {
  release: 'Release',
  reject: 'Reject',
  rework: 'Rework',
  re_inspect: 'Re-inspect',
};
