import { formatUtc } from '@/components/ui/format';
import { type TimelineComment, type TimelineEntry, buildTimeline, isMeaningfulChange, userIdFields } from '@/lib/records/timeline';
import type { AuditEntryDto, HistoryEntryDto } from '@/lib/records/trail';
import type { SignatureDto } from '@/lib/signatures';
import { SignatureStatus } from './signature-status';

/*
 * A record's story in one list, newest first, for every record type: each transition once, with its
 * comment, its field changes and its signature as 21 CFR 11.50(a) asks it to read (printed name, date
 * and time, meaning) and whether the record still holds what was signed (11.70); every other audit
 * entry with old → new values (11.10(e)); and the comments. lib/records/timeline.ts does the merging;
 * each record type brings its words (a TimelineVocabulary).
 */

export interface TimelineVocabulary {
  fieldLabels: Readonly<Record<string, string>>;
  /** Audit actions (the record's events and its other commands) in words. */
  actionLabels: Readonly<Record<string, string>>;
  /** Values in the record's own words (states, classes, kinds); undefined falls back to the general rules. */
  formatValue?: (field: string, value: unknown) => string | undefined;
  /** Fields that name a user by id besides the common ones (owner, investigator, ...). */
  extraUserIdFields?: readonly string[];
}

type Names = Readonly<Record<number, string>>;

const commonFieldLabels: Record<string, string> = {
  status: 'Status',
  number: 'Number',
  title: 'Title',
  ownerId: 'Owner',
  dueAt: 'Due',
  closedAt: 'Closed',
  cancelReason: 'Cancellation reason',
  signature: 'Signature',
  attachment: 'File',
  comment: 'Comment',
};

const commonActionLabels: Record<string, string> = {
  signed: 'Signed',
  comment: 'Comment added',
  attachment_added: 'Evidence attached',
};

/**
 * Field names may carry what they are about: "disposition (BW-2026-1110-A)" for a batch of a
 * deviation, "action 12 · ownerId" for a CAPA's action. The label keeps that; the value is shown as
 * the base field's.
 */
function splitField(field: string, labels: Readonly<Record<string, string>>): { label: string; field: string } {
  const label = (f: string) => labels[f] ?? commonFieldLabels[f] ?? f;
  const about = /^(\w+) \((.+)\)$/.exec(field);
  if (about) return { label: `${label(about[1]!)} (${about[2]})`, field: about[1]! };
  const action = /^action (\d+) · (\w+)$/.exec(field);
  if (action) return { label: `Action ${action[1]} · ${label(action[2]!)}`, field: action[2]! };
  return { label: label(field), field };
}

const entities: Record<string, string> = { amp: '&', lt: '<', gt: '>', quot: '"', '#39': "'", nbsp: ' ' };

function decodeEntities(text: string): string {
  return text.replace(/&(amp|lt|gt|quot|#39|nbsp);/g, (m, name: string) => entities[name] ?? m);
}

const clip = (text: string) => (text.length > 160 ? `${text.slice(0, 157)}…` : text);

function show(field: string, value: unknown, names: Names, vocabulary: TimelineVocabulary): string {
  if (value === null || value === undefined || value === '') return '(empty)';
  const own = vocabulary.formatValue?.(field, value);
  if (own !== undefined) return own;
  const userFields: readonly string[] = [...userIdFields, ...(vocabulary.extraUserIdFields ?? [])];
  if (typeof value === 'number' && userFields.includes(field)) return names[value] ?? `user #${value}`;
  if (typeof value === 'boolean') return value ? 'Yes' : 'No';
  if (typeof value === 'string') {
    if (/^\d{4}-\d{2}-\d{2}T/.test(value)) return formatUtc(value, true);
    // Rich text reads as its words here; the full saved version stays in the audit trail itself.
    return clip(value.includes('<') ? decodeEntities(value.replace(/<[^>]*>/g, ' ')).replace(/\s+/g, ' ').trim() : value);
  }
  if (field === 'attachment' && typeof value === 'object') {
    const a = value as { fileName?: string; sha256?: string };
    return `${a.fileName ?? 'file'}${a.sha256 ? ` (SHA-256 ${a.sha256.slice(0, 12)}…)` : ''}`;
  }
  if (field === 'signature' && typeof value === 'object') {
    const s = value as { meaning?: string; recordVersion?: number };
    return `${s.meaning ?? 'signature'} on version ${s.recordVersion ?? '?'}`;
  }
  return clip(typeof value === 'object' ? JSON.stringify(value) : String(value));
}

export interface RecordTimelineProps {
  history: readonly HistoryEntryDto[];
  signatures: readonly SignatureDto[];
  audit: readonly AuditEntryDto[] | null;
  comments?: readonly TimelineComment[];
  userNames?: Names;
}

export function RecordTimeline({ history, signatures, audit, comments, userNames = {}, vocabulary }: RecordTimelineProps & { vocabulary: TimelineVocabulary }) {
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
          <TimelineItem item={item} names={userNames} vocabulary={vocabulary} />
        </li>
      ))}
    </ol>
  );
}

function Changes({
  entries,
  names,
  skipStatus,
  vocabulary,
}: {
  entries: readonly AuditEntryDto[];
  names: Names;
  skipStatus: boolean;
  vocabulary: TimelineVocabulary;
}) {
  const lines = entries.flatMap((e) =>
    e.changes
      .filter((c) => isMeaningfulChange(c) && !(skipStatus && (c.field === 'status' || c.field === 'signature')))
      .map((c) => ({ key: `${e.id}-${c.field}`, c, ...splitField(c.field, vocabulary.fieldLabels) })),
  );
  if (lines.length === 0) return null;
  return (
    <ul className="mt-1 text-sm break-words text-ink-800">
      {lines.map(({ key, c, label, field }) => (
        <li key={key}>
          {label}: {show(field, c.from, names, vocabulary)} → {show(field, c.to, names, vocabulary)}
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
      <SignatureStatus s={s} />
    </>
  );
}

function actionLabel(action: string, vocabulary: TimelineVocabulary): string {
  return vocabulary.actionLabels[action] ?? commonActionLabels[action] ?? action.replace(/_/g, ' ').replace(/^./, (c) => c.toUpperCase());
}

function TimelineItem({ item, names, vocabulary }: { item: TimelineEntry; names: Names; vocabulary: TimelineVocabulary }) {
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
          <Changes entries={item.audit} names={names} skipStatus vocabulary={vocabulary} />
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
            {actionLabel(e.action, vocabulary)}
          </p>
          <p className="text-sm text-ink-600">
            {formatUtc(e.at, true)} · {e.userName}
          </p>
          <Changes entries={[e]} names={names} skipStatus={false} vocabulary={vocabulary} />
          {e.reason ? <p className="text-sm text-ink-700">Reason: {e.reason}</p> : null}
        </>
      );
    }
  }
}
