'use client';

import Link, { useLinkStatus } from 'next/link';
import { usePathname } from 'next/navigation';
import { isCurrentSection } from '@/lib/navigation';

export interface MainNavLink {
  href: string;
  label: string;
}

/** A small bar under a link while its page is on the way: a tablet on a slow network shows the tap landed. */
function PendingBar() {
  const { pending } = useLinkStatus();
  return (
    <span
      aria-hidden="true"
      className={`absolute inset-x-3 bottom-1 h-0.5 bg-brass-300 transition-opacity ${pending ? 'animate-pulse opacity-100' : 'opacity-0'}`}
    />
  );
}

/** The section links the server decided this role may see; marks the current section. */
export function MainNav({ links }: { links: readonly MainNavLink[] }) {
  const pathname = usePathname();
  return (
    <nav aria-label="Main" className="border-t border-ink-700 bg-ink-800">
      <ul className="mx-auto flex max-w-screen-2xl flex-wrap gap-x-1 px-2 sm:px-4">
        {links.map((link) => {
          const current = isCurrentSection(link.href, pathname);
          return (
            <li key={link.href}>
              <Link
                href={link.href}
                aria-current={current ? 'page' : undefined}
                className={`relative flex min-h-12 items-center border-b-4 px-3 text-base font-semibold ${
                  current
                    ? 'border-brass-400 text-white'
                    : 'border-transparent text-ink-200 hover:border-ink-400 hover:text-white'
                }`}
              >
                {link.label}
                <PendingBar />
              </Link>
            </li>
          );
        })}
      </ul>
    </nav>
  );
}
