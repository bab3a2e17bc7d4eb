import type { ReactNode } from 'react';
import { SiteHeader } from '@/components/shell/site-header';
import { SkipLink } from '@/components/shell/skip-link';
import { getCurrentUser } from '@/lib/auth/session';
import { roleLabels } from '@/lib/auth/roles';
import { getEnv } from '@/lib/env';
import { navEntriesFor } from '@/lib/navigation';
import { signOutAction } from './actions';

/*
 * The signed-in shell. Every page below guards itself with requirePageUser(permission, { returnTo })
 * (tests/unit/navigation/page-guards.test.ts checks that), and that is the check that counts: on a
 * client-side navigation this layout is not rendered again at all. Signed out, the layout therefore
 * renders the page bare and lets it redirect to sign-in with its own address; redirecting here
 * would win the race and lose the address, because a layout cannot know the path.
 * For the same reason there is no loading.tsx in this group: a page inside a Suspense boundary can
 * only redirect by a streamed meta refresh, not a 307.
 */
export default async function AppLayout({ children }: { children: ReactNode }) {
  const user = await getCurrentUser();
  if (!user) return children;
  const links = navEntriesFor(user).map(({ href, label }) => ({ href, label }));
  return (
    <>
      <SkipLink />
      <SiteHeader
        siteName={getEnv().SITE_NAME}
        userName={user.name}
        roleLabel={roleLabels[user.role]}
        links={links}
        signOutAction={signOutAction}
      />
      <main id="main" tabIndex={-1} className="mx-auto w-full max-w-screen-2xl px-4 py-6 focus:outline-none sm:px-6">
        {children}
      </main>
    </>
  );
}
