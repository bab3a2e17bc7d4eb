import { RecordTimeline, type RecordTimelineProps, type TimelineVocabulary } from '@/components/records/record-timeline';
import { complainantKindLabels, complaintEventLabels, complaintStateLabels, intakeChannelLabels, reportKindLabels } from '@/lib/complaints/labels';

/* The complaint's timeline: the shared record timeline in the complaint's words. */

const fieldLabels: Record<string, string> = {
  status: 'Status',
  number: 'Number',
  receivedOn: 'Received',
  channel: 'Received by',
  complainantName: 'Complainant',
  complainantContact: 'Contact',
  complainantKind: 'Complainant kind',
  productId: 'Product',
  batchId: 'Batch',
  lotAsReported: 'Lot as reported',
  lotUnknown: 'Lot not in the batch records',
  description: 'What they found',
  unitsAffected: 'Units affected',
  personHarmed: 'Person harmed',
  harmDescription: 'How they were harmed',
  samplesReturning: 'Samples returning',
  category: 'Category',
  defectId: 'Defect',
  adverseEvent: 'Adverse event',
  seriousAdverseEvent: 'Serious',
  reportable: 'Reportable',
  reportKind: 'Report',
  reportDueOn: 'Report due',
  reportSubmittedAt: 'Report submitted',
  assessmentRationale: 'Rationale',
  reportabilityDecidedAt: 'Decision signed',
  reportabilityDecidedBy: 'Decision signed by',
  investigationSkipReason: 'Why no investigation',
  retainedSamplesChecked: 'Retained samples checked',
  retainedSamplesNote: 'Retained samples',
  investigationSummary: 'Investigation summary',
  responseText: 'Letter',
  responseChannel: 'Sent by',
  responseSentText: 'Letter as sent',
  responseSentAt: 'Answer sent',
  responseSentBy: 'Sent by',
  reopenReason: 'Why reopened',
  ownerId: 'Owner',
  dueAt: 'Due',
  closedAt: 'Closed',
  signature: 'Signature',
  'linked deviation': 'Linked deviation',
  'linked capa': 'Linked CAPA',
  'raised CAPA': 'Raised CAPA',
};

const actionLabels: Record<string, string> = {
  ...complaintEventLabels,
  create: 'Complaint received',
  record_assessment: 'Assessment recorded',
  record_investigation: 'Investigation recorded',
  link_deviation: 'Deviation linked',
  link_capa: 'CAPA linked',
  raise_capa: 'CAPA raised',
  write_response: 'Letter saved',
  send_response: 'Answer sent',
  record_report_submitted: 'Report submitted',
  signed: 'Signed',
};

const vocabulary: TimelineVocabulary = {
  fieldLabels,
  actionLabels,
  extraUserIdFields: ['reportabilityDecidedBy', 'responseSentBy'],
  formatValue(field, value) {
    if (typeof value === 'boolean' && field !== 'status') return value ? 'Yes' : 'No';
    if (typeof value !== 'string') return undefined;
    if (field === 'status') return complaintStateLabels[value as keyof typeof complaintStateLabels];
    if (field === 'channel') return intakeChannelLabels[value as keyof typeof intakeChannelLabels];
    if (field === 'complainantKind') return complainantKindLabels[value as keyof typeof complainantKindLabels];
    if (field === 'reportKind') return reportKindLabels[value as keyof typeof reportKindLabels];
    if (field === 'responseChannel') return value === 'email' ? 'E-mail' : 'Post';
    return undefined;
  },
};

export function ComplaintTimeline(props: RecordTimelineProps) {
  return <RecordTimeline {...props} vocabulary={vocabulary} />;
}
