import type { Metadata } from 'next';
import Link from 'next/link';
import { CreateUserForm } from '@/components/admin/create-user-form';
import { PageHeader } from '@/components/ui/page-header';
import { roleLabels, roles } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import { passwordMinLength } from '@/lib/validation/users';
import { createUserAction } from '../actions';

export const metadata: Metadata = { title: 'Add user' };

export default async function NewUserPage() {
  await requirePageUser('users.manage', { returnTo: '/admin/users/new' });
  return (
    <>
      <p className="mb-2">
        <Link href="/admin/users" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
          ← Users
        </Link>
      </p>
      <PageHeader
        title="Add user"
        description="One account per person: an account is never shared, because every entry and signature names the person who made it."
      />
      <CreateUserForm
        action={createUserAction}
        roleOptions={roles.map((r) => ({ value: r, label: roleLabels[r] }))}
        passwordMinLength={passwordMinLength}
      />
    </>
  );
}
