import { RecordEventForm, type RecordEventFormProps } from '@/components/records/record-event-form';

/* A deviation lifecycle action: the shared record event form (reason, signature block, errors beside fields). */

export type DeviationEventFormProps = Omit<RecordEventFormProps, 'recordId'> & { deviationId: number };

export function DeviationEventForm({ deviationId, ...props }: DeviationEventFormProps) {
  return <RecordEventForm recordId={deviationId} {...props} />;
}
