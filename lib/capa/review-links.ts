import 'server-only';
import type { Tx } from '../../db/client';
import { issueActionToken } from '../action-tokens';
import { getEnv } from '../env';
import { enqueueMail } from '../mail/outbox';
import { renderMailLayout } from '../mail/templates/layout';
import type { Recipient } from '../mail/record-notice';
import type { CapaRow } from './kind';

/*
 * Personal review links for a CAPA's effectiveness check. Each eligible QA approver gets an e-mail
 * whose link carries a one-time token bound to them, this CAPA, the review and the version the check
 * opened at (lib/action-tokens). The link only says what to review: signing still takes the
 * reviewer's session and password (21 CFR 11.200(a)). The raw token exists in this message and
 * nowhere else in the application; it is never logged and never written to the audit trail.
 *
 * Kept free of the CAPA commands so the record kind can call it without an import cycle.
 */

export const effectivenessReviewAction = 'effectiveness_review';

export const reviewPath = (token: string) => `/review/${token}`;

/** "2026-12-04 09:30 UTC": the expiry as the reviewer reads it, in the zone the app shows times in. */
export function formatExpiry(at: Date): string {
  return `${at.toISOString().slice(0, 16).replace('T', ' ')} UTC`;
}

export interface ReviewLinkMail {
  /** Why the link is sent, first paragraph of the message. */
  intro: string;
}

/**
 * Issues one reviewer's token and queues their message, inside the caller's transaction: the link
 * exists if and only if the change that asked for it commits. Earlier unused links of the same
 * reviewer for this CAPA stop working (issueActionToken revokes them).
 */
export async function mailReviewLink(
  tx: Tx,
  capa: Pick<CapaRow, 'id' | 'number' | 'title' | 'version'>,
  reviewer: Recipient,
  mail: ReviewLinkMail,
): Promise<{ tokenId: number; expiresAt: Date }> {
  const env = getEnv();
  const { id: tokenId, token, expiresAt } = await issueActionToken(tx, {
    userId: reviewer.id,
    recordType: 'capa',
    recordId: capa.id,
    action: effectivenessReviewAction,
    recordVersion: capa.version,
  });
  const rendered = renderMailLayout({
    siteName: env.SITE_NAME,
    recordNumber: capa.number,
    heading: `${capa.number} awaits your effectiveness review`,
    paragraphs: [
      mail.intro,
      'Compare the evidence with the criteria written in the plan, then sign it effective, or not effective with the reason.',
      `This link is yours alone: it asks for your password to sign and works once. It expires on ${formatExpiry(expiresAt)}; after that, or if the CAPA changes meanwhile, the page it opens lets you ask for a fresh one.`,
    ],
    link: { url: new URL(reviewPath(token), env.APP_URL).toString(), label: 'Review the evidence and sign' },
    footer: 'You receive this because you are a QA approver who does not own this CAPA. Do not forward it: the link is personal.',
  });
  await enqueueMail(tx, {
    // One message per token: a fresh link is a new message, a retried transaction is not.
    dedupeKey: `capa-review-link:${tokenId}`,
    template: 'capa_effectiveness_review',
    to: { address: reviewer.email, userId: reviewer.id },
    subject: `CAPA ${capa.number}: effectiveness check awaits your review`,
    text: rendered.text,
    html: rendered.html,
    recordType: 'capa',
    recordId: capa.id,
  });
  return { tokenId, expiresAt };
}

/** When the check opens: a personal link to every eligible approver (never the owner; segregation of duties). */
export async function mailEffectivenessReviewLinks(
  tx: Tx,
  actorName: string,
  capa: Pick<CapaRow, 'id' | 'number' | 'title' | 'version'>,
  reviewers: Recipient[],
): Promise<void> {
  const seen = new Set<number>();
  for (const reviewer of reviewers) {
    if (seen.has(reviewer.id)) continue;
    seen.add(reviewer.id);
    await mailReviewLink(tx, capa, reviewer, {
      intro: `Every action of ${capa.number}: ${capa.title} is completed, and ${actorName} opened the effectiveness check.`,
    });
  }
}
