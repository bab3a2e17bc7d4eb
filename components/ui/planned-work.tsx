import type { ReactNode } from 'react';
import { PageHeader } from './page-header';

/*
 * For a section whose records arrive with later work: says plainly what will be here and offers no
 * controls, so nobody mistakes it for a working screen.
 */

export function PlannedWork({
  title,
  summary,
  coming,
  children,
}: {
  title: string;
  summary: string;
  coming: readonly string[];
  children?: ReactNode;
}) {
  return (
    <>
      <PageHeader title={title} description={summary} />
      <section
        aria-labelledby="planned-heading"
        className="max-w-3xl rounded-lg border border-dashed border-ink-400 bg-white p-6"
      >
        <h2 id="planned-heading" className="text-lg font-semibold">
          Not available yet
        </h2>
        <p className="mt-1 text-ink-700">
          This part of Plumbline is being built. Nothing here can be created or changed yet; keep using the
          site&apos;s current procedure until it is released.
        </p>
        <p className="mt-4 font-semibold">What this section will hold:</p>
        <ul className="mt-2 list-disc space-y-1 pl-6 text-ink-800">
          {coming.map((item) => (
            <li key={item}>{item}</li>
          ))}
        </ul>
        {children}
      </section>
    </>
  );
}
