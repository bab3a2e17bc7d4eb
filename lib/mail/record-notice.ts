import 'server-only';
import { and, eq, inArray } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { users } from '../../db/schema';
import type { Role } from '../auth/roles';
import { getEnv } from '../env';
import type { RecordType } from '../records/types';
import { enqueueMail } from './outbox';
import { renderMailLayout } from './templates/layout';

/*
 * A notice to staff about a record (assigned to you, awaits your approval, closed ...): one message
 * per recipient, queued in the caller's transaction so it goes out if and only if the change
 * commits. Notices name the record and link to its page; the page shows whatever the reader may see.
 * The person who acted knows already, and nobody gets two copies.
 */

export interface Recipient {
  id: number;
  email: string;
}

export interface NoticedRecord {
  recordType: RecordType;
  id: number;
  version: number;
  /** e.g. "DEV-2026-0042". */
  label: string;
  /** The record's page in the app, e.g. "/deviations/42". */
  path: string;
  /** e.g. "Open the deviation". */
  linkLabel: string;
}

export interface Notice {
  /** Names the notice; with the record, its version and the recipient it keeps the outbox free of duplicates. */
  key: string;
  template: string;
  subject: string;
  heading: string;
  paragraphs: string[];
  footer: string;
}

export async function activeUsers(dbOrTx: DbOrTx, ids: readonly (number | null | undefined)[]): Promise<Recipient[]> {
  const wanted = [...new Set(ids.filter((i): i is number => typeof i === 'number'))];
  if (wanted.length === 0) return [];
  return dbOrTx
    .select({ id: users.id, email: users.email })
    .from(users)
    .where(and(inArray(users.id, wanted), eq(users.active, true)));
}

export async function activeUsersWithRole(dbOrTx: DbOrTx, roles: readonly Role[]): Promise<Recipient[]> {
  return dbOrTx
    .select({ id: users.id, email: users.email })
    .from(users)
    .where(and(eq(users.active, true), inArray(users.role, [...roles])));
}

export async function sendNotice(
  tx: DbOrTx,
  record: NoticedRecord,
  recipients: readonly Recipient[],
  actor: { id: number },
  notice: Notice,
): Promise<void> {
  const env = getEnv();
  const mail = renderMailLayout({
    siteName: env.SITE_NAME,
    recordNumber: record.label,
    heading: notice.heading,
    paragraphs: notice.paragraphs,
    link: { url: new URL(record.path, env.APP_URL).toString(), label: record.linkLabel },
    footer: notice.footer,
  });
  const seen = new Set<number>();
  for (const r of recipients) {
    if (r.id === actor.id || seen.has(r.id)) continue;
    seen.add(r.id);
    await enqueueMail(tx, {
      dedupeKey: `${notice.key}:${record.id}:v${record.version}:${r.id}`,
      template: notice.template,
      to: { address: r.email, userId: r.id },
      subject: notice.subject,
      text: mail.text,
      html: mail.html,
      recordType: record.recordType,
      recordId: record.id,
    });
  }
}
