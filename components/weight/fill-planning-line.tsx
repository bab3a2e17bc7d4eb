import { StatusBadge, type Tone } from '@/components/ui/status-badge';
import { type CapsuleSize, type FillFit, capsuleVolumeSource, sanityCheckTarget } from '@/lib/weight/fill-planning';
import { num } from './format';

const fitBadge: Record<FillFit, { tone: Tone; label: string }> = {
  fits: { tone: 'ok', label: 'Fits' },
  tight: { tone: 'warn', label: 'Tight' },
  overfull: { tone: 'danger', label: 'Over-full' },
  underfilled: { tone: 'warn', label: 'Under-filled' },
};

/**
 * Whether the product's target fill goes into its capsule size at the powder's tapped density:
 * nominal body volume × tapped density gives the fill to expect, and the band says how the target
 * compares with it.
 */
export function FillPlanningLine({
  product,
  tappedDensityGPerMl,
}: {
  product: { capsuleSize: CapsuleSize; targetFillMg: number };
  tappedDensityGPerMl: number | null;
}) {
  if (tappedDensityGPerMl === null) {
    return (
      <p className="text-ink-700">
        <span className="font-semibold text-ink-900">Fill planning:</span> no tapped density recorded for this product.
      </p>
    );
  }
  const check = sanityCheckTarget(product, tappedDensityGPerMl);
  const badge = fitBadge[check.fit];
  return (
    <div className="flex flex-col gap-1">
      <p className="flex flex-wrap items-center gap-x-2 gap-y-1 text-ink-900">
        <span className="font-semibold">Fill planning:</span>
        <span className="tabular-nums">
          size {check.size} holds {num(check.volumeMl, 2)} mL × {num(tappedDensityGPerMl, 2)} g/mL tapped = about {num(check.expectedMg, 0)} mg;
          target {num(product.targetFillMg, 0)} mg is {num(check.ratio * 100, 0)} % of that.
        </span>
        <StatusBadge tone={badge.tone} label={badge.label} />
      </p>
      <p className="text-sm text-ink-600">
        {check.message} Capsule volumes: {capsuleVolumeSource}.
      </p>
    </div>
  );
}
