import { formatUtc } from '@/components/ui/format';
import type { AttachmentDto } from '@/lib/attachments/dto';
import { formatBytes } from '@/lib/attachments/limits';

/*
 * A record's evidence: a thumbnail for photos, then what an auditor checks: name, type, size, the
 * SHA-256 the app computed when the file arrived, who added it and when. Downloads go through a
 * permission check and a link that lives five minutes.
 */

export function EvidenceList({ items }: { items: AttachmentDto[] }) {
  if (items.length === 0) return <p className="text-ink-600">No evidence attached yet.</p>;
  return (
    <ul className="flex flex-col gap-3" aria-label="Attached evidence">
      {items.map((a) => (
        <li key={a.id} className="flex gap-4 rounded-md border border-ink-200 bg-white p-3">
          {a.previewPath ? (
            <a href={a.previewPath} target="_blank" rel="noopener" className="shrink-0" aria-label={`Open the photo ${a.fileName}`}>
              {/* eslint-disable-next-line @next/next/no-img-element -- served through the app's permission check, not the image optimiser */}
              <img src={a.previewPath} alt={`Photo: ${a.fileName}`} loading="lazy" className="h-24 w-24 rounded border border-ink-200 object-cover" />
            </a>
          ) : (
            <span aria-hidden="true" className="flex h-24 w-24 shrink-0 items-center justify-center rounded border border-ink-200 bg-ink-50 text-sm font-semibold text-ink-600">
              {a.typeLabel.split(' ')[0]}
            </span>
          )}
          <div className="flex min-w-0 flex-1 flex-col gap-1">
            <p className="break-all font-semibold">{a.fileName}</p>
            <p className="text-sm text-ink-700">
              {a.typeLabel} · {formatBytes(a.sizeBytes)} · added by {a.uploadedByName}, {formatUtc(a.uploadedAt)}
            </p>
            <p className="text-sm text-ink-700">
              <span className="font-semibold">SHA-256</span> <code className="break-all font-mono text-xs text-ink-900">{a.sha256}</code>
            </p>
            <p>
              <a href={a.downloadPath} className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
                Download <span className="sr-only">{a.fileName}</span>
              </a>
            </p>
          </div>
        </li>
      ))}
    </ul>
  );
}
