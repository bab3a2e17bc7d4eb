import type { Metadata } from 'next';
import Link from 'next/link';
import { PageHeader } from '@/components/ui/page-header';
import { can, type Permission } from '@/lib/auth/permissions';
import { requirePageUser } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Administration' };

/* The administration areas, each shown only to a role allowed into it. */
const areas: readonly { href: string; label: string; description: string; permission: Permission }[] = [
  {
    href: '/admin/users',
    label: 'Users',
    description: 'Accounts, roles, deactivation, password resets and lock-outs. Every change is audited.',
    permission: 'users.manage',
  },
  {
    href: '/admin/risk-scales',
    label: 'Risk scales',
    description: 'The severity, occurrence and detection scales. Publishing a new version never changes an old one.',
    permission: 'risk.manage_scales',
  },
  {
    href: '/admin/calendar',
    label: 'Site calendar and due dates',
    description: 'Site closures that business-day clocks skip, and closure targets by classification.',
    permission: 'calendar.manage',
  },
];

export default async function AdminPage() {
  const user = await requirePageUser('users.manage', { returnTo: '/admin' });
  const visible = areas.filter((a) => can(user, a.permission));
  return (
    <>
      <PageHeader title="Administration" description="Who may do what, and the settings the quality computations use." />
      <ul className="grid grid-cols-1 gap-4 md:grid-cols-2 lg:grid-cols-3">
        {visible.map((a) => (
          <li key={a.href}>
            <Link
              href={a.href}
              className="flex min-h-24 flex-col gap-1 rounded-lg border border-ink-200 bg-white p-4 hover:border-ink-400"
            >
              <span className="font-semibold text-ink-900 underline underline-offset-4">{a.label}</span>
              <span className="text-ink-700">{a.description}</span>
            </Link>
          </li>
        ))}
      </ul>
    </>
  );
}
