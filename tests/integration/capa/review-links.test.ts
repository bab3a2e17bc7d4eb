import { randomBytes } from 'node:crypto';
import { and, asc, eq, ne } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { actionTokens, auditEntries, capaActions, capas, deviations, mailOutbox, signatures, users } from '@/db/schema';
import { checkActionToken, hashToken } from '@/lib/action-tokens';
import {
  addAction,
  approvePlan,
  cancelCapa,
  completeAction,
  createCapa,
  openEffectivenessCheck,
  startImplementation,
  updatePlan,
} from '@/lib/capa/commands';
import { openReviewLink, requestFreshReviewLink, signReviewDecision } from '@/lib/capa/review-by-link';
import { effectivenessReviewAction } from '@/lib/capa/review-links';
import { getEnv } from '@/lib/env';
import { ConflictError, ForbiddenError, InvalidTransitionError, ValidationError } from '@/lib/errors';
import { makeUser, testPassword } from '../support/fixtures';

/*
 * Effectiveness review links for CAPAs, against the real database. Sources beside each check:
 * 21 CFR 11.50 (a signed record shows name, date and time, meaning), 11.200(a) (a signature is the
 * password re-entered by its owner, every time), 11.300 (controls on identification codes and
 * passwords: a link is no substitute for the reviewer's own credentials), 11.10(e) (audit trail);
 * the OWASP Forgot Password Cheat Sheet's guidance for one-time URL tokens (random, single use,
 * expiring, bound to the user, stored hashed; from memory); issue 5 for the link's rules.
 */

afterAll(closeDb);

const unique = () => `${Date.now().toString(36)}${randomBytes(3).toString('hex')}`.toUpperCase();
const dayMs = 86_400_000;
const isoDay = (ms: number) => new Date(ms).toISOString().slice(0, 10);
const tokenIn = (text: string) => /\/review\/([A-Za-z0-9_-]{43})\b/.exec(text)?.[1] ?? null;
const capaRow = async (id: number) => (await db.select().from(capas).where(eq(capas.id, id)))[0]!;

async function makeDeviation(raisedBy: number): Promise<number> {
  const [row] = await db
    .insert(deviations)
    .values({
      number: `DEV-RL-${unique()}`.slice(0, 20),
      status: 'closed',
      title: 'Split caps on a test filler',
      whatHappened: 'Split caps found at the in-process check.',
      raisedBy,
      occurredAt: new Date(Date.now() - 30 * dayMs),
      rootCause: 'Cap segment worn beyond its limit.',
      capaRequired: true,
    })
    .$returningId();
  return row!.id;
}

/** A CAPA whose effectiveness check has just opened, with everything a review needs. */
async function capaInCheck() {
  const [owner, approver, approver2, operator] = await Promise.all([
    makeUser('qa_investigator'),
    makeUser('qa_approver'),
    makeUser('qa_approver'),
    makeUser('operator'),
  ]);
  const deviationId = await makeDeviation(operator.id);
  let r = (
    await createCapa(owner, {
      title: 'Stop split caps on the test filler',
      sourceType: 'deviation',
      sourceId: deviationId,
      problemStatement: 'Split caps recur on one cap segment.',
      ownerId: owner.id,
    })
  ).record;
  r = (
    await addAction(owner, {
      id: r.id,
      version: r.version,
      kind: 'corrective',
      category: 'machine_setting',
      description: 'Replace the worn cap segment and reset the closing force.',
      ownerId: operator.id,
      dueAt: isoDay(Date.now() + 14 * dayMs),
    })
  ).record;
  r = (
    await updatePlan(owner, {
      id: r.id,
      version: r.version,
      title: r.title,
      problemStatement: r.problemStatement,
      rootCause: r.rootCause ?? undefined,
      effectivenessCriteria: 'No split-cap deviations on the test filler over the next 20 batches.',
      ownerId: owner.id,
    })
  ).record;
  r = (await approvePlan(approver, { id: r.id, version: r.version, password: testPassword })).record;
  r = (await startImplementation(owner, { id: r.id, version: r.version })).record;
  const [action] = await db.select().from(capaActions).where(eq(capaActions.capaId, r.id));
  await completeAction(operator, { id: r.id, actionId: action!.id, actionVersion: action!.version, evidence: 'Segment replaced; closing force set to 42 N.' });
  r = (await openEffectivenessCheck(owner, { id: r.id, version: (await capaRow(r.id)).version })).record;
  const mail = await db
    .select()
    .from(mailOutbox)
    .where(and(eq(mailOutbox.recordType, 'capa'), eq(mailOutbox.recordId, r.id), eq(mailOutbox.template, 'capa_effectiveness_review')))
    .orderBy(asc(mailOutbox.id));
  const linkFor = (userId: number) => {
    const m = mail.find((x) => x.toUserId === userId);
    const token = m ? tokenIn(m.textBody) : null;
    if (!token) throw new Error(`no review link for user ${userId}`);
    return token;
  };
  return { owner, approver, approver2, operator, record: r, mail, linkFor };
}

const versionOf = async (id: number) => (await capaRow(id)).version;
const reviewSignatures = (id: number) =>
  db.select().from(signatures).where(and(eq(signatures.recordType, 'capa'), eq(signatures.recordId, id), ne(signatures.meaning, 'approved')));

describe('the e-mail when the effectiveness check opens', () => {
  it('sends each eligible QA approver one personal link, never the owner, in both parts with number, site and expiry', async () => {
    const c = await capaInCheck();
    const eligible = await db
      .select({ id: users.id })
      .from(users)
      .where(and(eq(users.role, 'qa_approver'), eq(users.active, true)));
    const recipients = c.mail.map((m) => m.toUserId);
    // Segregation of duties: the approvers who may sign, each once; the owner is not asked (21 CFR 820.100, common practice).
    expect([...recipients].sort()).toEqual(eligible.map((u) => u.id).filter((id) => id !== c.owner.id).sort());
    expect(new Set(recipients).size).toBe(recipients.length);
    expect(recipients).not.toContain(c.owner.id);

    const env = getEnv();
    const m = c.mail.find((x) => x.toUserId === c.approver.id)!;
    const token = tokenIn(m.textBody)!;
    expect(m.textBody).toContain(new URL(`/review/${token}`, env.APP_URL).toString());
    expect(m.htmlBody).toContain(`/review/${token}`);
    for (const part of [m.textBody, m.htmlBody]) {
      expect(part).toContain(c.record.number);
      expect(part).toContain(env.SITE_NAME);
      expect(part).toMatch(/asks for your password to sign and works once/);
    }
    const [row] = await db.select().from(actionTokens).where(eq(actionTokens.tokenHash, hashToken(token)));
    // Bound to the reviewer, the CAPA, the action and the version the check opened at (issue 5).
    expect(row).toMatchObject({ userId: c.approver.id, recordType: 'capa', recordId: c.record.id, action: effectivenessReviewAction, recordVersion: c.record.version });
    expect(m.textBody).toContain(row!.expiresAt.toISOString().slice(0, 10));
    // Only the hash is stored (OWASP one-time tokens, from memory); one message per token.
    expect(JSON.stringify(row)).not.toContain(token);
    expect(m.dedupeKey).toBe(`capa-review-link:${row!.id}`);

    const check = await checkActionToken(db, token, c.approver.id, async () => versionOf(c.record.id));
    expect(check.ok).toBe(true);
  });

  it('never writes a token into the audit trail (tokens are never logged)', async () => {
    const c = await capaInCheck();
    const token = c.linkFor(c.approver.id);
    await signReviewDecision(c.approver, { token, decision: 'effective', password: testPassword });
    const trail = await db.select().from(auditEntries).where(and(eq(auditEntries.recordType, 'capa'), eq(auditEntries.recordId, c.record.id)));
    expect(JSON.stringify(trail)).not.toContain(token);
  });
});

describe('signing through the link', () => {
  it('shows the CAPA with its actions, evidence and criteria, and signs "effective" once (21 CFR 11.50, 11.200(a))', async () => {
    const c = await capaInCheck();
    const token = c.linkFor(c.approver.id);
    const view = await openReviewLink(token, c.approver);
    if (!view.ok) throw new Error(`expected a usable link, got ${view.problem}`);
    expect(view.canSign).toBe(true);
    expect(view.detail.capa.number).toBe(c.record.number);
    expect(view.detail.actions[0]).toMatchObject({ evidence: 'Segment replaced; closing force set to 42 N.', completedByName: c.operator.name });

    const out = await signReviewDecision(c.approver, { token, decision: 'effective', password: testPassword });
    expect(out.record).toMatchObject({ status: 'closed_effective', effectivenessResult: 'effective' });
    // 21 CFR 11.50: the signature shows the printed name, the date and time, and the meaning.
    expect(out.signature).toMatchObject({ meaning: 'effective', printedName: c.approver.name, userId: c.approver.id });
    expect(out.signature!.signedAt).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}/);
    const [used] = await db.select().from(actionTokens).where(eq(actionTokens.tokenHash, hashToken(token)));
    expect(used!.usedAt).not.toBeNull();

    // Single use (OWASP one-time tokens, from memory): the second visit says so and cannot sign.
    expect(await openReviewLink(token, c.approver)).toMatchObject({ ok: false, problem: 'used' });
    await expect(signReviewDecision(c.approver, { token, decision: 'effective', password: testPassword })).rejects.toBeInstanceOf(ConflictError);
    expect(await reviewSignatures(c.record.id)).toHaveLength(1);
    // Nothing to send a fresh link for once the review is done.
    expect(await openReviewLink(token, c.approver)).toMatchObject({ freshLink: { allowed: false } });
  });

  it('signs "not effective" only with a reason; a refused attempt leaves the link usable', async () => {
    const c = await capaInCheck();
    const token = c.linkFor(c.approver.id);
    await expect(signReviewDecision(c.approver, { token, decision: 'not_effective', password: testPassword })).rejects.toMatchObject({
      fieldErrors: { reason: [expect.any(String)] },
    });
    expect((await openReviewLink(token, c.approver)).ok).toBe(true);
    const out = await signReviewDecision(c.approver, {
      token,
      decision: 'not_effective',
      password: testPassword,
      reason: 'Two split-cap deviations in the first ten batches.',
    });
    expect(out.record).toMatchObject({
      status: 'proposed',
      effectivenessResult: 'not_effective',
      effectivenessNote: 'Two split-cap deviations in the first ten batches.',
      planRound: 2,
    });
    expect(out.signature).toMatchObject({ meaning: 'not_effective', printedName: c.approver.name });
    expect(await openReviewLink(token, c.approver)).toMatchObject({ ok: false, problem: 'used' });
  });

  it('signs nothing on a wrong password and keeps the link usable (21 CFR 11.200(a), 11.300)', async () => {
    const c = await capaInCheck();
    const token = c.linkFor(c.approver.id);
    await expect(signReviewDecision(c.approver, { token, decision: 'effective', password: 'not the password' })).rejects.toMatchObject({
      fieldErrors: { password: [expect.any(String)] },
    });
    expect((await capaRow(c.record.id)).status).toBe('effectiveness_check');
    expect(await reviewSignatures(c.record.id)).toHaveLength(0);
    const [row] = await db.select().from(actionTokens).where(eq(actionTokens.tokenHash, hashToken(token)));
    expect(row!.usedAt).toBeNull();
    expect((await openReviewLink(token, c.approver)).ok).toBe(true);
    const out = await signReviewDecision(c.approver, { token, decision: 'effective', password: testPassword });
    expect(out.record.status).toBe('closed_effective');
  });
});

describe('links that must not work', () => {
  it('refuses another approver holding someone else’s link, revealing nothing of the record (issue 5; OWASP, from memory)', async () => {
    const c = await capaInCheck();
    const token = c.linkFor(c.approver.id);
    const view = await openReviewLink(token, c.approver2);
    expect(view).toMatchObject({ ok: false, problem: 'other_user', capa: null, freshLink: { allowed: false } });
    expect(JSON.stringify(view)).not.toContain(c.record.number);
    // 21 CFR 11.300: a link is not a credential; the wrong person signs nothing, even with their own password.
    await expect(signReviewDecision(c.approver2, { token, decision: 'effective', password: testPassword })).rejects.toBeInstanceOf(ConflictError);
    expect((await capaRow(c.record.id)).status).toBe('effectiveness_check');
    expect((await openReviewLink(token, c.approver)).ok).toBe(true);
    // The owner (a QA investigator) gets no link and cannot use one either (segregation of duties, common practice).
    expect(await openReviewLink(token, c.owner)).toMatchObject({ ok: false, problem: 'other_user' });
  });

  it('refuses a link for a CAPA that changed since it was sent: cancelled, and its version moved on', async () => {
    const c = await capaInCheck();
    const token = c.linkFor(c.approver.id);
    await cancelCapa(c.approver2, { id: c.record.id, version: c.record.version, reason: 'Superseded by a site-wide CAPA.', password: testPassword });
    const view = await openReviewLink(token, c.approver);
    expect(view).toMatchObject({ ok: false, problem: 'record_changed', capa: { id: c.record.id, number: c.record.number } });
    // No fresh link for a CAPA that no longer awaits review; the page says why.
    expect(view).toMatchObject({ freshLink: { allowed: false, why: expect.stringMatching(/cancelled/i) } });
    await expect(signReviewDecision(c.approver, { token, decision: 'effective', password: testPassword })).rejects.toBeInstanceOf(ConflictError);
    await expect(requestFreshReviewLink(c.approver, { token })).rejects.toBeInstanceOf(InvalidTransitionError);
    expect((await capaRow(c.record.id)).status).toBe('cancelled');
  });

  it('refuses a link whose CAPA version was bumped without a state change', async () => {
    const c = await capaInCheck();
    const token = c.linkFor(c.approver.id);
    await db.update(capas).set({ version: c.record.version + 1 }).where(eq(capas.id, c.record.id));
    expect(await openReviewLink(token, c.approver)).toMatchObject({ ok: false, problem: 'record_changed' });
  });

  it('refuses an expired link, and sends a fresh one on request that works while the old one is revoked', async () => {
    const c = await capaInCheck();
    const token = c.linkFor(c.approver.id);
    await db.update(actionTokens).set({ expiresAt: new Date(Date.now() - 60_000) }).where(eq(actionTokens.tokenHash, hashToken(token)));
    const view = await openReviewLink(token, c.approver);
    expect(view).toMatchObject({ ok: false, problem: 'expired', freshLink: { allowed: true } });
    await expect(signReviewDecision(c.approver, { token, decision: 'effective', password: testPassword })).rejects.toBeInstanceOf(ConflictError);

    const sent = await requestFreshReviewLink(c.approver, { token });
    expect(sent.email).toBe(c.approver.email);
    const fresh = await db
      .select()
      .from(mailOutbox)
      .where(and(eq(mailOutbox.recordId, c.record.id), eq(mailOutbox.toUserId, c.approver.id), eq(mailOutbox.template, 'capa_effectiveness_review')))
      .orderBy(asc(mailOutbox.id));
    expect(fresh).toHaveLength(2);
    const freshToken = tokenIn(fresh[1]!.textBody)!;
    expect(freshToken).not.toBe(token);
    expect((await openReviewLink(freshToken, c.approver)).ok).toBe(true);
    expect(await openReviewLink(token, c.approver)).toMatchObject({ ok: false, problem: 'revoked' });
    // The request is on the record, without the token (21 CFR 11.10(e)).
    const trail = await db.select().from(auditEntries).where(and(eq(auditEntries.recordType, 'capa'), eq(auditEntries.recordId, c.record.id)));
    expect(trail.some((e) => e.action === 'review_link_requested' && e.userId === c.approver.id)).toBe(true);
    expect(JSON.stringify(trail)).not.toContain(freshToken);
  });

  it('sends no fresh link to the owner or to an operator: only an approver who does not own the CAPA reviews it', async () => {
    const c = await capaInCheck();
    const token = c.linkFor(c.approver.id);
    // Their own link would be needed to ask; another person's link tells them nothing.
    await expect(requestFreshReviewLink(c.owner, { token })).rejects.toBeInstanceOf(ForbiddenError);
    await expect(requestFreshReviewLink(c.operator, { token })).rejects.toBeInstanceOf(ForbiddenError);
    expect(await openReviewLink('not-a-token', c.approver)).toMatchObject({ ok: false, problem: 'unknown', capa: null });
  });

  it('rejects a malformed decision before anything is looked at', async () => {
    const c = await capaInCheck();
    const token = c.linkFor(c.approver.id);
    await expect(signReviewDecision(c.approver, { token, decision: 'maybe' as 'effective', password: testPassword })).rejects.toBeInstanceOf(ValidationError);
    expect((await openReviewLink(token, c.approver)).ok).toBe(true);
  });
});
