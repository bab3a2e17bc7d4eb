import type { Metadata } from 'next';
import Link from 'next/link';
import { RiskScalesTables } from '@/components/risk/risk-scales-table';
import { buttonClasses } from '@/components/ui/button';
import { formatUtc } from '@/components/ui/format';
import { Notice } from '@/components/ui/notice';
import { PageHeader } from '@/components/ui/page-header';
import { requirePageUser } from '@/lib/auth/session';
import { getCurrentRiskScales, getRiskScaleVersion, listRiskScaleVersions } from '@/lib/risk-scales/queries';

export const metadata: Metadata = { title: 'Risk scales' };

type SearchParams = Promise<Record<string, string | string[] | undefined>>;

const positiveInt = (value: string | string[] | undefined): number | null => {
  const n = Number(Array.isArray(value) ? value[0] : value);
  return Number.isInteger(n) && n > 0 ? n : null;
};

const hrefFor = (version: number | null) => (version ? `/admin/risk-scales?version=${version}` : '/admin/risk-scales');

export default async function RiskScalesPage({ searchParams }: { searchParams: SearchParams }) {
  const params = await searchParams;
  const requested = positiveInt(params.version);
  const published = positiveInt(params.published);
  await requirePageUser('risk.manage_scales', { returnTo: hrefFor(requested) });
  const [current, history] = await Promise.all([getCurrentRiskScales(), listRiskScaleVersions()]);
  const shown = requested && requested !== current?.version ? await getRiskScaleVersion(requested) : current;

  return (
    <>
      <PageHeader
        title="Risk scales"
        description="The severity, occurrence and detection scales investigators score capsule defects on. A published version never changes: new wording is published as a new version, and every recorded score keeps the version it was made with."
        actions={
          <Link href="/admin/risk-scales/publish" className={buttonClasses('primary')}>
            Publish a new version
          </Link>
        }
      />
      <div className="flex flex-col gap-6">
        {published && published === current?.version ? (
          <Notice tone="ok" title={`Version ${published} is published.`}>
            New scores use it from now on. The change is in the audit trail.
          </Notice>
        ) : null}
        {requested && !shown ? (
          <Notice tone="warn" title={`There is no version ${requested}.`}>
            <Link href="/admin/risk-scales" className="underline underline-offset-4">
              Show the current version
            </Link>
          </Notice>
        ) : null}
        {!current ? (
          <Notice tone="warn" title="No version is published yet." live={false}>
            Publish the first version to let investigators score defects.
          </Notice>
        ) : null}

        {shown ? (
          <section aria-labelledby="shown-heading" className="flex flex-col gap-3">
            <h2 id="shown-heading" className="text-xl font-semibold">
              Version {shown.version}
              {shown.version === current?.version ? ' (current)' : ` (superseded; current is ${current?.version})`}
            </h2>
            <p className="text-ink-700">
              Published {formatUtc(shown.publishedAt)} by {shown.publishedByName}. Note: {shown.note}
            </p>
            <RiskScalesTables scales={shown.scales} />
          </section>
        ) : null}

        {history.length > 0 ? (
          <section aria-labelledby="history-heading" className="flex flex-col gap-2">
            <h2 id="history-heading" className="text-xl font-semibold">
              All versions
            </h2>
            <table className="w-full border-collapse bg-white text-left">
              <thead>
                <tr className="border-b border-ink-300 text-sm text-ink-700">
                  <th scope="col" className="px-3 py-2">
                    Version
                  </th>
                  <th scope="col" className="px-3 py-2">
                    Published
                  </th>
                  <th scope="col" className="px-3 py-2">
                    By
                  </th>
                  <th scope="col" className="px-3 py-2">
                    Note
                  </th>
                </tr>
              </thead>
              <tbody>
                {history.map((h) => (
                  <tr key={h.id} className="border-b border-ink-200 align-top">
                    <th scope="row" className="px-3 py-2">
                      <Link
                        href={hrefFor(h.version === current?.version ? null : h.version)}
                        aria-current={h.version === shown?.version ? 'page' : undefined}
                        className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4"
                      >
                        Version {h.version}
                        {h.version === current?.version ? ' (current)' : ''}
                      </Link>
                    </th>
                    <td className="px-3 py-2 whitespace-nowrap">{formatUtc(h.publishedAt)}</td>
                    <td className="px-3 py-2">{h.publishedByName}</td>
                    <td className="px-3 py-2 text-ink-800">{h.note}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </section>
        ) : null}
      </div>
    </>
  );
}
