import { RecordEventForm, type RecordEventFormProps } from '@/components/records/record-event-form';

/* A complaint lifecycle action: the shared record event form (reason, signature block, errors beside fields). */

export type ComplaintEventFormProps = Omit<RecordEventFormProps, 'recordId'> & { complaintId: number };

export function ComplaintEventForm({ complaintId, ...props }: ComplaintEventFormProps) {
  return <RecordEventForm recordId={complaintId} {...props} />;
}
