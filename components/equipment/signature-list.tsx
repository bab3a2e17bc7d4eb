import { formatUtc } from '@/components/ui/format';
import { SignatureStatus } from '@/components/records/signature-status';
import type { SignatureDto } from '@/lib/signatures';

/*
 * Signatures as 21 CFR 11.50(a) asks them to read: printed name, date and time, and meaning. Each
 * says whether the record still holds what was signed (11.70) and whether the signature row itself
 * is unaltered.
 */

export function SignatureList({ signatures }: { signatures: readonly SignatureDto[] }) {
  if (signatures.length === 0) return <p className="text-ink-600">No signatures yet.</p>;
  return (
    <ol className="flex flex-col divide-y divide-ink-200 rounded-lg border border-ink-200 bg-white">
      {signatures.map((s) => (
        <li key={s.id} className="flex flex-col gap-1 px-4 py-3">
          <p className="flex flex-wrap items-center gap-x-3 gap-y-1">
            <span className="font-semibold">
              {s.meaningLabel} by {s.printedName}
            </span>
            {s.printedTitle ? <span className="text-ink-600">{s.printedTitle}</span> : null}
          </p>
          <p className="text-sm text-ink-700">
            {formatUtc(s.signedAt, true)} · record version {s.recordVersion}
          </p>
          <SignatureStatus s={s} />
        </li>
      ))}
    </ol>
  );
}
