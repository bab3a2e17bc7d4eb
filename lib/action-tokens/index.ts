import 'server-only';
import { createHash, randomBytes } from 'node:crypto';
import { and, eq, gt, inArray, isNull } from 'drizzle-orm';
import type { DbOrTx } from '../../db/client';
import { actionTokens, settings } from '../../db/schema';
import type { RecordType } from '../records/types';

/*
 * One-time links in e-mail ("approve from your phone"). A token is 256 random bits, base64url, sent
 * once and never stored: the database keeps its SHA-256, so a copy of the table opens nothing. Each
 * token is bound to one reviewer, one record, one action and the record version it was issued for,
 * and expires (site setting, 7 days by default). Using it still needs the reviewer's session and an
 * electronic signature (password re-entered; 21 CFR 11.200(a)): the link only says what to sign.
 *
 * Never log a token or a URL that carries one.
 */

export const tokenBytes = 32;
export const linkDaysSettingKey = 'approval_link_days';
export const defaultLinkDays = 7;

export function hashToken(raw: string): string {
  return createHash('sha256').update(raw, 'utf8').digest('hex');
}

/** A well-formed token: 43 base64url characters (32 bytes). Anything else is not looked up. */
export function isWellFormedToken(raw: string): boolean {
  return /^[A-Za-z0-9_-]{43}$/.test(raw);
}

export async function getLinkDays(database: DbOrTx): Promise<number> {
  const [row] = await database.select({ value: settings.value }).from(settings).where(eq(settings.key, linkDaysSettingKey));
  const days = Number(row?.value);
  return Number.isInteger(days) && days >= 1 && days <= 60 ? days : defaultLinkDays;
}

export interface TokenBinding {
  userId: number;
  recordType: RecordType;
  recordId: number;
  action: string;
  recordVersion: number;
}

/**
 * Issues a token inside the caller's transaction (the one that writes the e-mail into the outbox).
 * Earlier unused links for the same reviewer, record and action are revoked: only the newest works.
 */
export async function issueActionToken(
  tx: DbOrTx,
  binding: TokenBinding,
  now: Date = new Date(),
): Promise<{ id: number; token: string; expiresAt: Date }> {
  const token = randomBytes(tokenBytes).toString('base64url');
  const days = await getLinkDays(tx);
  const expiresAt = new Date(now.getTime() + days * 86_400_000);
  // Earlier unused links for the same binding, found by a plain read and revoked by primary key.
  // An UPDATE with this WHERE would take gap locks on the record index when nothing matches (the
  // usual case), and two transactions issuing links for neighbouring records then deadlock on each
  // other's INSERT. Issuers of the same binding are already serialised by the record's row lock,
  // which the write path takes before anything else in the transaction.
  const earlier = await tx
    .select({ id: actionTokens.id })
    .from(actionTokens)
    .where(
      and(
        eq(actionTokens.recordType, binding.recordType),
        eq(actionTokens.recordId, binding.recordId),
        eq(actionTokens.userId, binding.userId),
        eq(actionTokens.action, binding.action),
        isNull(actionTokens.usedAt),
        isNull(actionTokens.revokedAt),
      ),
    );
  if (earlier.length > 0) {
    await tx
      .update(actionTokens)
      .set({ revokedAt: now })
      .where(and(inArray(actionTokens.id, earlier.map((t) => t.id)), isNull(actionTokens.usedAt), isNull(actionTokens.revokedAt)));
  }
  const [inserted] = await tx.insert(actionTokens).values({ ...binding, tokenHash: hashToken(token), expiresAt }).$returningId();
  return { id: inserted!.id, token, expiresAt };
}

export type TokenProblem = 'unknown' | 'used' | 'revoked' | 'expired' | 'other_user' | 'record_changed';

export type TokenCheck =
  | { ok: true; tokenId: number; binding: TokenBinding; expiresAt: Date }
  | { ok: false; problem: TokenProblem; binding: TokenBinding | null };

/**
 * What a token allows right now for this viewer, in the order a reviewer needs to hear it. The
 * record's current version comes from the caller (who knows the record type).
 */
export async function checkActionToken(
  database: DbOrTx,
  raw: string,
  viewerId: number,
  currentVersion: (binding: TokenBinding) => Promise<number | null>,
  now: Date = new Date(),
): Promise<TokenCheck> {
  if (!isWellFormedToken(raw)) return { ok: false, problem: 'unknown', binding: null };
  const [row] = await database.select().from(actionTokens).where(eq(actionTokens.tokenHash, hashToken(raw)));
  if (!row) return { ok: false, problem: 'unknown', binding: null };
  const binding: TokenBinding = {
    userId: row.userId,
    recordType: row.recordType as RecordType,
    recordId: row.recordId,
    action: row.action,
    recordVersion: row.recordVersion,
  };
  // Another person's link says nothing about the record to whoever holds it.
  if (row.userId !== viewerId) return { ok: false, problem: 'other_user', binding: null };
  if (row.usedAt) return { ok: false, problem: 'used', binding };
  if (row.revokedAt) return { ok: false, problem: 'revoked', binding };
  if (row.expiresAt.getTime() <= now.getTime()) return { ok: false, problem: 'expired', binding };
  const version = await currentVersion(binding);
  if (version === null || version !== row.recordVersion) return { ok: false, problem: 'record_changed', binding };
  return { ok: true, tokenId: row.id, binding, expiresAt: row.expiresAt };
}

/**
 * Marks the token used inside the transaction that performs its action; refuses (false) when another
 * request used, or an admin revoked, it in the meantime, or it has just expired.
 */
export async function consumeActionToken(tx: DbOrTx, tokenId: number, now: Date = new Date()): Promise<boolean> {
  const [result] = await tx
    .update(actionTokens)
    .set({ usedAt: now })
    .where(and(eq(actionTokens.id, tokenId), isNull(actionTokens.usedAt), isNull(actionTokens.revokedAt), gt(actionTokens.expiresAt, now)));
  return (result as { affectedRows: number }).affectedRows === 1;
}

/** Revokes every unused link to a record (e.g. when it is cancelled). */
export async function revokeRecordTokens(tx: DbOrTx, recordType: RecordType, recordId: number, now: Date = new Date()): Promise<number> {
  const [result] = await tx
    .update(actionTokens)
    .set({ revokedAt: now })
    .where(
      and(eq(actionTokens.recordType, recordType), eq(actionTokens.recordId, recordId), isNull(actionTokens.usedAt), isNull(actionTokens.revokedAt)),
    );
  return (result as { affectedRows: number }).affectedRows;
}

export const tokenProblemTexts: Record<TokenProblem, { title: string; body: string }> = {
  unknown: {
    title: 'This link is not valid',
    body: 'The link is incomplete or was never issued. Copy the whole link from the e-mail, or ask for a fresh one.',
  },
  used: { title: 'This link has already been used', body: 'Each approval link works once. The decision it carried is on the record.' },
  revoked: { title: 'This link was replaced', body: 'A newer link was sent for the same decision, or the request was withdrawn. Use the newest e-mail.' },
  expired: { title: 'This link has expired', body: 'Approval links work for a limited number of days. Ask for a fresh link.' },
  other_user: {
    title: 'This link was sent to someone else',
    body: 'It works only for the person it was addressed to. Sign in as that person, or ask for a link of your own.',
  },
  record_changed: {
    title: 'The record changed after this link was sent',
    body: 'What you were asked to sign is no longer what the record holds. Ask for a fresh link to review the current version.',
  },
};

