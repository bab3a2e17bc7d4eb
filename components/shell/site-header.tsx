import Link from 'next/link';
import { MainNav, type MainNavLink } from './main-nav';
import { Wordmark } from './wordmark';

/*
 * The app header: mark, site, who is signed in (every action is attributed to this person,
 * 21 CFR 11.10(e)), their password page, sign-out, and the section links. Wraps to two rows on a
 * portrait tablet.
 */

export function SiteHeader({
  siteName,
  userName,
  roleLabel,
  links,
  signOutAction,
}: {
  siteName: string;
  userName: string;
  roleLabel: string;
  links: readonly MainNavLink[];
  signOutAction: () => Promise<void>;
}) {
  return (
    <header className="surface-dark bg-ink-900 text-white">
      <div className="mx-auto flex max-w-screen-2xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-2">
        <Link href="/" className="flex min-h-11 items-center rounded-md" aria-label="Plumbline, overview">
          <Wordmark tone="light" />
        </Link>
        {siteName !== 'Plumbline' ? (
          <span className="border-l border-ink-600 pl-4 text-ink-200">{siteName}</span>
        ) : null}
        <div className="ml-auto flex flex-wrap items-center gap-x-4 gap-y-2">
          <p data-testid="current-user" className="flex flex-col text-right leading-tight">
            <span className="font-semibold">{userName}</span>
            <span className="text-sm text-ink-300">{roleLabel}</span>
          </p>
          <Link
            href="/account/password"
            className="inline-flex min-h-11 items-center rounded-md px-3 font-semibold text-white underline underline-offset-4 hover:bg-ink-700"
          >
            Change password
          </Link>
          <form action={signOutAction}>
            <button
              type="submit"
              className="inline-flex min-h-11 items-center rounded-md border border-ink-400 px-4 font-semibold text-white hover:bg-ink-700"
            >
              Sign out
            </button>
          </form>
        </div>
      </div>
      {links.length > 0 ? <MainNav links={links} /> : null}
    </header>
  );
}
