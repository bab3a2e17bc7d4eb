import { StatusBadge, type Tone } from './status-badge';

type BatchStatus = 'in_process' | 'on_hold' | 'released' | 'rejected';

const batchStatusView: Record<BatchStatus, { tone: Tone; label: string }> = {
  in_process: { tone: 'info', label: 'In process' },
  on_hold: { tone: 'warn', label: 'On hold' },
  released: { tone: 'ok', label: 'Released' },
  rejected: { tone: 'danger', label: 'Rejected' },
};

export function BatchStatusBadge({ status }: { status: BatchStatus }) {
  const view = batchStatusView[status];
  return <StatusBadge tone={view.tone} label={view.label} />;
}
