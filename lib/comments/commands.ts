import 'server-only';
import { and, eq, like } from 'drizzle-orm';
import type { Tx } from '../../db/client';
import { comments, users } from '../../db/schema';
import { getRecordAccess, type RecordAccess } from '../attachments/record-access';
import { getEnv } from '../env';
import { NotFoundError, ValidationError } from '../errors';
import { enqueueMail } from '../mail/outbox';
import { renderMailLayout } from '../mail/templates/layout';
import { evidenceKinds, isEvidenceRecordType, missingNoun } from '../record-kinds';
import type { RecordActor } from '../records/kind';
import { editRecord } from '../records/write-path';
import type { RecordType } from '../records/types';
import { parseInput } from '../validation/parse';
import { type CommentBodyInput, commentBodySchema, extractMentions, maxMentions } from './mentions';
import type { CommentDto } from './queries';

/*
 * Adding a comment: anyone who may see the record may comment on it, in any state (a closed record
 * still gathers questions). The comment, its audit entry and one e-mail per person mentioned are
 * written in one transaction, so a mention is mailed if and only if the comment is kept. Comments
 * are never edited or deleted (21 CFR 11.10(e): the record of what was said stays as it was said).
 */

export interface AddCommentInput extends CommentBodyInput {
  recordType: RecordType;
  recordId: number;
}

interface Mentioned {
  id: number;
  name: string;
  email: string;
}

const escapeLike = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

/** Each handle must be exactly one active person who may read the record; every problem is reported at once. */
async function resolveMentions(tx: Tx, handles: string[], access: RecordAccess): Promise<Mentioned[]> {
  if (handles.length > maxMentions) {
    throw new ValidationError('Too many people mentioned.', { body: [`Mention at most ${maxMentions} people in one comment.`] });
  }
  const problems: string[] = [];
  const found = new Map<number, Mentioned>();
  for (const handle of handles) {
    const people = await tx
      .select({ id: users.id, name: users.name, email: users.email, role: users.role })
      .from(users)
      .where(
        and(
          eq(users.active, true),
          handle.includes('@') ? eq(users.email, handle) : like(users.email, `${escapeLike(handle)}@%`),
        ),
      )
      .limit(5);
    if (people.length === 0) problems.push(`Nobody with an active account is @${handle}. Pick people from the list.`);
    else if (people.length > 1) problems.push(`@${handle} fits several people; write their whole e-mail address after the @.`);
    else if (!access.readableBy(people[0]!)) problems.push(`${people[0]!.name} (@${handle}) cannot see this record, so they cannot be mentioned.`);
    else found.set(people[0]!.id, { id: people[0]!.id, name: people[0]!.name, email: people[0]!.email });
  }
  if (problems.length > 0) throw new ValidationError('Check the people mentioned.', { body: problems });
  return [...found.values()];
}

function excerpt(body: string): string {
  return body.length <= 1200 ? body : `${body.slice(0, 1200)}…`;
}

export async function addComment(actor: RecordActor, raw: AddCommentInput): Promise<CommentDto> {
  const { body } = parseInput(commentBodySchema, raw);
  const { recordType, recordId } = raw;
  const handles = extractMentions(body);
  if (!isEvidenceRecordType(recordType)) throw new NotFoundError(missingNoun(recordType));

  // On the record's own write path (its "comments" section): a comment needs only that the person
  // may see the record, in any state, and does not change its version.
  const outcome = await editRecord(evidenceKinds[recordType].kind, {
    id: recordId,
    section: 'comments',
    actor,
    expectedVersion: null,
    action: 'comment',
    async apply(_row, { tx }) {
      const access = await getRecordAccess(tx, recordType, recordId, actor);
      const mentioned = await resolveMentions(tx, handles, access);
      const [row] = await tx.insert(comments).values({ recordType, recordId, userId: actor.id, body }).$returningId();
      const id = row!.id;

      const env = getEnv();
      const url = new URL(`${access.path}#comments`, env.APP_URL).toString();
      for (const person of mentioned) {
        // The writer knows what they wrote.
        if (person.id === actor.id) continue;
        const mail = renderMailLayout({
          siteName: env.SITE_NAME,
          recordNumber: access.label,
          heading: `${actor.name} mentioned you`,
          paragraphs: [`${actor.name} mentioned you in a comment on “${access.title}”:`, excerpt(body)],
          link: { url, label: 'Open the comments' },
          footer: 'You get this message because someone mentioned you with @. Replies are not read; answer in the comments.',
        });
        await enqueueMail(tx, {
          dedupeKey: `comment:${id}:mention:${person.id}`,
          template: 'comment_mention',
          to: { address: person.email, userId: person.id },
          subject: `${access.label}: ${actor.name} mentioned you`,
          text: mail.text,
          html: mail.html,
          recordType,
          recordId,
        });
      }
      const [saved] = await tx.select({ at: comments.createdAt }).from(comments).where(eq(comments.id, id));
      return {
        audit: [{ field: 'comment', from: null, to: { id, body, mentions: mentioned.map((m) => ({ id: m.id, name: m.name })) } }],
        result: { id, userId: actor.id, userName: actor.name, body, at: saved!.at.toISOString() } satisfies CommentDto,
      };
    },
  });
  return outcome.result!;
}
