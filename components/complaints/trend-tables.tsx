import Link from 'next/link';
import type { ReactNode } from 'react';
import type { ComplaintTrendsDto } from '@/lib/complaints/trending';

/*
 * The trend tables: by category, product and lot, each with its count, the units shipped behind its
 * rate and the rate per million. Repeat lots carry a written flag, not a colour alone.
 */

const count = new Intl.NumberFormat('en-US');
const th = 'px-3 py-2 font-semibold';
const td = 'px-3 py-2';

function Rate({ value }: { value: number | null }) {
  return value === null ? <span className="text-ink-600">No units shipped on record</span> : <span className="tabular-nums">{value.toFixed(2)}</span>;
}

function TableShell({ caption, minWidth, head, children }: { caption: string; minWidth: string; head: ReactNode; children: ReactNode }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-ink-200 bg-white">
      <table className={`w-full ${minWidth} border-collapse text-left`}>
        <caption className="sr-only">{caption}</caption>
        <thead className="bg-ink-100 text-sm text-ink-700">
          <tr>{head}</tr>
        </thead>
        <tbody>{children}</tbody>
      </table>
    </div>
  );
}

function Empty({ children }: { children: ReactNode }) {
  return <p className="rounded-md border border-dashed border-ink-300 bg-white px-4 py-3 text-ink-600">{children}</p>;
}

export function CategoryTable({ trends }: { trends: ComplaintTrendsDto }) {
  if (trends.categories.length === 0) return <Empty>No complaints received in these months.</Empty>;
  return (
    <TableShell
      caption="Complaints by category"
      minWidth="min-w-[36rem]"
      head={
        <>
          <th scope="col" className={th}>Category</th>
          <th scope="col" className={`${th} text-right`}>Complaints</th>
          <th scope="col" className={`${th} text-right`}>Adverse events (serious)</th>
          <th scope="col" className={`${th} text-right`}>Per million units</th>
        </>
      }
    >
      {trends.categories.map((c) => (
        <tr key={c.category ?? '(none)'} className="border-t border-ink-200">
          <th scope="row" className={`${td} font-semibold`}>
            {c.category === null ? <em className="font-semibold">{c.label}</em> : c.label}
          </th>
          <td className={`${td} text-right tabular-nums`}>{c.complaints}</td>
          <td className={`${td} text-right tabular-nums`}>
            {c.adverseEvents} ({c.seriousAdverseEvents})
          </td>
          <td className={`${td} text-right`}>
            <Rate value={c.ratePerMillion} />
          </td>
        </tr>
      ))}
    </TableShell>
  );
}

export function ProductTable({ trends }: { trends: ComplaintTrendsDto }) {
  if (trends.products.length === 0) return <Empty>No complaints and no lots made in these months.</Empty>;
  return (
    <TableShell
      caption="Complaints by product"
      minWidth="min-w-[40rem]"
      head={
        <>
          <th scope="col" className={th}>Product</th>
          <th scope="col" className={`${th} text-right`}>Complaints</th>
          <th scope="col" className={`${th} text-right`}>Lots made</th>
          <th scope="col" className={`${th} text-right`}>Units shipped</th>
          <th scope="col" className={`${th} text-right`}>Per million units</th>
        </>
      }
    >
      {trends.products.map((p) => (
        <tr key={p.productId ?? '(none)'} className="border-t border-ink-200">
          <th scope="row" className={`${td} font-semibold`}>
            <span className="block">{p.label}</span>
            {p.code ? <span className="block text-sm font-normal text-ink-600">{p.code}</span> : null}
          </th>
          <td className={`${td} text-right tabular-nums`}>{p.complaints}</td>
          <td className={`${td} text-right tabular-nums`}>{p.productId === null ? '—' : p.lotsMade}</td>
          <td className={`${td} text-right tabular-nums`}>{p.productId === null ? '—' : count.format(p.units)}</td>
          <td className={`${td} text-right`}>
            {p.productId === null ? <span className="text-ink-600">No product to divide by</span> : <Rate value={p.ratePerMillion} />}
          </td>
        </tr>
      ))}
    </TableShell>
  );
}

export function LotTable({ trends, lotHref }: { trends: ComplaintTrendsDto; lotHref?: (lotNumber: string) => string }) {
  const { lots, unmatched } = trends;
  return (
    <div className="flex flex-col gap-3">
      {lots.length === 0 ? (
        <Empty>No complaint in these months names a lot on record.</Empty>
      ) : (
        <TableShell
          caption="Complaints by lot; lots with more than one complaint are flagged"
          minWidth="min-w-[48rem]"
          head={
            <>
              <th scope="col" className={th}>Lot</th>
              <th scope="col" className={th}>Product</th>
              <th scope="col" className={th}>Made on</th>
              <th scope="col" className={`${th} text-right`}>Units shipped</th>
              <th scope="col" className={`${th} text-right`}>Complaints (all)</th>
              <th scope="col" className={`${th} text-right`}>Per million units</th>
            </>
          }
        >
          {lots.map((l) => (
            <tr key={l.batchId} className={`border-t border-ink-200 ${l.repeat ? 'bg-warn-100' : ''}`}>
              <th scope="row" className={`${td} font-semibold whitespace-nowrap`}>
                {lotHref ? (
                  <Link href={lotHref(l.lotNumber)} className="inline-flex min-h-11 items-center underline underline-offset-4">
                    {l.lotNumber}
                  </Link>
                ) : (
                  l.lotNumber
                )}
                {l.repeat ? (
                  <span className="ml-2 inline-flex items-center gap-1 rounded-full border border-warn-700 bg-white px-2 text-sm font-semibold text-warn-700">
                    <span aria-hidden="true">⚑</span> Repeat lot
                  </span>
                ) : null}
              </th>
              <td className={td}>
                <span className="block">{l.productName}</span>
                <span className="block text-sm text-ink-600">{l.productCode}</span>
              </td>
              <td className={`${td} whitespace-nowrap tabular-nums`}>{l.manufacturedOn}</td>
              <td className={`${td} text-right tabular-nums`}>{count.format(l.unitsShipped)}</td>
              <td className={`${td} text-right tabular-nums`}>
                {l.complaints} ({l.complaintsAllTime})
              </td>
              <td className={`${td} text-right`}>
                <Rate value={l.ratePerMillion} />
              </td>
            </tr>
          ))}
        </TableShell>
      )}
      {trends.lotsWithComplaints > lots.length ? (
        <p className="text-sm text-ink-700">
          Showing the {lots.length} lots with the most complaints of {trends.lotsWithComplaints}; narrow the months to see the rest.
        </p>
      ) : null}
      <div className="rounded-md border border-ink-200 bg-white px-4 py-3">
        <h3 className="font-semibold">Lot not matched</h3>
        {unmatched.lotNotMatched + unmatched.noLotGiven === 0 ? (
          <p className="text-ink-700">{trends.totals.complaints === 0 ? 'None.' : 'Every complaint in these months names a lot on record.'}</p>
        ) : (
          <>
            <p className="text-ink-700">
              {unmatched.lotNotMatched} complaint{unmatched.lotNotMatched === 1 ? '' : 's'} gave a lot that matches no batch record;{' '}
              {unmatched.noLotGiven} gave no lot. They count in the months, categories and products, not in any lot.
            </p>
            {unmatched.reported.length > 0 ? (
              <ul className="mt-2 flex flex-wrap gap-2 text-sm">
                {unmatched.reported.map((r) => (
                  <li key={r.lot} className="rounded-full border border-ink-300 px-3 py-1">
                    <span className="font-semibold">{r.lot}</span> × {r.complaints}
                  </li>
                ))}
              </ul>
            ) : null}
          </>
        )}
      </div>
    </div>
  );
}
