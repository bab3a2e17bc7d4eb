import type { ReactNode } from 'react';
import { SiteHeader } from '@/components/shell/site-header';
import { SkipLink } from '@/components/shell/skip-link';
import { requirePageUser } from '@/lib/auth/session';
import { roleLabels } from '@/lib/auth/roles';
import { getEnv } from '@/lib/env';
import { navEntriesFor } from '@/lib/navigation';
import { signOutAction } from './actions';

export default async function AppLayout({ children }: { children: ReactNode }) {
  const user = await requirePageUser();
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
