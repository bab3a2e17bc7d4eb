import { formatUtc } from '@/components/ui/format';
import { StatusBadge } from '@/components/ui/status-badge';
import { classificationLabels, deviationEventLabels, deviationStateLabels, dispositionLabels } from '@/lib/deviations/labels';
import type { AuditEntryDto, HistoryEntryDto } from '@/lib/records/trail';
import type { SignatureDto } from '@/lib/signatures';

/*
 * The deviation's story in one list, newest first: each transition with its comment, each signature
 * as 21 CFR 11.50(a) asks it to read (printed name, date and time, meaning) with whether the record
 * still holds what was signed (11.70), and each audit entry with old → new values (11.10(e)).
 */

type Item =
  | { kind: 'history'; at: string; key: string; entry: HistoryEntryDto }
  | { kind: 'signature'; at: string; key: string; entry: SignatureDto }
  | { kind: 'audit'; at: string; key: string; entry: AuditEntryDto };

const fieldLabels: Record<string, string> = {
  status: 'Status',
  number: 'Number',
  title: 'Title',
  whatHappened: 'What happened',
  immediateActions: 'Immediate actions',
  classification: 'Classification',
  classificationReason: 'Classification reason',
  severity: 'Severity',
  occurrence: 'Occurrence',
  detection: 'Detection',
  rpn: 'RPN',
  investigatorId: 'Investigator',
  ownerId: 'Owner',
  dueAt: 'Due',
  reportedAt: 'Reported',
  closedAt: 'Closed',
  closureJustification: 'Closure justification',
  cancelReason: 'Cancellation reason',
  heldBatchIds: 'Held batches',
  signature: 'Signature',
};

function show(field: string, value: unknown): string {
  if (value === null || value === undefined || value === '') return '(empty)';
  if (typeof value === 'string') {
    if (field === 'status') return deviationStateLabels[value as keyof typeof deviationStateLabels] ?? value;
    if (field === 'classification') return classificationLabels[value as keyof typeof classificationLabels] ?? value;
    if (field === 'disposition') return dispositionLabels[value as keyof typeof dispositionLabels] ?? value;
    if (/^\d{4}-\d{2}-\d{2}T/.test(value)) return formatUtc(value, true);
    return value.length > 160 ? `${value.slice(0, 157)}…` : value;
  }
  if (field === 'signature' && typeof value === 'object') {
    const s = value as { meaning?: string; recordVersion?: number };
    return `${s.meaning ?? 'signature'} on version ${s.recordVersion ?? '?'}`;
  }
  return typeof value === 'object' ? JSON.stringify(value) : String(value);
}

const actionLabels: Record<string, string> = {
  ...deviationEventLabels,
  create: 'Draft created',
  update_draft: 'Draft edited',
  record_triage: 'Triage recorded',
  signed: 'Signed',
};

export function DeviationTimeline({
  history,
  signatures,
  audit,
}: {
  history: readonly HistoryEntryDto[];
  signatures: readonly SignatureDto[];
  audit: readonly AuditEntryDto[] | null;
}) {
  const items: Item[] = [
    ...history.map((entry): Item => ({ kind: 'history', at: entry.at, key: `h${entry.id}`, entry })),
    ...signatures.map((entry): Item => ({ kind: 'signature', at: entry.signedAt, key: `s${entry.id}`, entry })),
    ...(audit ?? []).map((entry): Item => ({ kind: 'audit', at: entry.at, key: `a${entry.id}`, entry })),
  ].sort((a, b) => (a.at < b.at ? 1 : a.at > b.at ? -1 : a.key < b.key ? 1 : -1));
  if (items.length === 0) return <p className="text-ink-600">Nothing recorded yet.</p>;

  return (
    <ol className="relative flex flex-col gap-4 border-l-2 border-ink-200 pl-5">
      {items.map((item) => (
        <li key={item.key} className="relative">
          <span
            aria-hidden="true"
            className={`absolute top-1.5 -left-[27px] h-3 w-3 rounded-full border-2 bg-white ${
              item.kind === 'signature' ? 'border-brass-600' : item.kind === 'audit' ? 'border-ink-400' : 'border-ink-700'
            }`}
          />
          <TimelineItem item={item} />
        </li>
      ))}
    </ol>
  );
}

function TimelineItem({ item }: { item: Item }) {
  switch (item.kind) {
    case 'history': {
      const h = item.entry;
      return (
        <>
          <p className="font-semibold">
            {h.eventLabel}
            <span className="font-normal text-ink-700">
              {' '}
              — {h.fromLabel ? `${h.fromLabel} → ` : ''}
              {h.toLabel}
            </span>
          </p>
          <p className="text-sm text-ink-600">
            {formatUtc(h.at, true)} · {h.userName}
          </p>
          {h.comment ? <p className="mt-1 text-ink-800">{h.comment}</p> : null}
        </>
      );
    }
    case 'signature': {
      const s = item.entry;
      return (
        <>
          <p className="font-semibold">
            Signature: {s.meaningLabel} by {s.printedName}
            {s.printedTitle ? <span className="font-normal text-ink-600"> ({s.printedTitle})</span> : null}
          </p>
          <p className="text-sm text-ink-600">
            {formatUtc(s.signedAt, true)} · record version {s.recordVersion}
          </p>
          <p className="mt-1 flex flex-wrap gap-2">
            {s.matches ? (
              <StatusBadge tone="ok" label="Matches the record" />
            ) : (
              <StatusBadge tone="warn" label="Record changed after signing" />
            )}
            {s.intact ? null : <StatusBadge tone="danger" label="Signature entry altered" />}
          </p>
        </>
      );
    }
    case 'audit': {
      const e = item.entry;
      return (
        <>
          <p className="font-semibold">
            <span className="text-ink-600">Audit: </span>
            {actionLabels[e.action] ?? e.action.replace(/_/g, ' ').replace(/^./, (c) => c.toUpperCase())}
          </p>
          <p className="text-sm text-ink-600">
            {formatUtc(e.at, true)} · {e.userName}
          </p>
          {e.changes.length > 0 ? (
            <ul className="mt-1 text-sm break-words text-ink-800">
              {e.changes.map((c) => (
                <li key={c.field}>
                  {fieldLabels[c.field] ?? c.field}: {show(c.field, c.from)} → {show(c.field, c.to)}
                </li>
              ))}
            </ul>
          ) : null}
          {e.reason ? <p className="text-sm text-ink-700">Reason: {e.reason}</p> : null}
        </>
      );
    }
  }
}
