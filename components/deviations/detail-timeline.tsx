import { RecordTimeline, type RecordTimelineProps, type TimelineVocabulary } from '@/components/records/record-timeline';
import { classificationLabels, deviationEventLabels, deviationStateLabels, dispositionLabels } from '@/lib/deviations/labels';

/* The deviation's timeline: the shared record timeline in the deviation's words. */

/** The 5-whys and the cause marks are stored as JSON; the timeline says what they hold in words. */
function summariseJson(field: string, value: string): string | undefined {
  let parsed: unknown;
  try {
    parsed = JSON.parse(value);
  } catch {
    return undefined;
  }
  if (field === 'fiveWhys' && Array.isArray(parsed)) {
    const pairs = parsed as { why?: string; because?: string }[];
    const last = pairs[pairs.length - 1];
    return `${pairs.length} ${pairs.length === 1 ? 'why' : 'whys'}${last?.because ? `, last answer: ${last.because}` : ''}`;
  }
  if (field === 'causeAnalysis' && parsed && typeof parsed === 'object') {
    const marks = [
      ...(((parsed as { catalogue?: unknown[] }).catalogue ?? []) as { state?: string }[]),
      ...(((parsed as { own?: unknown[] }).own ?? []) as { state?: string }[]),
    ];
    const count = (state: string) => marks.filter((m) => m.state === state).length;
    return `${count('root_cause')} root cause, ${count('contributing')} contributing, ${count('ruled_out')} ruled out`;
  }
  return undefined;
}

const deviationVocabulary: TimelineVocabulary = {
  fieldLabels: {
    whatHappened: 'What happened',
    immediateActions: 'Immediate actions',
    classification: 'Classification',
    classificationReason: 'Classification reason',
    severity: 'Severity',
    occurrence: 'Occurrence',
    detection: 'Detection',
    rpn: 'RPN',
    investigatorId: 'Investigator',
    reportedAt: 'Reported',
    closureJustification: 'Closure justification',
    heldBatchIds: 'Held batches',
    investigationReport: 'Investigation report',
    rootCauseCategory: 'Root-cause category',
    rootCause: 'Root cause',
    productImpact: 'Product impact',
    capaRequired: 'CAPA needed',
    raisedCapa: 'CAPA raised',
    fiveWhys: '5-whys',
    causeAnalysis: 'Cause-and-effect',
    affectedCount: 'Capsules affected',
    sampleDescription: 'Sample',
    lineStopped: 'Line stopped',
    capsulesSegregated: 'Capsules segregated',
    defectId: 'Defect',
    productId: 'Product',
    batchId: 'Batch',
    machineId: 'Machine',
    ringId: 'Filling ring',
    occurredAt: 'Occurred',
    recommendedDisposition: 'Recommended disposition',
    disposition: 'Disposition',
    dispositionNote: 'Disposition note',
    samplingPlan: 'Re-inspection plan',
  },
  actionLabels: {
    ...deviationEventLabels,
    create: 'Draft created',
    update_draft: 'Draft edited',
    record_triage: 'Triage recorded',
    record_disposition: 'Disposition recorded',
    extend_holds: 'Holds extended',
    save_investigation: 'Investigation saved',
  },
  formatValue(field, value) {
    if (typeof value !== 'string') return undefined;
    if (field === 'status') return deviationStateLabels[value as keyof typeof deviationStateLabels];
    if (field === 'classification') return classificationLabels[value as keyof typeof classificationLabels];
    if (field === 'disposition' || field === 'recommendedDisposition') return dispositionLabels[value as keyof typeof dispositionLabels];
    if (field === 'fiveWhys' || field === 'causeAnalysis') return summariseJson(field, value);
    return undefined;
  },
};

export function DeviationTimeline(props: RecordTimelineProps) {
  return <RecordTimeline {...props} vocabulary={deviationVocabulary} />;
}
