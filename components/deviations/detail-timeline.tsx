import { formatUtc } from '@/components/ui/format';
import { StatusBadge } from '@/components/ui/status-badge';
import { classificationLabels, deviationEventLabels, deviationStateLabels, dispositionLabels } from '@/lib/deviations/labels';
import { type TimelineComment, type TimelineEntry, buildTimeline, isMeaningfulChange, userIdFields } from '@/lib/records/timeline';
import type { AuditEntryDto, HistoryEntryDto } from '@/lib/records/trail';
import type { SignatureDto } from '@/lib/signatures';

/*
 * The deviation's story in one list, newest first: each transition once, with its comment, its
 * field changes and its signature as 21 CFR 11.50(a) asks it to read (printed name, date and time,
 * meaning) and whether the record still holds what was signed (11.70); every other audit entry with
 * old → new values (11.10(e)); and the comments. lib/records/timeline.ts does the merging.
 */

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
  investigationReport: 'Investigation report',
  rootCauseCategory: 'Root-cause category',
  rootCause: 'Root cause',
  productImpact: 'Product impact',
  capaRequired: 'CAPA needed',
  fiveWhys: '5-whys',
  causeAnalysis: 'Cause-and-effect',
  affectedCount: 'Capsules affected',
  sampleDescription: 'Sample',
  lineStopped: 'Line stopped',
  capsulesSegregated: 'Capsules segregated',
  defectId: 'Defect',
  productId: 'Product',
  batchId: 'Batch',
  machineId: 'Machine',
  ringId: 'Filling ring',
  occurredAt: 'Occurred',
  recommendedDisposition: 'Recommended disposition',
  disposition: 'Disposition',
  dispositionNote: 'Disposition note',
  samplingPlan: 'Re-inspection plan',
  attachment: 'File',
  comment: 'Comment',
};

/** Per-batch changes are named "disposition (BW-2026-1110-A)": the label of the field, then the lot. */
function labelOf(field: string): string {
  const m = /^(\w+) \((.+)\)$/.exec(field);
  if (m) return `${fieldLabels[m[1]!] ?? m[1]} (${m[2]})`;
  return fieldLabels[field] ?? field;
}

const baseField = (field: string) => field.replace(/ \(.+\)$/, '');

type Names = Readonly<Record<number, string>>;

const entities: Record<string, string> = { amp: '&', lt: '<', gt: '>', quot: '"', '#39': "'", nbsp: ' ' };

function decodeEntities(text: string): string {
  return text.replace(/&(amp|lt|gt|quot|#39|nbsp);/g, (_m, name: string) => entities[name] ?? _m);
}

/** The 5-whys and the cause marks are stored as JSON; the timeline says what they hold in words. */
function summariseJson(field: string, value: string): string {
  let parsed: unknown;
  try {
    parsed = JSON.parse(value);
  } catch {
    return value.length > 160 ? `${value.slice(0, 157)}…` : value;
  }
  if (field === 'fiveWhys' && Array.isArray(parsed)) {
    const pairs = parsed as { why?: string; because?: string }[];
    const last = pairs[pairs.length - 1];
    return `${pairs.length} ${pairs.length === 1 ? 'why' : 'whys'}${last?.because ? `, last answer: ${last.because}` : ''}`;
  }
  if (field === 'causeAnalysis' && parsed && typeof parsed === 'object') {
    const marks = [
      ...(((parsed as { catalogue?: unknown[] }).catalogue ?? []) as { state?: string }[]),
      ...(((parsed as { own?: unknown[] }).own ?? []) as { state?: string }[]),
    ];
    const count = (state: string) => marks.filter((m) => m.state === state).length;
    return `${count('root_cause')} root cause, ${count('contributing')} contributing, ${count('ruled_out')} ruled out`;
  }
  return value.length > 160 ? `${value.slice(0, 157)}…` : value;
}

function show(rawField: string, value: unknown, names: Names): string {
  const field = baseField(rawField);
  if (value === null || value === undefined || value === '') return '(empty)';
  if (typeof value === 'number' && (userIdFields as readonly string[]).includes(field)) return names[value] ?? `user #${value}`;
  if (typeof value === 'boolean') return value ? 'Yes' : 'No';
  if (typeof value === 'string') {
    if (field === 'status') return deviationStateLabels[value as keyof typeof deviationStateLabels] ?? value;
    if (field === 'classification') return classificationLabels[value as keyof typeof classificationLabels] ?? value;
    if (field === 'disposition' || field === 'recommendedDisposition') return dispositionLabels[value as keyof typeof dispositionLabels] ?? value;
    if (/^\d{4}-\d{2}-\d{2}T/.test(value)) return formatUtc(value, true);
    if (field === 'fiveWhys' || field === 'causeAnalysis') return summariseJson(field, value);
    // Rich text reads as its words here; the full saved version stays in the audit trail itself.
    const text = value.includes('<') ? decodeEntities(value.replace(/<[^>]*>/g, ' ')).replace(/\s+/g, ' ').trim() : value;
    return text.length > 160 ? `${text.slice(0, 157)}…` : text;
  }
  if (field === 'attachment' && typeof value === 'object') {
    const a = value as { fileName?: string; sha256?: string };
    return `${a.fileName ?? 'file'}${a.sha256 ? ` (SHA-256 ${a.sha256.slice(0, 12)}…)` : ''}`;
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
  record_disposition: 'Disposition recorded',
  extend_holds: 'Holds extended',
  save_investigation: 'Investigation saved',
  comment: 'Comment added',
  attachment_added: 'Evidence attached',
};

export function DeviationTimeline({
  history,
  signatures,
  audit,
  comments,
  userNames = {},
}: {
  history: readonly HistoryEntryDto[];
  signatures: readonly SignatureDto[];
  audit: readonly AuditEntryDto[] | null;
  comments?: readonly TimelineComment[];
  userNames?: Names;
}) {
  const items = buildTimeline({ history, signatures, audit, comments });
  if (items.length === 0) return <p className="text-ink-600">Nothing recorded yet.</p>;

  return (
    <ol className="relative flex flex-col gap-4 border-l-2 border-ink-200 pl-5">
      {items.map((item) => (
        <li key={item.key} className="relative">
          <span
            aria-hidden="true"
            className={`absolute top-1.5 -left-[27px] h-3 w-3 rounded-full border-2 bg-white ${
              item.kind === 'signature' || (item.kind === 'transition' && item.signatures.length > 0)
                ? 'border-brass-600'
                : item.kind === 'audit' || item.kind === 'comment'
                  ? 'border-ink-400'
                  : 'border-ink-700'
            }`}
          />
          <TimelineItem item={item} names={userNames} />
        </li>
      ))}
    </ol>
  );
}

function Changes({ entries, names, skipStatus }: { entries: readonly AuditEntryDto[]; names: Names; skipStatus: boolean }) {
  const lines = entries.flatMap((e) =>
    e.changes
      .filter((c) => isMeaningfulChange(c) && !(skipStatus && (c.field === 'status' || c.field === 'signature')))
      .map((c) => ({ key: `${e.id}-${c.field}`, c })),
  );
  if (lines.length === 0) return null;
  return (
    <ul className="mt-1 text-sm break-words text-ink-800">
      {lines.map(({ key, c }) => (
        <li key={key}>
          {labelOf(c.field)}: {show(c.field, c.from, names)} → {show(c.field, c.to, names)}
        </li>
      ))}
    </ul>
  );
}

function SignatureLine({ s }: { s: SignatureDto }) {
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
        {s.matches ? <StatusBadge tone="ok" label="Matches the record" /> : <StatusBadge tone="warn" label="Record changed after signing" />}
        {s.intact ? null : <StatusBadge tone="danger" label="Signature entry altered" />}
      </p>
    </>
  );
}

function TimelineItem({ item, names }: { item: TimelineEntry; names: Names }) {
  switch (item.kind) {
    case 'transition': {
      const h = item.history;
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
          <Changes entries={item.audit} names={names} skipStatus />
          {item.signatures.map((s) => (
            <div key={s.id} className="mt-2 border-l-2 border-brass-600 pl-3">
              <SignatureLine s={s} />
            </div>
          ))}
        </>
      );
    }
    case 'signature':
      return <SignatureLine s={item.signature} />;
    case 'comment': {
      const c = item.comment;
      return (
        <>
          <p className="font-semibold">Comment by {c.userName}</p>
          <p className="text-sm text-ink-600">{formatUtc(c.at, true)}</p>
          <p className="mt-1 whitespace-pre-line break-words text-ink-800">{c.body}</p>
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
          <Changes entries={[e]} names={names} skipStatus={false} />
          {e.reason ? <p className="text-sm text-ink-700">Reason: {e.reason}</p> : null}
        </>
      );
    }
  }
}
