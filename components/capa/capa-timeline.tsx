import { RecordTimeline, type RecordTimelineProps, type TimelineVocabulary } from '@/components/records/record-timeline';
import { capaActionCategoryLabels, capaActionKindLabels, capaEventLabels, capaSourceLabels, capaStateLabels } from '@/lib/capa/labels';
import { parseRecurrenceCriterion } from '@/lib/capa/schemas';

/*
 * The CAPA's timeline: the shared record timeline in the CAPA's words, the plan's actions included
 * ("Action 12 · Owner").
 */

const fieldLabels: Record<string, string> = {
  status: 'Status',
  number: 'Number',
  title: 'Title',
  sourceType: 'Source',
  sourceId: 'Source record',
  problemStatement: 'Problem statement',
  rootCause: 'Root cause',
  effectivenessCriteria: 'Effectiveness criteria',
  recurrenceCriterion: 'Recurrence criterion',
  effectivenessResult: 'Effectiveness result',
  effectivenessNote: 'Why not effective',
  cancelReason: 'Cancellation reason',
  ownerId: 'Owner',
  createdBy: 'Opened by',
  planRound: 'Plan round',
  dueAt: 'Due',
  effectivenessDueAt: 'Effectiveness check due',
  actionsCompletedAt: 'Actions completed',
  planApprovedAt: 'Plan approved',
  effectivenessOpenedAt: 'Effectiveness check opened',
  closedAt: 'Closed',
  signature: 'Signature',
  kind: 'Kind',
  category: 'What it changes',
  description: 'Description',
  round: 'Round',
  completedAt: 'Completed',
  completedBy: 'Completed by',
  evidence: 'Evidence',
};

const actionLabels: Record<string, string> = {
  ...capaEventLabels,
  create: 'CAPA opened',
  update_plan: 'Plan edited',
  add_action: 'Action added',
  update_action: 'Action changed',
  complete_action: 'Action completed',
  request_plan_approval: 'Plan approval requested',
  signed: 'Signed',
};

/** The recurrence criterion is stored as JSON; the timeline says what it asks for. */
function describeCriterion(json: string): string | undefined {
  const c = parseRecurrenceCriterion(json);
  if (!c) return undefined;
  const parts = [
    c.defectId !== undefined ? `defect #${c.defectId}` : null,
    c.machineId !== undefined ? `machine #${c.machineId}` : null,
    c.ringId !== undefined ? `ring #${c.ringId}` : null,
    c.batches !== undefined ? `${c.batches} batches` : null,
    c.days !== undefined ? `${c.days} days` : null,
  ].filter(Boolean);
  return parts.length > 0 ? `no recurrence: ${parts.join(', ')}` : undefined;
}

const capaVocabulary: TimelineVocabulary = {
  fieldLabels,
  actionLabels,
  extraUserIdFields: ['completedBy'],
  formatValue(field, value) {
    if (typeof value !== 'string') return undefined;
    if (field === 'status') return capaStateLabels[value as keyof typeof capaStateLabels];
    if (field === 'sourceType') return capaSourceLabels[value as keyof typeof capaSourceLabels];
    if (field === 'kind') return capaActionKindLabels[value as keyof typeof capaActionKindLabels];
    if (field === 'category') return capaActionCategoryLabels[value as keyof typeof capaActionCategoryLabels];
    if (field === 'effectivenessResult') return value === 'effective' ? 'Effective' : 'Not effective';
    if (field === 'recurrenceCriterion') return describeCriterion(value);
    return undefined;
  },
};

export function CapaTimeline(props: RecordTimelineProps) {
  return <RecordTimeline {...props} vocabulary={capaVocabulary} />;
}
