import { StatusBadge, type Tone } from '@/components/ui/status-badge';
import { deviationStateLabels, dispositionLabels, type Disposition } from '@/lib/deviations/labels';
import type { DeviationState } from '@/workflows/states';

/* Status and disposition badges for the deviation page; the word carries the meaning, not the colour. */

const stateTones: Record<DeviationState, Tone> = {
  draft: 'neutral',
  reported: 'info',
  triage: 'warn',
  investigation: 'warn',
  approval: 'info',
  closed: 'ok',
  cancelled: 'neutral',
  discarded: 'neutral',
};

export function DeviationStatusBadge({ status }: { status: DeviationState }) {
  return <StatusBadge tone={stateTones[status]} label={deviationStateLabels[status]} />;
}

const dispositionTones: Record<Disposition, Tone> = { release: 'ok', reject: 'danger', rework: 'warn', re_inspect: 'warn' };

export function DispositionBadge({ disposition }: { disposition: Disposition | null }) {
  if (!disposition) return <StatusBadge tone="neutral" label="No disposition yet" />;
  return <StatusBadge tone={dispositionTones[disposition]} label={dispositionLabels[disposition]} />;
}
