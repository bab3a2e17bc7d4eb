import Link from 'next/link';

/*
 * Page links for a server-paged list. `hrefFor` builds each page's URL so the page number lives in
 * the address and a view can be bookmarked. Shows first, last and a window around the current page.
 */

function pagesToShow(current: number, last: number): (number | 'gap')[] {
  const wanted = new Set([1, last, current - 1, current, current + 1].filter((p) => p >= 1 && p <= last));
  const sorted = [...wanted].sort((a, b) => a - b);
  const out: (number | 'gap')[] = [];
  sorted.forEach((p, i) => {
    if (i > 0 && p - sorted[i - 1]! > 1) out.push('gap');
    out.push(p);
  });
  return out;
}

const linkClasses =
  'inline-flex min-h-11 min-w-11 items-center justify-center rounded-md border px-3 font-semibold';

export function Pagination({
  page,
  pageSize,
  total,
  hrefFor,
  label = 'Pages',
}: {
  page: number;
  pageSize: number;
  total: number;
  hrefFor: (page: number) => string;
  label?: string;
}) {
  const last = Math.max(1, Math.ceil(total / pageSize));
  if (last <= 1) return null;
  return (
    <nav aria-label={label} className="mt-4">
      <ul className="flex flex-wrap items-center gap-2">
        {page > 1 ? (
          <li>
            <Link href={hrefFor(page - 1)} className={`${linkClasses} border-ink-400 bg-white hover:bg-ink-100`}>
              <span aria-hidden="true">←</span>&nbsp;Previous
            </Link>
          </li>
        ) : null}
        {pagesToShow(Math.min(page, last), last).map((p, i) =>
          p === 'gap' ? (
            <li key={`gap-${i}`} aria-hidden="true" className="px-1 text-ink-500">
              …
            </li>
          ) : (
            <li key={p}>
              <Link
                href={hrefFor(p)}
                aria-current={p === page ? 'page' : undefined}
                aria-label={`Page ${p}`}
                className={`${linkClasses} ${
                  p === page ? 'border-ink-900 bg-ink-900 text-white' : 'border-ink-400 bg-white hover:bg-ink-100'
                }`}
              >
                {p}
              </Link>
            </li>
          ),
        )}
        {page < last ? (
          <li>
            <Link href={hrefFor(page + 1)} className={`${linkClasses} border-ink-400 bg-white hover:bg-ink-100`}>
              Next&nbsp;<span aria-hidden="true">→</span>
            </Link>
          </li>
        ) : null}
      </ul>
    </nav>
  );
}
