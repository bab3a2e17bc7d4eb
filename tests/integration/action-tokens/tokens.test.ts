import { eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { db } from '@/db/client';
import { actionTokens } from '@/db/schema';
import { checkActionToken, consumeActionToken, hashToken, issueActionToken, type TokenBinding } from '@/lib/action-tokens';
import { makeUser } from '../support/fixtures';

/*
 * One-time approval links. The rules follow the OWASP Forgot Password Cheat Sheet's guidance for URL
 * tokens (cryptographically random, single use, expiring, stored hashed; from memory) and issue 5
 * (at least 128 random bits, bound to reviewer, record, action and version, 7 days by default).
 */

let nextRecord = 900_000 + Math.floor(Math.random() * 90_000);
const binding = (userId: number, version = 4): TokenBinding => ({ userId, recordType: 'capa', recordId: nextRecord++, action: 'effectiveness', recordVersion: version });
const versionIs = (v: number | null) => async () => v;

describe('action tokens', () => {
  it('issues 256 random bits, stores only their SHA-256 and expires after the site setting (7 days by default)', async () => {
    const reviewer = await makeUser('qa_approver');
    const now = new Date('2030-01-10T12:00:00Z');
    const b = binding(reviewer.id);
    const { token, expiresAt } = await issueActionToken(db, b, now);
    expect(Buffer.from(token, 'base64url')).toHaveLength(32);
    expect(expiresAt.toISOString()).toBe('2030-01-17T12:00:00.000Z');
    const rows = await db.select().from(actionTokens).where(eq(actionTokens.tokenHash, hashToken(token)));
    expect(rows).toHaveLength(1);
    expect(JSON.stringify(rows)).not.toContain(token);

    const ok = await checkActionToken(db, token, reviewer.id, versionIs(4), now);
    expect(ok.ok).toBe(true);
  });

  it('refuses another user, a changed record, an expired link and a malformed one, saying which', async () => {
    const reviewer = await makeUser('qa_approver');
    const other = await makeUser('qa_approver');
    const now = new Date('2030-02-01T08:00:00Z');
    const { token } = await issueActionToken(db, binding(reviewer.id), now);
    expect(await checkActionToken(db, token, other.id, versionIs(4), now)).toEqual({ ok: false, problem: 'other_user', binding: null });
    expect((await checkActionToken(db, token, reviewer.id, versionIs(5), now)) as { problem?: string }).toMatchObject({ problem: 'record_changed' });
    expect((await checkActionToken(db, token, reviewer.id, versionIs(null), now)) as { problem?: string }).toMatchObject({ problem: 'record_changed' });
    const later = new Date(now.getTime() + 7 * 86_400_000);
    expect((await checkActionToken(db, token, reviewer.id, versionIs(4), later)) as { problem?: string }).toMatchObject({ problem: 'expired' });
    expect(await checkActionToken(db, token.slice(0, 40), reviewer.id, versionIs(4), now)).toMatchObject({ ok: false, problem: 'unknown' });
    expect(await checkActionToken(db, 'A'.repeat(43), reviewer.id, versionIs(4), now)).toMatchObject({ ok: false, problem: 'unknown' });
  });

  it('works once: the second use, even at the same moment, is refused', async () => {
    const reviewer = await makeUser('qa_approver');
    const now = new Date('2030-03-01T08:00:00Z');
    const { token } = await issueActionToken(db, binding(reviewer.id), now);
    const check = await checkActionToken(db, token, reviewer.id, versionIs(4), now);
    if (!check.ok) throw new Error('expected a usable token');
    const results = await Promise.all([
      db.transaction((tx) => consumeActionToken(tx, check.tokenId, now)),
      db.transaction((tx) => consumeActionToken(tx, check.tokenId, now)),
    ]);
    expect(results.filter(Boolean)).toHaveLength(1);
    expect(await checkActionToken(db, token, reviewer.id, versionIs(4), now)).toMatchObject({ ok: false, problem: 'used' });
  });

  it('revokes the older link when a fresh one is issued for the same decision', async () => {
    const reviewer = await makeUser('qa_approver');
    const now = new Date('2030-04-01T08:00:00Z');
    const b = binding(reviewer.id);
    const first = await issueActionToken(db, b, now);
    const second = await issueActionToken(db, b, now);
    expect(await checkActionToken(db, first.token, reviewer.id, versionIs(4), now)).toMatchObject({ ok: false, problem: 'revoked' });
    expect((await checkActionToken(db, second.token, reviewer.id, versionIs(4), now)).ok).toBe(true);
  });

  it('issues links for several records at the same moment without the database aborting any of them', async () => {
    // Several CAPAs entering their effectiveness check together each mail the same approvers. Each
    // issue runs in its own plain transaction here (no retry), the way a deadlock would surface.
    const reviewer = await makeUser('qa_approver');
    const now = new Date('2030-04-01T08:00:00Z');
    const outcomes = await Promise.allSettled(
      Array.from({ length: 12 }, () => binding(reviewer.id)).map((b) =>
        db.transaction(async (tx) => {
          await issueActionToken(tx, b, now);
          await issueActionToken(tx, { ...b, userId: reviewer.id }, now);
        }),
      ),
    );
    const failures = outcomes.filter((o) => o.status === 'rejected').map((o) => String((o as PromiseRejectedResult).reason?.cause?.code ?? o));
    expect(failures).toEqual([]);
  });
});
