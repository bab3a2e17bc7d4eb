import { StatusBadge } from '@/components/ui/status-badge';
import type { SignatureDto } from '@/lib/signatures';

/*
 * Whether a signature still stands for the record (21 CFR 11.70): it matches what the record holds
 * now for what that meaning covers, or it says which parts changed since it was signed; a later
 * signature of the same meaning (after a rework or a reopen) takes over from it; and the signature
 * entry itself is unaltered.
 */

export function SignatureStatus({ s }: { s: SignatureDto }) {
  return (
    <>
      <p className="mt-1 flex flex-wrap gap-2">
        {s.matches ? (
          <StatusBadge tone="ok" label="Matches the record" />
        ) : (
          <StatusBadge tone={s.supersededBy ? 'neutral' : 'warn'} label="Record changed after signing" />
        )}
        {s.supersededBy ? <StatusBadge tone="neutral" label="Signed again later" /> : null}
        {s.intact ? null : <StatusBadge tone="danger" label="Signature entry altered" />}
      </p>
      {!s.matches && s.changedParts.length > 0 ? (
        <p className="text-sm text-ink-700" data-testid={`signature-${s.id}-changed`}>
          Changed since signing: {s.changedParts.join(', ')}.
        </p>
      ) : null}
    </>
  );
}
