import { StatusBadge, type Tone } from '@/components/ui/status-badge';
import { classificationLabels, type Classification } from '@/lib/risk/classify';

const tones: Record<Classification, Tone> = { critical: 'danger', major: 'warn', minor: 'info' };

export function ClassificationBadge({ classification }: { classification: Classification }) {
  return <StatusBadge tone={tones[classification]} label={classificationLabels[classification]} />;
}
