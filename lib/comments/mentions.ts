import { z } from 'zod';

/*
 * Comments are plain text. A person is mentioned by writing @ and the part of their e-mail address
 * before the @ (e.g. @investigator2), or the whole address when two people share that part. Pure,
 * so the comment form can show who will be told before sending.
 */

export const maxCommentLength = 5000;
export const maxMentions = 20;

export const commentBodySchema = z.object({
  body: z
    .string({ error: 'Write a comment.' })
    .trim()
    .min(1, 'Write a comment.')
    .max(maxCommentLength, `A comment holds at most ${maxCommentLength.toLocaleString('en')} characters.`),
});
export type CommentBodyInput = z.input<typeof commentBodySchema>;

// An @ that starts a word (not the middle of an address someone typed out), then a local part and
// optionally a domain with at least one dot.
const mentionPattern = /(^|[^A-Za-z0-9._%+\-@])@([A-Za-z0-9._%+-]+(?:@[A-Za-z0-9-]+(?:\.[A-Za-z0-9-]+)+)?)/g;

/** The handles mentioned, lower case, each once, in the order written; a full stop ending a sentence is not part of one. */
export function extractMentions(body: string): string[] {
  const seen = new Set<string>();
  for (const match of body.matchAll(mentionPattern)) {
    const handle = match[2]!.replace(/\.+$/, '').toLowerCase();
    if (handle !== '') seen.add(handle);
  }
  return [...seen];
}

/** What to write after the @ for a person: the part of their address before the @. */
export function mentionHandle(email: string): string {
  return email.slice(0, email.indexOf('@')).toLowerCase();
}
