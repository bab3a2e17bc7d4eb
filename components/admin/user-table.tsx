import Link from 'next/link';
import { formatUtc } from '@/components/ui/format';
import { ActiveBadge, LockBadge } from './user-status';

export interface UserRowView {
  id: number;
  name: string;
  title: string;
  email: string;
  roleLabel: string;
  active: boolean;
  mustChangePassword: boolean;
  lockedUntil: string | null;
  lastSigninAt: string | null;
}

export function UserTable({ users, now }: { users: readonly UserRowView[]; now: Date }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-ink-200 bg-white">
      <table className="w-full min-w-[52rem] border-collapse text-left">
        <caption className="sr-only">User accounts</caption>
        <thead className="bg-ink-100 text-sm text-ink-700">
          <tr>
            <th scope="col" className="px-4 py-3 font-semibold">Name</th>
            <th scope="col" className="px-4 py-3 font-semibold">E-mail</th>
            <th scope="col" className="px-4 py-3 font-semibold">Role</th>
            <th scope="col" className="px-4 py-3 font-semibold">Account</th>
            <th scope="col" className="px-4 py-3 font-semibold">Locked until</th>
            <th scope="col" className="px-4 py-3 font-semibold">Last sign-in</th>
          </tr>
        </thead>
        <tbody>
          {users.map((u) => (
            <tr key={u.id} className="border-t border-ink-200">
              <th scope="row" className="px-4 py-2 font-normal">
                <Link
                  href={`/admin/users/${u.id}`}
                  className="inline-flex min-h-11 flex-col justify-center font-semibold text-ink-900 underline underline-offset-4"
                >
                  {u.name}
                </Link>
                {u.title ? <span className="block text-sm text-ink-600">{u.title}</span> : null}
              </th>
              <td className="px-4 py-2 break-all">{u.email}</td>
              <td className="px-4 py-2">{u.roleLabel}</td>
              <td className="px-4 py-2">
                <ActiveBadge active={u.active} />
                {u.mustChangePassword ? (
                  <span className="mt-1 block text-sm text-ink-700">Temporary password: must choose their own</span>
                ) : null}
              </td>
              <td className="px-4 py-2">
                <LockBadge lockedUntil={u.lockedUntil} now={now} />
              </td>
              <td className="px-4 py-2 whitespace-nowrap tabular-nums">
                {u.lastSigninAt ? formatUtc(u.lastSigninAt) : <span className="text-ink-600">Never</span>}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
