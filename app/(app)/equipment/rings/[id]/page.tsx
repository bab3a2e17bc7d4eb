import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { RingAuditTrail } from '@/components/equipment/ring-audit-trail';
import { RingConditionBadge, RingStatusBadge } from '@/components/equipment/ring-badges';
import { RingEventForm, type RingEventFormProps } from '@/components/equipment/ring-event-form';
import { RingHistory } from '@/components/equipment/ring-history';
import { SignatureList } from '@/components/equipment/signature-list';
import { BlockedEventList } from '@/components/records/blocked-events';
import { formatUtc } from '@/components/ui/format';
import { Notice } from '@/components/ui/notice';
import { PageHeader } from '@/components/ui/page-header';
import { requirePageUser } from '@/lib/auth/session';
import { NotFoundError } from '@/lib/errors';
import { ringConditionLabels, ringConditionOrder, ringEventLabels, serviceableConditions } from '@/lib/equipment/labels';
import { type RingDetailDto, getRingDetail } from '@/lib/equipment/queries';
import { signatureMeaningLabels, signatureMeaningStatements } from '@/lib/signatures/meanings';
import type { RingEventType } from '@/workflows/filling-ring';
import { submitRingEvent } from './actions';

export const metadata: Metadata = { title: 'Filling ring' };

const doneMessages: Record<RingEventType, string> = {
  quarantine: 'The ring is quarantined. QA will be told by e-mail.',
  return_to_service: 'The ring is back in service. Your signature is recorded.',
  retire: 'The ring is retired. Your signature is recorded.',
};

const conditionOptions = (values: readonly string[]) =>
  values.map((v) => ({ value: v, label: ringConditionLabels[v as keyof typeof ringConditionLabels] }));

function formFor(detail: RingDetailDto, event: RingDetailDto['allowedEvents'][number], signerName: string): RingEventFormProps {
  const { ring } = detail;
  const signature = event.signature
    ? {
        meaningLabel: signatureMeaningLabels[event.signature],
        statement: signatureMeaningStatements[event.signature],
        signerName,
      }
    : undefined;
  const common = { action: submitRingEvent, ringId: ring.id, version: ring.version, event: event.type, signature };
  switch (event.type) {
    case 'quarantine':
      return {
        ...common,
        heading: 'Quarantine this ring',
        description: 'Take the ring out of service until QA has inspected it.',
        submitLabel: 'Quarantine ring',
        pendingLabel: 'Quarantining…',
        caution:
          'Remove a ring only with the machine stopped, power isolated and interlocks intact, as the site procedure ' +
          'for change parts requires. Keep the capsules filled since the problem was seen apart until QA decides on them.',
        condition: {
          label: 'Condition found',
          options: [{ value: '', label: `Leave as recorded (${ringConditionLabels[ring.condition]})` }, ...conditionOptions(ringConditionOrder)],
          defaultValue: '',
          required: false,
        },
      };
    case 'return_to_service':
      return {
        ...common,
        heading: 'Return to service',
        description: 'After inspection: the ring is fit to be used on its machine again.',
        submitLabel: 'Sign and return to service',
        pendingLabel: 'Signing…',
        condition: {
          label: 'Condition after inspection',
          hint: 'A dented or damaged ring cannot go back into service; retire it instead.',
          options: conditionOptions(serviceableConditions),
          defaultValue: serviceableConditions.includes(ring.condition as 'good') ? ring.condition : 'good',
          required: true,
        },
      };
    case 'retire':
      return {
        ...common,
        heading: 'Retire this ring',
        description: 'Retirement is final: a retired ring never returns to a machine.',
        submitLabel: 'Sign and retire ring',
        pendingLabel: 'Signing…',
        danger: true,
      };
  }
}

function noActionsText(detail: RingDetailDto): string {
  if (detail.ring.status === 'retired') return 'This ring is retired. Retirement is final, so there is nothing more to do.';
  if (detail.ring.status === 'quarantined') {
    return 'This ring is quarantined. A QA investigator or approver inspects it and returns it to service or has it retired.';
  }
  return 'Your role has no lifecycle actions on this ring.';
}

export default async function RingPage({ params, searchParams }: PageProps<'/equipment/rings/[id]'>) {
  const { id: rawId } = await params;
  const user = await requirePageUser('equipment.read', { returnTo: `/equipment/rings/${encodeURIComponent(rawId)}` });
  const id = /^\d{1,9}$/.test(rawId) ? Number(rawId) : NaN;
  if (!Number.isSafeInteger(id)) notFound();
  const detail = await getRingDetail(user, id).catch((err: unknown) => {
    if (err instanceof NotFoundError) notFound();
    throw err;
  });
  const { ring, machine } = detail;
  const done = (await searchParams).done;
  const doneMessage = typeof done === 'string' && done in doneMessages ? doneMessages[done as RingEventType] : null;

  return (
    <>
      <p className="mb-2">
        <Link href="/equipment" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
          ← Equipment
        </Link>
      </p>
      <PageHeader
        title={`Filling ring ${ring.serial}`}
        description={`Size ${ring.capsuleSize} on ${machine.name} (${machine.assetTag}), ${machine.room}`}
      />
      {doneMessage ? (
        <div className="mb-6">
          <Notice tone="ok" title={doneMessage} />
        </div>
      ) : null}

      <div className="grid grid-cols-1 gap-6 lg:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
        <div className="flex flex-col gap-6">
          <section aria-labelledby="ring-heading" className="rounded-lg border border-ink-200 bg-white p-5">
            <h2 id="ring-heading" className="text-lg font-semibold">
              Ring
            </h2>
            <dl className="mt-3 grid grid-cols-[max-content_1fr] gap-x-6 gap-y-2">
              <dt className="text-ink-600">Status</dt>
              <dd>
                <RingStatusBadge status={ring.status} />
              </dd>
              <dt className="text-ink-600">Condition</dt>
              <dd>
                <RingConditionBadge condition={ring.condition} />
              </dd>
              {ring.statusReason ? (
                <>
                  <dt className="text-ink-600">Reason</dt>
                  <dd>{ring.statusReason}</dd>
                </>
              ) : null}
              {ring.retiredAt ? (
                <>
                  <dt className="text-ink-600">Retired</dt>
                  <dd>{formatUtc(ring.retiredAt, true)}</dd>
                </>
              ) : null}
              <dt className="text-ink-600">Machine</dt>
              <dd>
                {machine.name} ({machine.assetTag}){machine.active ? '' : ' — machine inactive'}
              </dd>
              <dt className="text-ink-600">Capsule size</dt>
              <dd>{ring.capsuleSize}</dd>
              <dt className="text-ink-600">Last changed</dt>
              <dd>
                {formatUtc(ring.updatedAt, true)} (version {ring.version})
              </dd>
            </dl>
          </section>

          <section aria-labelledby="actions-heading" className="flex flex-col gap-4">
            <h2 id="actions-heading" className="text-lg font-semibold">
              What you can do
            </h2>
            <BlockedEventList events={detail.blockedEvents} labels={ringEventLabels} />
            {detail.allowedEvents.length === 0 ? (
              detail.blockedEvents.length === 0 ? <p className="text-ink-700">{noActionsText(detail)}</p> : null
            ) : (
              detail.allowedEvents.map((event) => (
                <RingEventForm key={`${event.type}-${ring.version}`} {...formFor(detail, event, user.name)} />
              ))
            )}
          </section>
        </div>

        <div className="flex flex-col gap-6">
          <section aria-labelledby="signatures-heading">
            <h2 id="signatures-heading" className="mb-3 text-lg font-semibold">
              Signatures
            </h2>
            <SignatureList signatures={detail.signatures} />
          </section>
          <section aria-labelledby="history-heading">
            <h2 id="history-heading" className="mb-3 text-lg font-semibold">
              History
            </h2>
            <RingHistory entries={detail.history} />
          </section>
          {detail.audit ? (
            <section aria-labelledby="audit-heading">
              <h2 id="audit-heading" className="mb-3 text-lg font-semibold">
                Audit trail
              </h2>
              <RingAuditTrail entries={detail.audit} />
            </section>
          ) : null}
        </div>
      </div>
    </>
  );
}
