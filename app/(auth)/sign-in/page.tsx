import type { Metadata } from 'next';
import { redirect } from 'next/navigation';
import { getCurrentUser } from '@/lib/auth/session';
import { getEnv } from '@/lib/env';
import { safeReturnPath } from '@/lib/navigation';
import { SignInForm } from './sign-in-form';
import { signInFailedMessage } from './state';

export const metadata: Metadata = { title: 'Sign in' };

export default async function SignInPage({ searchParams }: PageProps<'/sign-in'>) {
  const params = await searchParams;
  const first = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v);
  const callbackUrl = safeReturnPath(first(params.callbackUrl));
  if (await getCurrentUser()) redirect(callbackUrl);
  // Auth.js sends failures it handles itself back here with ?error=…; they get the same message.
  const initialError = first(params.error) ? signInFailedMessage : null;
  const siteName = getEnv().SITE_NAME;

  return (
    <div className="w-full max-w-md">
      <div className="rounded-lg border border-ink-200 bg-white p-6 shadow-sm sm:p-8">
        <h1 className="text-2xl font-bold tracking-tight">Sign in</h1>
        {siteName !== 'Plumbline' ? <p className="mt-1 text-ink-600">{siteName}</p> : null}
        <div className="mt-6">
          <SignInForm callbackUrl={callbackUrl} initialError={initialError} />
        </div>
      </div>
      <section aria-labelledby="gmp-notice" className="mt-6 rounded-lg border border-ink-300 bg-ink-100 p-4 text-sm text-ink-800">
        <h2 id="gmp-notice" className="font-semibold text-ink-900">
          A GMP system
        </h2>
        <p className="mt-1">
          Signing in identifies you. Everything you record, change or sign here is attributed to you, with the
          date and time, in the audit trail. Use only your own account, never share your password, and sign out
          before handing a tablet to someone else.
        </p>
      </section>
    </div>
  );
}
