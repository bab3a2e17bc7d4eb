import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { AuditTrail } from '@/components/admin/audit-trail';
import { ActiveForm, ChangeRoleForm, ResetPasswordForm, UnlockForm } from '@/components/admin/user-change-forms';
import { ActiveBadge, LockBadge } from '@/components/admin/user-status';
import { formatUtc } from '@/components/ui/format';
import { Notice } from '@/components/ui/notice';
import { PageHeader } from '@/components/ui/page-header';
import { can } from '@/lib/auth/permissions';
import { roleLabels, roles } from '@/lib/auth/roles';
import { requirePageUser } from '@/lib/auth/session';
import { getUser, listUserAuditTrail } from '@/lib/users/queries';
import { passwordMinLength } from '@/lib/validation/users';
import {
  changeRoleAction,
  deactivateAction,
  reactivateAction,
  resetPasswordAction,
  unlockAction,
} from '../actions';

export const metadata: Metadata = { title: 'User' };

export default async function UserPage({ params, searchParams }: PageProps<'/admin/users/[id]'>) {
  const { id: rawId } = await params;
  const me = await requirePageUser('users.manage', { returnTo: `/admin/users/${encodeURIComponent(rawId)}` });
  const id = /^\d+$/.test(rawId) ? Number(rawId) : NaN;
  const user = Number.isSafeInteger(id) ? await getUser(id) : null;
  if (!user) notFound();
  const created = (await searchParams).created === '1';
  const trail = can(me, 'audit.read') ? await listUserAuditTrail(user.id) : null;
  const now = new Date();
  const locked = user.failedSignins > 0 || (user.lockedUntil !== null && new Date(user.lockedUntil) > now);
  const isSelf = me.id === user.id;
  const roleOptions = roles.map((r) => ({ value: r, label: roleLabels[r] }));

  return (
    <>
      <p className="mb-2">
        <Link href="/admin/users" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
          ← Users
        </Link>
      </p>
      <PageHeader title={user.name} description={user.title || undefined} />
      {created ? (
        <div className="mb-6">
          <Notice tone="ok" title={`${user.name} can now sign in with the temporary password.`} />
        </div>
      ) : null}

      <div className="grid grid-cols-1 gap-6 lg:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
        <section aria-labelledby="account-heading" className="rounded-lg border border-ink-200 bg-white p-5">
          <h2 id="account-heading" className="text-lg font-semibold">
            Account
          </h2>
          <dl className="mt-3 grid grid-cols-[max-content_1fr] gap-x-6 gap-y-2">
            <dt className="text-ink-600">E-mail</dt>
            <dd className="break-all">{user.email}</dd>
            <dt className="text-ink-600">Role</dt>
            <dd>{roleLabels[user.role]}</dd>
            <dt className="text-ink-600">Account</dt>
            <dd>
              <ActiveBadge active={user.active} />
            </dd>
            <dt className="text-ink-600">Locked until</dt>
            <dd>
              <LockBadge lockedUntil={user.lockedUntil} now={now} />
            </dd>
            <dt className="text-ink-600">Failed attempts</dt>
            <dd className="tabular-nums">{user.failedSignins}</dd>
            <dt className="text-ink-600">Last sign-in</dt>
            <dd className="tabular-nums">{user.lastSigninAt ? formatUtc(user.lastSigninAt) : 'Never'}</dd>
            <dt className="text-ink-600">Password set</dt>
            <dd className="tabular-nums">{formatUtc(user.passwordChangedAt)}</dd>
            <dt className="text-ink-600">Created</dt>
            <dd className="tabular-nums">{formatUtc(user.createdAt)}</dd>
          </dl>
        </section>

        <div className="flex flex-col gap-6">
          <ChangeRoleForm
            action={changeRoleAction.bind(null, user.id)}
            version={user.version}
            currentRole={user.role}
            roleOptions={roleOptions}
            isSelf={isSelf}
          />
          {locked ? <UnlockForm action={unlockAction.bind(null, user.id)} version={user.version} /> : null}
          <ResetPasswordForm
            action={resetPasswordAction.bind(null, user.id)}
            version={user.version}
            passwordMinLength={passwordMinLength}
          />
          {isSelf ? (
            <Notice tone="info" live={false} title="You cannot deactivate your own account.">
              Another administrator can do it.
            </Notice>
          ) : (
            <ActiveForm
              action={(user.active ? deactivateAction : reactivateAction).bind(null, user.id)}
              version={user.version}
              active={user.active}
            />
          )}
        </div>
      </div>

      {trail ? (
        <section aria-labelledby="trail-heading" className="mt-8">
          <h2 id="trail-heading" className="mb-3 text-lg font-semibold">
            Audit trail of this account
          </h2>
          <AuditTrail entries={trail} />
        </section>
      ) : null}
    </>
  );
}
