import type { Metadata } from 'next';
import Link from 'next/link';
import { CauseMap } from '@/components/causes/cause-map';
import { SelectField } from '@/components/ui/field';
import { buttonClasses } from '@/components/ui/button';
import { PageHeader } from '@/components/ui/page-header';
import { requirePageUser } from '@/lib/auth/session';
import { fishboneFor } from '@/lib/causes';
import { listScoringDefects, type ScoringDefectDto } from '@/lib/risk-scales/queries';

export const metadata: Metadata = { title: 'Probable causes' };

const classificationLabels = { critical: 'Critical', major: 'Major', minor: 'Minor' } as const;

/** A critical defect's own catalogue caution says more than the generic quarantine one; it takes its place. */
function withCatalogueCaution(defect: ScoringDefectDto) {
  const fishbone = fishboneFor(defect.code, { critical: defect.defaultClassification === 'critical' });
  return {
    ...fishbone,
    cautions: fishbone.cautions.map((c) => (c.id === 'quarantine' && defect.caution ? { ...c, text: defect.caution } : c)),
  };
}

export default async function ProbableCausesPage({ searchParams }: PageProps<'/equipment/causes'>) {
  const raw = (await searchParams).defect;
  const code = typeof raw === 'string' ? raw : '';
  await requirePageUser('equipment.read', {
    returnTo: code ? `/equipment/causes?defect=${encodeURIComponent(code)}` : '/equipment/causes',
  });
  const defects = await listScoringDefects();
  const defect = defects.find((d) => d.code === code) ?? null;

  return (
    <>
      <PageHeader
        title="Probable causes"
        description="Pick a capsule defect to see the machine settings and conditions that usually cause it, on the six cause-and-effect branches."
        actions={
          <Link href="/equipment" className={buttonClasses('secondary')}>
            Back to equipment
          </Link>
        }
      />
      {/* A plain GET form: the choice is in the URL, so a view can be shared, and it works without script. */}
      <form method="get" action="/equipment/causes" className="mb-6 flex flex-wrap items-end gap-3">
        <div className="min-w-[18rem] flex-1 sm:max-w-md">
          <SelectField
            name="defect"
            label="Defect"
            defaultValue={defect?.code ?? ''}
            options={[
              { value: '', label: 'Choose a defect' },
              ...defects.map((d) => ({ value: d.code, label: `${d.name} (${classificationLabels[d.defaultClassification]})` })),
            ]}
          />
        </div>
        <button type="submit" className={buttonClasses('primary')}>
          Show causes
        </button>
      </form>
      {code && !defect ? (
        <p role="status" className="text-ink-700">
          That defect is not in the catalogue. Choose one from the list.
        </p>
      ) : null}
      {defect ? (
        <section aria-labelledby="defect-heading" className="flex flex-col gap-3">
          <h2 id="defect-heading" className="text-xl font-semibold">
            {defect.name}{' '}
            <span className="text-base font-normal text-ink-600">
              · default classification {classificationLabels[defect.defaultClassification].toLowerCase()}
            </span>
          </h2>
          <p className="max-w-3xl text-ink-700">{defect.description}</p>
          <CauseMap defect={{ name: defect.name }} fishbone={withCatalogueCaution(defect)} />
        </section>
      ) : null}
    </>
  );
}
