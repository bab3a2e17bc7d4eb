import type { Metadata } from 'next';
import { ChangePasswordForm } from '@/components/account/change-password-form';
import { Notice } from '@/components/ui/notice';
import { PageHeader } from '@/components/ui/page-header';
import { changePasswordPath, requirePageUser, safeReturnPath } from '@/lib/auth/session';
import { passwordMinLength } from '@/lib/validation/users';
import { changeOwnPasswordAction } from './actions';

export const metadata: Metadata = { title: 'Change password' };

export default async function ChangePasswordPage({ searchParams }: PageProps<'/account/password'>) {
  const { returnTo: rawReturnTo } = await searchParams;
  const returnTo = safeReturnPath(typeof rawReturnTo === 'string' ? rawReturnTo : undefined);
  const continueHref = returnTo.startsWith(changePasswordPath) ? '/' : returnTo;
  const user = await requirePageUser(undefined, {
    returnTo: continueHref === '/' ? changePasswordPath : `${changePasswordPath}?returnTo=${encodeURIComponent(continueHref)}`,
    allowPasswordChange: true,
  });

  return (
    <>
      <PageHeader
        title="Change password"
        description="Your password is also your electronic signature: keep it to yourself and change it if anyone else may know it."
      />
      {user.mustChangePassword ? (
        <div className="mb-6 max-w-xl">
          <Notice tone="warn" title="An administrator set your password; choose your own before you continue." live={false}>
            Until you do, the other pages stay closed: records you enter or sign must be yours alone.
          </Notice>
        </div>
      ) : null}
      <ChangePasswordForm
        action={changeOwnPasswordAction}
        passwordMinLength={passwordMinLength}
        continueHref={continueHref}
      />
    </>
  );
}
