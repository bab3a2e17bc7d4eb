import { formatUtc } from '@/components/ui/format';
import { StatusBadge } from '@/components/ui/status-badge';
import { capaActionCategoryLabels, capaActionKindLabels, capaEventLabels, capaSourceLabels, capaStateLabels } from '@/lib/capa/labels';
import { type TimelineEntry, buildTimeline, isMeaningfulChange, userIdFields } from '@/lib/records/timeline';
import type { AuditEntryDto, HistoryEntryDto } from '@/lib/records/trail';
import type { SignatureDto } from '@/lib/signatures';

/*
 * The CAPA's story, newest first: each transition once with its comment, field changes and signature
 * (21 CFR 11.50(a): printed name, date and time, meaning; 11.70: whether the record still holds what
 * was signed), and every other audit entry old → new (11.10(e)), the plan's actions included ("Action
 * 12 · Owner"). lib/records/timeline.ts does the merging, as for deviations.
 */

const fieldLabels: Record<string, string> = {
  status: 'Status',
  number: 'Number',
  title: 'Title',
  sourceType: 'Source',
  sourceId: 'Source record',
  problemStatement: 'Problem statement',
  rootCause: 'Root cause',
  effectivenessCriteria: 'Effectiveness criteria',
  recurrenceCriterion: 'Recurrence criterion',
  effectivenessResult: 'Effectiveness result',
  effectivenessNote: 'Why not effective',
  cancelReason: 'Cancellation reason',
  ownerId: 'Owner',
  createdBy: 'Opened by',
  planRound: 'Plan round',
  dueAt: 'Due',
  effectivenessDueAt: 'Effectiveness check due',
  actionsCompletedAt: 'Actions completed',
  planApprovedAt: 'Plan approved',
  effectivenessOpenedAt: 'Effectiveness check opened',
  closedAt: 'Closed',
  signature: 'Signature',
  kind: 'Kind',
  category: 'What it changes',
  description: 'Description',
  round: 'Round',
  completedAt: 'Completed',
  completedBy: 'Completed by',
  evidence: 'Evidence',
};

type Names = Readonly<Record<number, string>>;

/** "action 12 · ownerId" → { label: "Action 12 · Owner", field: "ownerId" }. */
function splitField(field: string): { label: string; field: string } {
  const m = /^action (\d+) · (\w+)$/.exec(field);
  if (m) return { label: `Action ${m[1]} · ${fieldLabels[m[2]!] ?? m[2]}`, field: m[2]! };
  return { label: fieldLabels[field] ?? field, field };
}

function show(field: string, value: unknown, names: Names): string {
  if (value === null || value === undefined || value === '') return '(empty)';
  if (typeof value === 'number' && ([...userIdFields, 'completedBy'] as readonly string[]).includes(field)) return names[value] ?? `user #${value}`;
  if (typeof value === 'boolean') return value ? 'Yes' : 'No';
  if (typeof value === 'string') {
    if (field === 'status') return capaStateLabels[value as keyof typeof capaStateLabels] ?? value;
    if (field === 'sourceType') return capaSourceLabels[value as keyof typeof capaSourceLabels] ?? value;
    if (field === 'kind') return capaActionKindLabels[value as keyof typeof capaActionKindLabels] ?? value;
    if (field === 'category') return capaActionCategoryLabels[value as keyof typeof capaActionCategoryLabels] ?? value;
    if (field === 'effectivenessResult') return value === 'effective' ? 'Effective' : 'Not effective';
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
  ...capaEventLabels,
  create: 'CAPA opened',
  update_plan: 'Plan edited',
  add_action: 'Action added',
  update_action: 'Action changed',
  complete_action: 'Action completed',
  request_plan_approval: 'Plan approval requested',
  signed: 'Signed',
};

function Changes({ entries, names, skipStatus }: { entries: readonly AuditEntryDto[]; names: Names; skipStatus: boolean }) {
  const lines = entries.flatMap((e) =>
    e.changes
      .filter((c) => isMeaningfulChange(c) && !(skipStatus && (c.field === 'status' || c.field === 'signature')))
      .map((c) => ({ key: `${e.id}-${c.field}`, c, ...splitField(c.field) })),
  );
  if (lines.length === 0) return null;
  return (
    <ul className="mt-1 text-sm break-words text-ink-800">
      {lines.map(({ key, c, label, field }) => (
        <li key={key}>
          {label}: {show(field, c.from, names)} → {show(field, c.to, names)}
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

function Item({ item, names }: { item: TimelineEntry; names: Names }) {
  switch (item.kind) {
    case 'transition': {
      const h = item.history;
      return (
        <>
          <p className="font-semibold">
            {h.event === 'create' ? 'CAPA opened' : h.eventLabel}
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
    case 'comment':
      return (
        <>
          <p className="font-semibold">Comment by {item.comment.userName}</p>
          <p className="text-sm text-ink-600">{formatUtc(item.comment.at, true)}</p>
          <p className="mt-1 whitespace-pre-line break-words text-ink-800">{item.comment.body}</p>
        </>
      );
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

export function CapaTimeline({
  history,
  signatures,
  audit,
  userNames = {},
}: {
  history: readonly HistoryEntryDto[];
  signatures: readonly SignatureDto[];
  audit: readonly AuditEntryDto[] | null;
  userNames?: Names;
}) {
  const items = buildTimeline({ history, signatures, audit });
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
                : item.kind === 'audit'
                  ? 'border-ink-400'
                  : 'border-ink-700'
            }`}
          />
          <Item item={item} names={userNames} />
        </li>
      ))}
    </ol>
  );
}
