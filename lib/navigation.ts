import type { Actor, Permission } from './auth/permissions';
import { can } from './auth/permissions';

/*
 * The main navigation, in one table: each entry is shown only to roles holding its read permission.
 * The page behind each entry guards itself with the same permission; hiding a link is never the check.
 */

export interface NavEntry {
  href: string;
  label: string;
  permission: Permission;
  /** One line for the overview page. */
  description: string;
}

export const navEntries: readonly NavEntry[] = [
  {
    href: '/deviations',
    label: 'Deviations',
    permission: 'deviation.read',
    description: 'Departures from procedure, from report to closure.',
  },
  {
    href: '/capa',
    label: 'CAPA',
    permission: 'capa.read',
    description: 'Corrective and preventive actions and their effectiveness checks.',
  },
  {
    href: '/complaints',
    label: 'Complaints',
    permission: 'complaint.read',
    description: 'Customer complaints, reportability and responses.',
  },
  { href: '/batches', label: 'Batches', permission: 'batch.read', description: 'Lots filled on the lines and their status.' },
  {
    href: '/equipment',
    label: 'Equipment',
    permission: 'equipment.read',
    description: 'Filling machines and their filling rings.',
  },
  {
    href: '/weight-checks',
    label: 'Weight checks',
    permission: 'weight_check.read',
    description: 'In-process fill weights of capsule samples.',
  },
  { href: '/admin', label: 'Admin', permission: 'users.manage', description: 'People, roles and access.' },
];

export function navEntriesFor(actor: Actor): NavEntry[] {
  return navEntries.filter((entry) => can(actor, entry.permission));
}

/** Whether `pathname` is the entry's page or one of its sub-pages. */
export function isCurrentSection(entryHref: string, pathname: string): boolean {
  return pathname === entryHref || pathname.startsWith(`${entryHref}/`);
}

/**
 * A return address after sign-in, kept on this site: only a path starting with a single "/", so
 * "//evil.example" and "https://…" fall back to the overview (an open redirect would let a link
 * send someone to a look-alike sign-in page).
 */
export function safeReturnPath(value: unknown, fallback = '/'): string {
  if (typeof value !== 'string' || value.length === 0 || value.length > 2000) return fallback;
  if (!value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return fallback;
  if (/[\u0000-\u001f\\]/.test(value)) return fallback;
  const url = new URL(value, 'http://plumbline.invalid');
  if (url.origin !== 'http://plumbline.invalid') return fallback;
  if (url.pathname === '/sign-in') return fallback;
  return `${url.pathname}${url.search}${url.hash}`;
}
