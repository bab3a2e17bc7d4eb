import type { Metadata } from 'next';
import Link from 'next/link';
import { StatusIcon } from '@/components/ui/status-badge';
import { PageHeader } from '@/components/ui/page-header';
import { can } from '@/lib/auth/permissions';
import { roleLabels } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import { countBatchesByStatus } from '@/lib/master-data/queries';
import { navEntriesFor } from '@/lib/navigation';
import { getUserOverview } from '@/lib/users/queries';

export const metadata: Metadata = { title: 'Overview' };

function Figure({ label, value, href, attention }: { label: string; value: number; href: string; attention: boolean }) {
  return (
    <Link
      href={href}
      className="flex min-h-24 flex-col justify-between rounded-lg border border-ink-200 bg-white p-4 hover:border-ink-400"
    >
      <span className="flex items-center gap-2 font-semibold text-ink-700">
        {attention ? <StatusIcon tone="warn" className="h-5 w-5 text-warn-700" /> : null}
        {label}
      </span>
      <span className="text-3xl font-bold tabular-nums text-ink-900">{value}</span>
    </Link>
  );
}

export default async function OverviewPage() {
  const user = await requirePageUser(undefined, { returnTo: '/' });
  const [batchCounts, userOverview] = await Promise.all([
    can(user, 'batch.read') ? countBatchesByStatus() : null,
    can(user, 'users.manage') ? getUserOverview() : null,
  ]);
  const sections = navEntriesFor(user);

  return (
    <>
      <PageHeader
        title="Overview"
        description={`Signed in as ${user.name}, ${roleLabels[user.role]}${user.title ? ` (${user.title})` : ''}.`}
      />

      {batchCounts || userOverview ? (
        <section aria-labelledby="figures-heading" className="mb-8">
          <h2 id="figures-heading" className="mb-3 text-lg font-semibold">
            Right now
          </h2>
          <div className="grid grid-cols-1 gap-4 sm:grid-cols-2 lg:grid-cols-4">
            {batchCounts ? (
              <>
                <Figure
                  label="Batches on hold"
                  value={batchCounts.on_hold}
                  href="/batches?status=on_hold"
                  attention={batchCounts.on_hold > 0}
                />
                <Figure
                  label="Batches in process"
                  value={batchCounts.in_process}
                  href="/batches?status=in_process"
                  attention={false}
                />
              </>
            ) : null}
            {userOverview ? (
              <>
                <Figure label="Active users" value={userOverview.active} href="/admin/users" attention={false} />
                <Figure
                  label="Users locked out"
                  value={userOverview.lockedNow}
                  href="/admin/users"
                  attention={userOverview.lockedNow > 0}
                />
              </>
            ) : null}
          </div>
        </section>
      ) : null}

      <section aria-labelledby="sections-heading">
        <h2 id="sections-heading" className="mb-3 text-lg font-semibold">
          Your sections
        </h2>
        <ul className="grid grid-cols-1 gap-4 sm:grid-cols-2 lg:grid-cols-3">
          {sections.map((s) => (
            <li key={s.href}>
              <Link
                href={s.href}
                className="flex min-h-20 flex-col gap-1 rounded-lg border border-ink-200 bg-white p-4 hover:border-ink-400"
              >
                <span className="font-semibold text-ink-900">{s.label}</span>
                <span className="text-ink-600">{s.description}</span>
              </Link>
            </li>
          ))}
        </ul>
      </section>
    </>
  );
}
