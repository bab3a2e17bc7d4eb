import { describe, expect, it } from 'vitest';
import { buildTimeline, isMeaningfulChange, userIdsInChanges } from '../../../lib/records/timeline';
import type { AuditEntryDto, HistoryEntryDto } from '../../../lib/records/trail';
import type { SignatureDto } from '../../../lib/signatures';

const history = (id: number, event: string, userId: number, at: string): HistoryEntryDto => ({
  id,
  event,
  eventLabel: event,
  fromState: 'a',
  fromLabel: 'A',
  toState: 'b',
  toLabel: 'B',
  userId,
  userName: `user ${userId}`,
  comment: null,
  at,
});

const audit = (id: number, action: string, userId: number, at: string, changes: AuditEntryDto['changes'] = []): AuditEntryDto => ({
  id,
  at,
  userId,
  userName: `user ${userId}`,
  action,
  changes,
  reason: null,
});

const signature = (id: number, userId: number, signedAt: string): SignatureDto => ({
  id,
  userId,
  printedName: `user ${userId}`,
  printedTitle: 'QA',
  meaning: 'approved',
  meaningLabel: 'Approved',
  signedAt,
  recordVersion: 3,
  matches: true,
  changedParts: [],
  supersededBy: null,
  intact: true,
});

describe('buildTimeline', () => {
  it('shows a signed transition once, with its field changes and its signature', () => {
    const items = buildTimeline({
      history: [history(1, 'approve', 7, '2026-11-02T10:00:00.120Z')],
      audit: [
        audit(10, 'approve', 7, '2026-11-02T10:00:00.118Z', [{ field: 'status', from: 'approval', to: 'closed' }]),
        audit(11, 'signed', 7, '2026-11-02T10:00:00.119Z', [{ field: 'signature', from: null, to: { meaning: 'approved' } }]),
      ],
      signatures: [signature(5, 7, '2026-11-02T10:00:00.119Z')],
    });
    expect(items).toHaveLength(1);
    const [only] = items;
    expect(only?.kind).toBe('transition');
    if (only?.kind !== 'transition') return;
    expect(only.audit.map((a) => a.id)).toEqual([10, 11]);
    expect(only.signatures.map((s) => s.id)).toEqual([5]);
  });

  it("keeps another person's entries and edits outside the transaction window on their own", () => {
    const items = buildTimeline({
      history: [history(1, 'submit', 3, '2026-11-02T10:00:00.000Z')],
      audit: [
        audit(10, 'submit', 3, '2026-11-02T10:00:00.000Z'),
        audit(11, 'submit', 4, '2026-11-02T10:00:00.000Z'),
        audit(12, 'submit', 3, '2026-11-02T10:00:09.000Z'),
        audit(13, 'record_triage', 3, '2026-11-02T10:00:00.500Z'),
      ],
      signatures: [signature(5, 4, '2026-11-02T10:00:00.000Z')],
    });
    const kinds = items.map((i) => `${i.kind}:${i.key}`);
    expect(kinds).toEqual(['audit:a12', 'audit:a13', 'signature:s5', 'transition:h1', 'audit:a11']);
  });

  // 21 CFR 11.10(e): the trail must show every change; merging may regroup entries, never drop one.
  it('shows every audit entry and every signature exactly once', () => {
    const base = Date.parse('2026-10-01T08:00:00.000Z');
    const t = (s: number) => new Date(base + s * 1000).toISOString();
    const h: HistoryEntryDto[] = [];
    const a: AuditEntryDto[] = [];
    const s: SignatureDto[] = [];
    for (let i = 0; i < 40; i++) {
      const user = 1 + (i % 3);
      h.push(history(i, `e${i % 4}`, user, t(i * 3)));
      a.push(audit(100 + i, `e${i % 4}`, user, t(i * 3)));
      a.push(audit(200 + i, i % 2 ? 'signed' : 'update_draft', 1 + ((i + 1) % 3), t(i * 3 + 1)));
      if (i % 5 === 0) s.push(signature(300 + i, user, t(i * 3)));
    }
    const items = buildTimeline({ history: h, audit: a, signatures: s });
    const auditIds = items.flatMap((i) => (i.kind === 'transition' ? i.audit.map((x) => x.id) : i.kind === 'audit' ? [i.entry.id] : []));
    const signatureIds = items.flatMap((i) =>
      i.kind === 'transition' ? i.signatures.map((x) => x.id) : i.kind === 'signature' ? [i.signature.id] : [],
    );
    expect(auditIds.sort((x, y) => x - y)).toEqual(a.map((x) => x.id).sort((x, y) => x - y));
    expect(signatureIds.sort((x, y) => x - y)).toEqual(s.map((x) => x.id).sort((x, y) => x - y));
    expect(items.filter((i) => i.kind === 'transition')).toHaveLength(40);
    for (let i = 1; i < items.length; i++) expect(Date.parse(items[i - 1]!.at)).toBeGreaterThanOrEqual(Date.parse(items[i]!.at));
  });

  it('puts comments in time order among the rest', () => {
    const items = buildTimeline({
      history: [history(1, 'submit', 3, '2026-11-02T10:00:00.000Z')],
      audit: null,
      signatures: [],
      comments: [{ id: 9, userId: 4, userName: 'user 4', body: 'Photo added', at: '2026-11-02T11:00:00.000Z' }],
    });
    expect(items.map((i) => i.kind)).toEqual(['comment', 'transition']);
  });
});

describe('audit change helpers', () => {
  it('drops lines where both sides are empty and keeps real changes', () => {
    expect(isMeaningfulChange({ field: 'rootCause', from: null, to: '' })).toBe(false);
    expect(isMeaningfulChange({ field: 'rootCause', from: null, to: 'worn ring' })).toBe(true);
    expect(isMeaningfulChange({ field: 'capaRequired', from: null, to: false })).toBe(true);
  });

  it('collects the user ids named by owner and investigator changes', () => {
    expect(
      userIdsInChanges([
        audit(1, 'record_triage', 3, '2026-11-02T10:00:00.000Z', [
          { field: 'investigatorId', from: null, to: 5 },
          { field: 'ownerId', from: 2, to: 5 },
          { field: 'severity', from: 4, to: 7 },
        ]),
      ]),
    ).toEqual([2, 5]);
    expect(userIdsInChanges(null)).toEqual([]);
  });
});

describe('comments in the timeline', () => {
  it("shows a comment once: its own audit entry is folded into it, another person's is not", () => {
    const items = buildTimeline({
      history: [],
      signatures: [],
      audit: [
        audit(1, 'comment', 4, '2026-11-02T11:00:00.010Z'),
        audit(2, 'comment', 5, '2026-11-02T11:00:00.010Z'),
      ],
      comments: [{ id: 9, userId: 4, userName: 'user 4', body: 'Photo added', at: '2026-11-02T11:00:00.000Z' }],
    });
    expect(items.map((i) => i.key)).toEqual(['a2', 'c9']);
  });
});
