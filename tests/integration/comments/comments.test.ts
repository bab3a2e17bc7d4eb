import { and, asc, eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { auditEntries, comments, mailOutbox, users } from '@/db/schema';
import { addComment } from '@/lib/comments/commands';
import { mentionHandle } from '@/lib/comments/mentions';
import { listComments, listMentionOptions } from '@/lib/comments/queries';
import { createDraft, submitDeviation } from '@/lib/deviations/commands';
import { NotFoundError, ValidationError } from '@/lib/errors';
import { makeUser } from '../support/fixtures';

/*
 * Comments on deviations against MariaDB. Sources: 21 CFR 11.10(e) (each comment is an audit entry,
 * never edited or removed), EU GMP Annex 11 §12.1 (only people who may read the record see its
 * comments or are notified of it); mail through the transactional outbox is common practice.
 */

afterAll(closeDb);

const draftInput = {
  title: 'Split bodies on the outfeed (comment test)',
  whatHappened: 'Split capsule bodies seen at the outfeed; comment test.',
  occurredAt: new Date(Date.now() - 3_600_000),
  heldBatchIds: [],
};

async function reported() {
  const author = await makeUser('operator');
  const draft = await createDraft(author, draftInput);
  const { record } = await submitDeviation(author, { id: draft.record.id, version: draft.record.version });
  return { author, record };
}

const outboxFor = (recordId: number) =>
  db
    .select()
    .from(mailOutbox)
    .where(and(eq(mailOutbox.recordType, 'deviation'), eq(mailOutbox.recordId, recordId), eq(mailOutbox.template, 'comment_mention')))
    .orderBy(asc(mailOutbox.id));

const commentsOf = (recordId: number) =>
  db.select().from(comments).where(and(eq(comments.recordType, 'deviation'), eq(comments.recordId, recordId)));

const fieldErrorsOf = async (work: Promise<unknown>) => {
  const err = await work.catch((e: unknown) => e);
  expect(err).toBeInstanceOf(ValidationError);
  return (err as ValidationError).fieldErrors;
};

describe('adding a comment', () => {
  it('writes the comment and its audit entry, and queues exactly one e-mail per person mentioned (21 CFR 11.10(e))', async () => {
    const { author, record } = await reported();
    const [qa, approver] = await Promise.all([makeUser('qa_investigator'), makeUser('qa_approver')]);
    const h = mentionHandle(qa.email);
    const body = `@${h} the ring was changed at 09:40. @${mentionHandle(approver.email)}, FYI. @${h}, see the photo.`;
    const saved = await addComment(author, { recordType: 'deviation', recordId: record.id, body });

    expect(saved).toMatchObject({ userId: author.id, userName: author.name, body });
    expect(await commentsOf(record.id)).toHaveLength(1);
    const mails = await outboxFor(record.id);
    expect(mails.map((m) => m.toAddress).sort()).toEqual([qa.email, approver.email].sort());
    expect(mails.map((m) => m.dedupeKey).sort()).toEqual([`comment:${saved.id}:mention:${qa.id}`, `comment:${saved.id}:mention:${approver.id}`].sort());
    expect(mails[0]!.subject).toBe(`${record.number}: ${author.name} mentioned you`);
    expect(mails[0]!.textBody).toContain(`/deviations/${record.id}#comments`);
    expect(mails[0]!.htmlBody).toContain('the ring was changed at 09:40');

    const [entry] = await db
      .select()
      .from(auditEntries)
      .where(and(eq(auditEntries.recordType, 'deviation'), eq(auditEntries.recordId, record.id), eq(auditEntries.action, 'comment')));
    expect(JSON.parse(entry!.changes)).toEqual([
      { field: 'comment', from: null, to: { id: saved.id, body, mentions: expect.arrayContaining([{ id: qa.id, name: qa.name }, { id: approver.id, name: approver.name }]) } },
    ]);
  });

  it('takes a whole e-mail address after the @, and sends nobody a mail about their own mention', async () => {
    const { author, record } = await reported();
    const qa = await makeUser('qa_investigator');
    await addComment(author, { recordType: 'deviation', recordId: record.id, body: `Asking @${qa.email}. Note to self @${mentionHandle(author.email)}.` });
    expect((await outboxFor(record.id)).map((m) => m.toUserId)).toEqual([qa.id]);
  });

  it('refuses an unknown or inactive person, names them beside the text, and writes nothing', async () => {
    const { author, record } = await reported();
    const gone = await makeUser('qa_investigator');
    await db.update(users).set({ active: false }).where(eq(users.id, gone.id));
    const errors = await fieldErrorsOf(
      addComment(author, { recordType: 'deviation', recordId: record.id, body: `@nobody-by-this-name and @${mentionHandle(gone.email)} please look` }),
    );
    expect(errors.body).toEqual([
      'Nobody with an active account is @nobody-by-this-name. Pick people from the list.',
      `Nobody with an active account is @${mentionHandle(gone.email)}. Pick people from the list.`,
    ]);
    expect(await commentsOf(record.id)).toEqual([]);
    expect(await outboxFor(record.id)).toEqual([]);
  });

  it('refuses a mention of someone who cannot read the record: QA cannot see an operator\'s draft (Annex 11 §12.1)', async () => {
    const author = await makeUser('operator');
    const { record } = await createDraft(author, draftInput);
    const qa = await makeUser('qa_investigator');
    const errors = await fieldErrorsOf(addComment(author, { recordType: 'deviation', recordId: record.id, body: `@${mentionHandle(qa.email)} is this a deviation?` }));
    expect(errors.body).toEqual([`${qa.name} (@${mentionHandle(qa.email)}) cannot see this record, so they cannot be mentioned.`]);
  });

  it('asks for the whole address when two people share the part before the @', async () => {
    const { author, record } = await reported();
    const local = `twin-${Date.now().toString(36)}`;
    await db.insert(users).values([
      { email: `${local}@brackwater.example`, name: 'Twin One', role: 'qa_investigator', passwordHash: 'x' },
      { email: `${local}@lab.brackwater.example`, name: 'Twin Two', role: 'qa_investigator', passwordHash: 'x' },
    ]);
    const errors = await fieldErrorsOf(addComment(author, { recordType: 'deviation', recordId: record.id, body: `@${local} look` }));
    expect(errors.body).toEqual([`@${local} fits several people; write their whole e-mail address after the @.`]);
    await addComment(author, { recordType: 'deviation', recordId: record.id, body: `@${local}@lab.brackwater.example look` });
    expect((await outboxFor(record.id)).map((m) => m.toAddress)).toEqual([`${local}@lab.brackwater.example`]);
  });

  it('takes 1 to 5000 characters of text (common practice: bounded free text)', async () => {
    const { author, record } = await reported();
    expect((await fieldErrorsOf(addComment(author, { recordType: 'deviation', recordId: record.id, body: '   ' }))).body).toEqual(['Write a comment.']);
    expect((await fieldErrorsOf(addComment(author, { recordType: 'deviation', recordId: record.id, body: 'x'.repeat(5001) }))).body).toHaveLength(1);
    await addComment(author, { recordType: 'deviation', recordId: record.id, body: 'x'.repeat(5000) });
    expect(await commentsOf(record.id)).toHaveLength(1);
  });
});

describe('who may comment and read comments', () => {
  it('another operator cannot comment on or read the comments of someone\'s draft', async () => {
    const author = await makeUser('operator');
    const { record } = await createDraft(author, draftInput);
    await addComment(author, { recordType: 'deviation', recordId: record.id, body: 'Photos to follow.' });
    const other = await makeUser('operator');
    await expect(addComment(other, { recordType: 'deviation', recordId: record.id, body: 'Hello' })).rejects.toBeInstanceOf(NotFoundError);
    await expect(listComments('deviation', record.id, other)).rejects.toBeInstanceOf(NotFoundError);
  });

  it('every role that reads a reported deviation may comment on it, and sees all comments oldest first', async () => {
    const { author, record } = await reported();
    const [operator, admin] = await Promise.all([makeUser('operator'), makeUser('admin')]);
    await addComment(author, { recordType: 'deviation', recordId: record.id, body: 'First.' });
    await addComment(operator, { recordType: 'deviation', recordId: record.id, body: 'I saw it on line 2 too.' });
    await addComment(admin, { recordType: 'deviation', recordId: record.id, body: 'Account for the new operator is set up.' });
    const list = await listComments('deviation', record.id, operator);
    expect(list.map((c) => [c.userName, c.body])).toEqual([
      [author.name, 'First.'],
      [operator.name, 'I saw it on line 2 too.'],
      [admin.name, 'Account for the new operator is set up.'],
    ]);
  });

  it('offers as mentionable only active people who may read the record, never the writer', async () => {
    const author = await makeUser('operator');
    const { record } = await createDraft(author, draftInput);
    expect(await listMentionOptions('deviation', record.id, author)).toEqual([]);
    const { author: a2, record: r2 } = await reported();
    const options = await listMentionOptions('deviation', r2.id, a2);
    expect(options.some((o) => o.id === a2.id)).toBe(false);
    expect(options.some((o) => o.handle === 'investigator')).toBe(true);
  });
});
