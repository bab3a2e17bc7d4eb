import type { Metadata } from 'next';
import Link from 'next/link';
import { UserTable } from '@/components/admin/user-table';
import { buttonClasses } from '@/components/ui/button';
import { PageHeader } from '@/components/ui/page-header';
import { Pagination } from '@/components/ui/pagination';
import { roleLabels } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import { listUsers } from '@/lib/users/queries';
import { listUsersQuerySchema } from '@/lib/validation/users';

export const metadata: Metadata = { title: 'Users' };

const hrefFor = (page: number) => (page > 1 ? `/admin/users?page=${page}` : '/admin/users');

export default async function UsersPage({ searchParams }: PageProps<'/admin/users'>) {
  const { page } = listUsersQuerySchema.parse(await searchParams);
  await requirePageUser('users.manage', { returnTo: hrefFor(page) });
  const result = await listUsers(page);
  const now = new Date();

  return (
    <>
      <PageHeader
        title="Users"
        description="Who may sign in and with which role. Accounts are deactivated, never deleted, so every record keeps its author."
        actions={
          <Link href="/admin/users/new" className={buttonClasses('primary')}>
            Add user
          </Link>
        }
      />
      <p className="mb-2 text-ink-600">
        {result.total} account{result.total === 1 ? '' : 's'}, active first.
      </p>
      <UserTable
        now={now}
        users={result.rows.map((u) => ({
          id: u.id,
          name: u.name,
          title: u.title,
          email: u.email,
          roleLabel: roleLabels[u.role],
          active: u.active,
          mustChangePassword: u.mustChangePassword,
          lockedUntil: u.lockedUntil,
          lastSigninAt: u.lastSigninAt,
        }))}
      />
      <Pagination page={result.page} pageSize={result.pageSize} total={result.total} hrefFor={hrefFor} label="User list pages" />
    </>
  );
}
