import { StatusBadge, type Tone } from '@/components/ui/status-badge';
import type { ReportCountdown } from '@/lib/complaints/deadline';
import { complaintStateLabels } from '@/lib/complaints/labels';
import type { ComplaintState } from '@/workflows/states';

export const complaintStateTones: Record<ComplaintState, Tone> = {
  received: 'warn',
  assessment: 'info',
  investigation: 'info',
  response: 'warn',
  closed: 'ok',
};

export function ComplaintStatusBadge({ status }: { status: ComplaintState }) {
  return <StatusBadge tone={complaintStateTones[status]} label={complaintStateLabels[status]} />;
}

const countdownTones: Record<ReportCountdown['tone'], Tone> = { ok: 'info', warn: 'warn', danger: 'danger', done: 'ok' };

/** The report deadline and what is left of it, as a chip: "Report due 2026-12-07 · 3 business days left". */
export function ReportCountdownBadge({ report, compact = false }: { report: ReportCountdown; compact?: boolean }) {
  const label = compact ? report.text : `Report due ${report.dueOn} · ${report.text}`;
  return <StatusBadge tone={countdownTones[report.tone]} label={label} />;
}
