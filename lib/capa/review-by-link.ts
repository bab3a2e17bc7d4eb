import 'server-only';
import { and, eq } from 'drizzle-orm';
import { z } from 'zod';
import { db, type DbOrTx } from '../../db/client';
import { capas, users } from '../../db/schema';
import { type TokenBinding, type TokenProblem, checkActionToken, consumeActionToken, tokenProblemTexts } from '../action-tokens';
import { ConflictError, ForbiddenError, NotFoundError } from '../errors';
import { type RecordActor, checkSection } from '../records/kind';
import { editRecord, loadRelated } from '../records/write-path';
import { parseInput } from '../validation/parse';
import { type CapaOutcome, recordEffective, recordNotEffective } from './commands';
import { type CapaDetailDto, getCapaDetail } from './detail';
import { capaStateLabels } from './labels';
import { capaKind } from './kind';
import { effectivenessReviewAction, mailReviewLink } from './review-links';

/*
 * What the review page (/review/<token>) does with a link from the e-mail. Every step checks the
 * token again against the person signed in and the CAPA as it is now: a link for someone else, used,
 * replaced, expired or for a CAPA that changed since it was sent changes nothing and says which.
 * The signature goes through the CAPA's own commands, with the token spent inside the signing
 * transaction (21 CFR 11.200(a): the password is asked every time; the link is single use).
 */

/** The CAPA's version, while the link's binding is a CAPA effectiveness review; anything else reads as changed. */
async function reviewedVersion(database: DbOrTx, binding: TokenBinding): Promise<number | null> {
  if (binding.recordType !== 'capa' || binding.action !== effectivenessReviewAction) return null;
  const [row] = await database.select({ version: capas.version }).from(capas).where(eq(capas.id, binding.recordId));
  return row?.version ?? null;
}

/** Whether this person may be sent a fresh link to this CAPA now, and if not, why not. */
export type FreshLinkVerdict = { allowed: true } | { allowed: false; why: string };

export const noRecordWhy =
  'This link does not say which CAPA it was for, so no fresh one can be sent from here. A QA approver can also review and sign a CAPA in the effectiveness check from its own page.';

/** Whether the kind's rules let this person ask for a fresh link now (lib/capa/kind.ts, section review_link). */
async function freshLinkVerdict(database: DbOrTx, viewer: RecordActor, capaId: number): Promise<FreshLinkVerdict> {
  const [row] = await database.select().from(capas).where(eq(capas.id, capaId));
  if (!row) return { allowed: false, why: noRecordWhy };
  if (row.status !== 'effectiveness_check') {
    return {
      allowed: false,
      why: `Its state is now “${capaStateLabels[row.status]}”: it no longer awaits an effectiveness review, so there is nothing to send a link for.`,
    };
  }
  const check = checkSection(capaKind, viewer, row, await loadRelated(capaKind, database, row), 'review_link');
  return check.ok ? { allowed: true } : { allowed: false, why: check.reason };
}

export type ReviewLinkView =
  | { ok: true; detail: CapaDetailDto; expiresAt: string; canSign: boolean }
  | {
      ok: false;
      problem: TokenProblem;
      title: string;
      body: string;
      /** The CAPA the link was for; null when it must not be revealed (another person's link) or is not known. */
      capa: { id: number; number: string } | null;
      freshLink: FreshLinkVerdict;
    };

/** What the review page shows for this token and this person. Reads only; nothing changes. */
export async function openReviewLink(raw: string, viewer: RecordActor, database: DbOrTx = db, now: Date = new Date()): Promise<ReviewLinkView> {
  const check = await checkActionToken(database, raw, viewer.id, (b) => reviewedVersion(database, b), now);
  if (!check.ok) {
    const binding = check.binding && check.binding.recordType === 'capa' && check.binding.action === effectivenessReviewAction ? check.binding : null;
    // A token for something other than a CAPA review is not a link this page knows.
    const problem: TokenProblem = check.binding && !binding ? 'unknown' : check.problem;
    const [capa] = binding
      ? await database.select({ id: capas.id, number: capas.number }).from(capas).where(eq(capas.id, binding.recordId))
      : [];
    return {
      ok: false,
      problem,
      ...tokenProblemTexts[problem],
      capa: capa ?? null,
      freshLink: capa ? await freshLinkVerdict(database, viewer, capa.id) : { allowed: false, why: noRecordWhy },
    };
  }
  const detail = await getCapaDetail(check.binding.recordId, viewer, database, now);
  const canSign = detail.allowedEvents.some((e) => e.type === 'record_effective' || e.type === 'record_not_effective');
  return { ok: true, detail, expiresAt: check.expiresAt.toISOString(), canSign };
}

export const reviewDecisionSchema = z.object({
  token: z.string().max(100),
  decision: z.enum(['effective', 'not_effective'], { error: 'Choose effective or not effective.' }),
  password: z.string().max(200).optional(),
  reason: z.string().max(2000).optional(),
});
export type ReviewDecisionInput = z.input<typeof reviewDecisionSchema>;

/**
 * Signs the decision the link asks for. The token is checked again, then spent inside the signing
 * transaction: if the signature is refused (wrong password, the CAPA changed) the link still works;
 * if it commits, the link is used and can never sign again.
 */
export async function signReviewDecision(actor: RecordActor, raw: ReviewDecisionInput): Promise<CapaOutcome> {
  const input = parseInput(reviewDecisionSchema, raw);
  const check = await checkActionToken(db, input.token, actor.id, (b) => reviewedVersion(db, b));
  if (!check.ok) {
    const problem = check.problem;
    throw new ConflictError(`${tokenProblemTexts[problem].title}. Nothing was signed.`);
  }
  const hooks = {
    async inTransaction(tx: DbOrTx) {
      if (!(await consumeActionToken(tx, check.tokenId))) {
        throw new ConflictError('This link was used, replaced or expired a moment ago. Nothing was signed.');
      }
    },
  };
  const target = { id: check.binding.recordId, version: check.binding.recordVersion, password: input.password ?? '' };
  return input.decision === 'effective'
    ? recordEffective(actor, target, hooks)
    : recordNotEffective(actor, { ...target, reason: input.reason ?? '' }, hooks);
}

/**
 * Sends the signed-in person a fresh link to the CAPA an old link was for, when they may review it
 * now. The old link tells which CAPA; it need not be usable (that is why a fresh one is asked for),
 * but it must be this person's own.
 */
export async function requestFreshReviewLink(actor: RecordActor, raw: { token: string }): Promise<{ email: string; expiresAt: string }> {
  const { token } = parseInput(z.object({ token: z.string().max(100) }), raw);
  const check = await checkActionToken(db, token, actor.id, (b) => reviewedVersion(db, b));
  const binding = check.binding;
  if (!binding || binding.recordType !== 'capa' || binding.action !== effectivenessReviewAction) {
    throw new ForbiddenError(noRecordWhy);
  }
  // The CAPA's rules decide (section review_link): the state (409), the role and independence (403).
  const outcome = await editRecord(capaKind, {
    id: binding.recordId,
    section: 'review_link',
    actor,
    expectedVersion: null,
    // Who asked, and when; never the token.
    action: 'review_link_requested',
    async apply(capa, { tx }) {
      const [reviewer] = await tx
        .select({ id: users.id, email: users.email })
        .from(users)
        .where(and(eq(users.id, actor.id), eq(users.active, true)));
      if (!reviewer) throw new NotFoundError('Your account');
      const { expiresAt } = await mailReviewLink(tx, capa, reviewer, {
        intro: `You asked for a fresh link to review the effectiveness check of ${capa.number}: ${capa.title}. Earlier links to it no longer work.`,
      });
      return { result: { email: reviewer.email, expiresAt: expiresAt.toISOString() } };
    },
  });
  return outcome.result!;
}
