import Link from 'next/link';
import type { ReactNode } from 'react';

/* The body of the not-found, forbidden and error pages: what happened, and a way on. */

export function StatusPage({ code, title, children }: { code?: string; title: string; children?: ReactNode }) {
  return (
    <div className="mx-auto max-w-xl py-10">
      {code ? <p className="font-semibold tracking-wide text-brass-700">{code}</p> : null}
      <h1 className="mt-1 text-2xl font-bold tracking-tight sm:text-3xl">{title}</h1>
      <div className="mt-3 flex flex-col gap-3 text-ink-700">{children}</div>
      <p className="mt-6">
        <Link href="/" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
          Go to the overview
        </Link>
      </p>
    </div>
  );
}

export const forbiddenText = (
  <p>
    Your role does not give access to this page. If your work needs it, ask a Plumbline administrator at your site to
    review your role.
  </p>
);

export const notFoundText = (
  <p>There is no page at this address, or the record it points to does not exist. Check the link, or start from the overview.</p>
);
