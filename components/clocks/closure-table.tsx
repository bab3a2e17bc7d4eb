import type { AdminFormState } from '@/components/admin/form-state';
import { StatusBadge } from '@/components/ui/status-badge';
import { formatLongDate } from '@/lib/clocks';
import { DeactivateClosureForm } from './calendar-forms';

export interface ClosureRow {
  day: string;
  description: string;
  active: boolean;
  createdByName: string;
}

export function ClosureTable({
  closures,
  deactivateAction,
}: {
  closures: readonly ClosureRow[];
  deactivateAction: (previous: AdminFormState, formData: FormData) => Promise<AdminFormState>;
}) {
  if (closures.length === 0) return <p className="text-ink-600">No site closures in this period.</p>;
  return (
    <div className="overflow-x-auto">
      <table className="w-full min-w-[36rem] border-collapse text-left">
        <caption className="sr-only">Site closures</caption>
        <thead>
          <tr className="border-b border-ink-300 text-sm text-ink-600">
            <th scope="col" className="py-2 pr-4 font-semibold">Day</th>
            <th scope="col" className="py-2 pr-4 font-semibold">Description</th>
            <th scope="col" className="py-2 pr-4 font-semibold">Status</th>
            <th scope="col" className="py-2 pr-4 font-semibold">
              <span className="sr-only">Actions</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {closures.map((c) => (
            <tr key={c.day} className="border-b border-ink-100 align-top">
              <th scope="row" className="py-2 pr-4 font-semibold">
                {formatLongDate(c.day)}
              </th>
              <td className="py-2 pr-4">
                {c.description}
                <span className="block text-sm text-ink-600">Added by {c.createdByName}</span>
              </td>
              <td className="py-2 pr-4">
                <StatusBadge tone={c.active ? 'info' : 'neutral'} label={c.active ? 'Site closed' : 'Inactive'} />
              </td>
              <td className="py-2 pr-4">
                {c.active ? <DeactivateClosureForm action={deactivateAction} day={c.day} label={formatLongDate(c.day)} /> : null}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
