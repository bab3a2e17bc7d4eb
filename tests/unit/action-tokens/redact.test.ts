import { randomBytes } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { redactTokenLinks, redactedTokenText } from '../../../lib/action-tokens/redact';

/* OWASP guidance for one-time URL tokens (from memory): a used or stored copy must not be replayable. */

describe('redactTokenLinks', () => {
  const token = randomBytes(32).toString('base64url');

  it('removes the token from review links in the text and HTML parts, keeping the rest', () => {
    const text = `Review: http://localhost:3000/review/${token}\nIt works once.`;
    expect(redactTokenLinks(text)).toBe(`Review: http://localhost:3000/review/${redactedTokenText}\nIt works once.`);
    const html = `<a href="http://localhost:3000/review/${token}">Review</a>`;
    expect(redactTokenLinks(html)).not.toContain(token);
  });

  it('leaves other links and longer strings alone', () => {
    expect(redactTokenLinks('http://localhost:3000/capa/12')).toBe('http://localhost:3000/capa/12');
    const longer = `/review/${token}x`;
    expect(redactTokenLinks(longer)).toBe(longer);
  });
});
