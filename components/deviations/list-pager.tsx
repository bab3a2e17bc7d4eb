'use client';

/*
 * Page links for the deviation list. Each is a real link (so paging works without JavaScript and
 * opens in a new tab); a plain click is handed to the table, which fetches the page in place.
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

const linkClasses = 'inline-flex min-h-11 min-w-11 items-center justify-center rounded-md border px-3 font-semibold';

export function ListPager({
  page,
  pageCount,
  hrefFor,
  onGo,
}: {
  page: number;
  pageCount: number;
  hrefFor: (page: number) => string;
  onGo: (page: number) => void;
}) {
  if (pageCount <= 1) return null;
  const go = (p: number) => (event: React.MouseEvent<HTMLAnchorElement>) => {
    if (event.metaKey || event.ctrlKey || event.shiftKey || event.button !== 0) return;
    event.preventDefault();
    onGo(p);
  };
  const idle = `${linkClasses} border-ink-400 bg-white hover:bg-ink-100`;
  return (
    <nav aria-label="Deviation list pages" className="mt-4">
      <ul className="flex flex-wrap items-center gap-2">
        {page > 1 ? (
          <li>
            <a href={hrefFor(page - 1)} onClick={go(page - 1)} className={idle}>
              <span aria-hidden="true">←</span>&nbsp;Previous
            </a>
          </li>
        ) : null}
        {pagesToShow(Math.min(page, pageCount), pageCount).map((p, i) =>
          p === 'gap' ? (
            <li key={`gap-${i}`} aria-hidden="true" className="px-1 text-ink-500">
              …
            </li>
          ) : (
            <li key={p}>
              <a
                href={hrefFor(p)}
                onClick={go(p)}
                aria-current={p === page ? 'page' : undefined}
                aria-label={`Page ${p}`}
                className={p === page ? `${linkClasses} border-ink-900 bg-ink-900 text-white` : idle}
              >
                {p}
              </a>
            </li>
          ),
        )}
        {page < pageCount ? (
          <li>
            <a href={hrefFor(page + 1)} onClick={go(page + 1)} className={idle}>
              Next&nbsp;<span aria-hidden="true">→</span>
            </a>
          </li>
        ) : null}
      </ul>
    </nav>
  );
}
