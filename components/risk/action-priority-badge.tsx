import { StatusBadge, type Tone } from '@/components/ui/status-badge';
import { actionPriorityLabels, type ActionPriority } from '@/lib/risk/action-priority';

const tones: Record<ActionPriority, Tone> = { high: 'danger', medium: 'warn', low: 'ok' };

export function ActionPriorityBadge({ priority }: { priority: ActionPriority }) {
  return <StatusBadge tone={tones[priority]} label={`Action priority: ${actionPriorityLabels[priority]}`} />;
}
