/*
 * A message carrying a one-time link keeps it in the outbox only until it is sent: the sent copy on
 * record says where the link pointed but no longer holds the token, so a database reader cannot use
 * it. (The token's hash stays in action_tokens; the reviewer's e-mail holds the only usable copy.)
 */

const tokenLink = /(\/review\/)[A-Za-z0-9_-]{43}(?![A-Za-z0-9_-])/g;

export const redactedTokenText = '[one-time link, removed once sent]';

export function redactTokenLinks(body: string): string {
  return body.replace(tokenLink, `$1${redactedTokenText}`);
}
