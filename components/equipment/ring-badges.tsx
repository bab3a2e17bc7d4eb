import { StatusBadge, type Tone } from '@/components/ui/status-badge';
import { type RingCondition, ringConditionLabels, ringStateLabels } from '@/lib/equipment/labels';
import type { RingState } from '@/workflows/states';

/* A ring's status and condition as icon + word, so neither depends on colour alone. */

const statusTones: Record<RingState, Tone> = { in_service: 'ok', quarantined: 'warn', retired: 'neutral' };
const conditionTones: Record<RingCondition, Tone> = { good: 'ok', worn: 'info', dented: 'warn', damaged: 'danger' };

export function RingStatusBadge({ status }: { status: RingState }) {
  return <StatusBadge tone={statusTones[status]} label={ringStateLabels[status]} />;
}

export function RingConditionBadge({ condition }: { condition: RingCondition }) {
  return <StatusBadge tone={conditionTones[condition]} label={ringConditionLabels[condition]} />;
}
