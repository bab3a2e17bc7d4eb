import { StatusBadge, type Tone } from '@/components/ui/status-badge';
import { capaStateLabels } from '@/lib/capa/labels';
import type { CapaState } from '@/workflows/states';

export const capaStateTones: Record<CapaState, Tone> = {
  proposed: 'warn',
  plan_approved: 'info',
  implementation: 'info',
  effectiveness_check: 'warn',
  closed_effective: 'ok',
  cancelled: 'neutral',
};

export function CapaStatusBadge({ status }: { status: CapaState }) {
  return <StatusBadge tone={capaStateTones[status]} label={capaStateLabels[status]} />;
}
