import { redirect } from 'next/navigation';
import { requirePageUser } from '@/lib/auth/session';

/* Users are the only administration area so far; master data and settings will sit beside them. */
export default async function AdminPage() {
  await requirePageUser('users.manage', { returnTo: '/admin' });
  redirect('/admin/users');
}
