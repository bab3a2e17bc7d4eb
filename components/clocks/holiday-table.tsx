import { formatLongDate, type FederalHoliday } from '@/lib/clocks';

/* Upcoming US federal holidays with the day they are observed (5 U.S.C. 6103). */
export function HolidayTable({ holidays }: { holidays: readonly FederalHoliday[] }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full min-w-[32rem] border-collapse text-left">
        <caption className="sr-only">Upcoming US federal holidays and the days they are observed</caption>
        <thead>
          <tr className="border-b border-ink-300 text-sm text-ink-600">
            <th scope="col" className="py-2 pr-4 font-semibold">Holiday</th>
            <th scope="col" className="py-2 pr-4 font-semibold">Observed (offices closed)</th>
            <th scope="col" className="py-2 pr-4 font-semibold">Date in law</th>
          </tr>
        </thead>
        <tbody>
          {holidays.map((h) => (
            <tr key={`${h.name}-${h.date}`} className="border-b border-ink-100 align-top">
              <th scope="row" className="py-2 pr-4 font-semibold">{h.name}</th>
              <td className="py-2 pr-4">{formatLongDate(h.observed)}</td>
              <td className="py-2 pr-4 text-ink-700">
                {h.observed === h.date ? 'Same day' : `${formatLongDate(h.date)}: a weekend, so observed on the nearest weekday`}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
