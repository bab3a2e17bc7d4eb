import 'server-only';
import { and, asc, eq } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { comments, users } from '../../db/schema';
import type { Actor } from '../auth/permissions';
import { getRecordAccess } from '../attachments/record-access';
import type { RecordType } from '../records/types';
import { mentionHandle } from './mentions';

/*
 * Reading a record's comments: whoever may read the record reads all of them, oldest first (a
 * conversation). The shape matches TimelineComment in lib/records/timeline.ts, so the timeline can
 * take them as they are.
 */

export interface CommentDto {
  id: number;
  userId: number;
  userName: string;
  body: string;
  /** ISO 8601, UTC. */
  at: string;
}

export async function listComments(recordType: RecordType, recordId: number, viewer: Actor, dbOrTx: DbOrTx = db): Promise<CommentDto[]> {
  await getRecordAccess(dbOrTx, recordType, recordId, viewer);
  const rows = await dbOrTx
    .select({ id: comments.id, userId: comments.userId, userName: users.name, body: comments.body, at: comments.createdAt })
    .from(comments)
    .innerJoin(users, eq(users.id, comments.userId))
    .where(and(eq(comments.recordType, recordType), eq(comments.recordId, recordId)))
    .orderBy(asc(comments.id))
    .limit(500);
  return rows.map((r) => ({ ...r, at: r.at.toISOString() }));
}

export interface MentionOptionDto {
  id: number;
  name: string;
  /** What to write after the @. */
  handle: string;
  role: string;
}

/** Active people who may read the record: the ones a comment on it may mention. */
export async function listMentionOptions(recordType: RecordType, recordId: number, viewer: Actor, dbOrTx: DbOrTx = db): Promise<MentionOptionDto[]> {
  const access = await getRecordAccess(dbOrTx, recordType, recordId, viewer);
  const people = await dbOrTx
    .select({ id: users.id, name: users.name, email: users.email, role: users.role })
    .from(users)
    .where(eq(users.active, true))
    .orderBy(asc(users.name))
    .limit(1000);
  const handles = new Map<string, number>();
  for (const p of people) handles.set(mentionHandle(p.email), (handles.get(mentionHandle(p.email)) ?? 0) + 1);
  return people
    .filter((p) => p.id !== viewer.id && access.readableBy(p))
    .map((p) => ({ id: p.id, name: p.name, role: p.role, handle: handles.get(mentionHandle(p.email))! > 1 ? p.email.toLowerCase() : mentionHandle(p.email) }));
}
