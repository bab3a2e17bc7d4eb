import type { FieldChange } from '../audit/hash';
import type { SignatureDto } from '../signatures';
import type { AuditEntryDto, HistoryEntryDto } from './trail';

/*
 * One record's story as a single list, newest first. A lifecycle transition is written three or four
 * times on purpose (state history, the audit entry of its field changes, the signature and the
 * "signed" audit entry, all in one transaction), but a reader wants to see it once: each history row
 * takes the audit entries and the signature that the same person wrote in the same transaction, and
 * only what is left stands on its own. Nothing is hidden: every audit change still appears, inside
 * the entry it belongs to. Pure, so the merging is tested without a database.
 */

/** Entries written by one transaction carry times within this window of each other (same person). */
export const sameTransactionWindowMs = 5_000;

export interface TimelineComment {
  id: number;
  userId: number;
  userName: string;
  body: string;
  /** ISO 8601, UTC. */
  at: string;
}

export type TimelineEntry =
  | {
      kind: 'transition';
      key: string;
      at: string;
      history: HistoryEntryDto;
      /** The audit entries of this transition (its field changes, the signing), oldest first. */
      audit: AuditEntryDto[];
      signatures: SignatureDto[];
    }
  | { kind: 'signature'; key: string; at: string; signature: SignatureDto }
  | { kind: 'audit'; key: string; at: string; entry: AuditEntryDto }
  | { kind: 'comment'; key: string; at: string; comment: TimelineComment };

const ms = (iso: string) => Date.parse(iso);

function near(a: string, b: string): boolean {
  return Math.abs(ms(a) - ms(b)) <= sameTransactionWindowMs;
}

/** A change worth a line: both sides empty (null, undefined, '') says nothing. */
export function isMeaningfulChange(change: FieldChange): boolean {
  const empty = (v: unknown) => v === null || v === undefined || v === '';
  return !(empty(change.from) && empty(change.to));
}

export function buildTimeline(input: {
  history: readonly HistoryEntryDto[];
  signatures: readonly SignatureDto[];
  audit: readonly AuditEntryDto[] | null;
  comments?: readonly TimelineComment[];
}): TimelineEntry[] {
  const audit = [...(input.audit ?? [])].sort((a, b) => a.id - b.id);
  const usedAudit = new Set<number>();
  const usedSignatures = new Set<number>();

  const transitions: TimelineEntry[] = input.history.map((h) => {
    // The transition's own audit entry has the event as its action; "signed" entries go with it too.
    const own = audit.filter(
      (a) =>
        !usedAudit.has(a.id) &&
        a.userId === h.userId &&
        (a.action === h.event || a.action === 'signed') &&
        near(a.at, h.at),
    );
    for (const a of own) usedAudit.add(a.id);
    const signatures = input.signatures.filter((s) => !usedSignatures.has(s.id) && s.userId === h.userId && near(s.signedAt, h.at));
    for (const s of signatures) usedSignatures.add(s.id);
    return { kind: 'transition', key: `h${h.id}`, at: h.at, history: h, audit: own, signatures };
  });

  // A comment writes an audit entry of its own (action "comment"); the comment itself shows it once.
  for (const c of input.comments ?? []) {
    const own = audit.find((a) => !usedAudit.has(a.id) && a.action === 'comment' && a.userId === c.userId && near(a.at, c.at));
    if (own) usedAudit.add(own.id);
  }

  const rest: TimelineEntry[] = [
    ...input.signatures
      .filter((s) => !usedSignatures.has(s.id))
      .map((signature): TimelineEntry => ({ kind: 'signature', key: `s${signature.id}`, at: signature.signedAt, signature })),
    ...audit
      .filter((a) => !usedAudit.has(a.id))
      .map((entry): TimelineEntry => ({ kind: 'audit', key: `a${entry.id}`, at: entry.at, entry })),
    ...(input.comments ?? []).map((comment): TimelineEntry => ({ kind: 'comment', key: `c${comment.id}`, at: comment.at, comment })),
  ];

  // Newest first; entries of the same instant keep a stable order by kind and id.
  return [...transitions, ...rest].sort((a, b) => {
    const d = ms(b.at) - ms(a.at);
    if (d !== 0) return d;
    return a.key < b.key ? 1 : a.key > b.key ? -1 : 0;
  });
}

/** Field names whose values are user ids, shown as the person's name. */
export const userIdFields = ['ownerId', 'investigatorId', 'raisedBy', 'createdBy', 'userId', 'uploadedBy'] as const;

/** The user ids a timeline's audit changes mention, so the page can look their names up in one query. */
export function userIdsInChanges(audit: readonly AuditEntryDto[] | null): number[] {
  const ids = new Set<number>();
  for (const entry of audit ?? []) {
    for (const c of entry.changes) {
      if (!(userIdFields as readonly string[]).includes(c.field)) continue;
      for (const v of [c.from, c.to]) if (typeof v === 'number' && Number.isInteger(v)) ids.add(v);
    }
  }
  return [...ids].sort((a, b) => a - b);
}
