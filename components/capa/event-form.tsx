import { RecordEventForm, type RecordEventFormProps } from '@/components/records/record-event-form';

/* A CAPA lifecycle action: the shared record event form (reason, signature block, errors beside fields). */

export type CapaEventFormProps = Omit<RecordEventFormProps, 'recordId'> & { capaId: number };

export function CapaEventForm({ capaId, ...props }: CapaEventFormProps) {
  return <RecordEventForm recordId={capaId} {...props} />;
}
