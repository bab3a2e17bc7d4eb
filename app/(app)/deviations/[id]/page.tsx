import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { DeviationStatusBadge, DispositionBadge } from '@/components/deviations/detail-badges';
import { DeviationTimeline } from '@/components/deviations/detail-timeline';
import { CommentForm } from '@/components/comments/comment-form';
import { CommentThread } from '@/components/comments/comment-thread';
import { EvidenceDropzone } from '@/components/evidence/evidence-dropzone';
import { EvidenceList } from '@/components/evidence/evidence-list';
import { DeviationEventForm, type DeviationEventFormProps } from '@/components/deviations/event-form';
import { InvestigationForm } from '@/components/deviations/investigation-form';
import { InvestigationView, hasInvestigationContent } from '@/components/deviations/investigation-view';
import { TriageForm } from '@/components/deviations/triage-form';
import { DispositionForm } from '@/components/deviations/disposition-form';
import { HoldSuggestions } from '@/components/deviations/hold-suggestions';
import { ClassificationBadge } from '@/components/risk/classification-badge';
import { BatchStatusBadge } from '@/components/ui/batch-status';
import { formatUtc } from '@/components/ui/format';
import { Notice } from '@/components/ui/notice';
import { BlockedEventList } from '@/components/records/blocked-events';
import { eventFormProps, type EventFormText } from '@/components/records/event-form-text';
import { DetailRow } from '@/components/ui/detail-row';
import { PageHeader } from '@/components/ui/page-header';
import { requirePageUser } from '@/lib/auth/session';
import { todayIn } from '@/lib/clocks/dates';
import { classifications, dueDateFor, dueDaysOf } from '@/lib/clocks/due-dates';
import { getAttachRefusal, listAttachments } from '@/lib/attachments/queries';
import { type DeviationDetailDto, getDeviationDetail, listActiveInvestigators } from '@/lib/deviations/detail';
import { listHeldBatchSizes, listHoldSuggestions } from '@/lib/deviations/batches';
import { classificationWithoutDefect } from '@/lib/deviations/commands';
import { listComments, listMentionOptions } from '@/lib/comments/queries';
import { getInvestigationView } from '@/lib/deviations/investigation';
import { classificationLabels, deviationEventLabels, dispositionLabels } from '@/lib/deviations/labels';
import { NotFoundError } from '@/lib/errors';
import { quarantineCaution } from '@/lib/risk/classify';
import { getCurrentRiskScales } from '@/lib/risk-scales/queries';
import { getDueDaySettings, getSiteTimeZone } from '@/lib/site-calendar/queries';
import type { DeviationEventType } from '@/workflows/deviation';
import { submitDeviationEvent, submitTriage } from './actions';
import { submitDisposition, submitHolds } from './batch-actions';
import { addDeviationComment } from './comment-actions';
import { saveInvestigationAction } from './investigation-actions';

export const metadata: Metadata = { title: 'Deviation' };

const doneMessages: Record<DeviationEventType | 'triage' | 'investigation' | 'investigation_capa' | 'disposition' | 'holds', string> = {
  disposition: 'The disposition is saved.',
  holds: 'The batches are on hold under this deviation.',
  investigation: 'The investigation is saved.',
  investigation_capa: 'The investigation is saved and a CAPA is proposed; its number is in the investigation section.',
  submit: 'The deviation is reported. Its batches are on hold and QA has it in the triage queue.',
  start_triage: 'Triage has started.',
  triage: 'The triage is saved.',
  assign_investigation: 'The investigation is open. The investigator is told by e-mail.',
  submit_for_approval: 'Submitted for approval. Your signature is recorded.',
  return_for_rework: 'Returned to the investigator with your comment.',
  approve: 'Approved and closed. Your signature is recorded and each held batch took its disposition.',
  close_minor: 'Closed as minor. Your signature is recorded.',
  cancel: 'The deviation is cancelled. Your signature is recorded.',
  discard: 'The draft is discarded. It was never reported and only you can see it.',
};

type Allowed = DeviationDetailDto['allowedEvents'][number];

const formTexts: Record<DeviationEventType, EventFormText> = {
  submit: {
    heading: 'Submit the deviation',
    description: 'Gives it its DEV number, puts the chosen batches on hold and sends it to QA.',
    submitLabel: 'Submit',
    pendingLabel: 'Submitting…',
  },
  discard: {
    heading: 'Discard the draft',
    description: 'Throws this draft away. It was never reported, so it gets no number and stays visible to you alone.',
    submitLabel: 'Discard the draft',
    pendingLabel: 'Discarding…',
    danger: true,
  },
  start_triage: {
    heading: 'Start triage',
    description: 'Take the deviation into triage to classify it and assign an investigator.',
    submitLabel: 'Start triage',
    pendingLabel: 'Starting…',
  },
  assign_investigation: {
    heading: 'Open the investigation',
    description: 'Hands the deviation to the assigned investigator, who is told by e-mail.',
    submitLabel: 'Open the investigation',
    pendingLabel: 'Opening…',
  },
  submit_for_approval: {
    heading: 'Submit for approval',
    description: 'Your signature says the investigation is complete; QA approvers are asked to review it.',
    submitLabel: 'Sign and submit',
    pendingLabel: 'Signing…',
  },
  return_for_rework: {
    heading: 'Return for rework',
    description: 'Sends the investigation back to the investigator. Say what is missing.',
    submitLabel: 'Return for rework',
    pendingLabel: 'Returning…',
    reasonLabel: 'Comment for the investigator',
    reasonHint: 'What needs more work. Recorded in the timeline with your name and the time.',
  },
  approve: {
    heading: 'Approve and close',
    description: 'Each held batch takes its disposition when you sign.',
    submitLabel: 'Sign and approve',
    pendingLabel: 'Signing…',
  },
  close_minor: {
    heading: 'Close as minor',
    description: 'Close this minor deviation at triage without a full investigation.',
    submitLabel: 'Sign and close',
    pendingLabel: 'Signing…',
    reasonLabel: 'Justification',
    reasonHint: 'Why no investigation is needed. Recorded with your signature.',
  },
  cancel: {
    heading: 'Cancel the deviation',
    description: 'Raised in error or a duplicate. Holds stay until each batch has a disposition.',
    submitLabel: 'Sign and cancel',
    pendingLabel: 'Signing…',
    danger: true,
    reasonLabel: 'Reason',
    reasonHint: 'Why it is cancelled (e.g. the number of the deviation it duplicates).',
  },
};

function formFor(detail: DeviationDetailDto, event: Allowed, signerName: string): DeviationEventFormProps {
  return {
    action: submitDeviationEvent,
    deviationId: detail.deviation.id,
    version: detail.deviation.version,
    event: event.type,
    ...eventFormProps(formTexts[event.type], event, signerName),
  };
}

function noActionsText(status: DeviationDetailDto['deviation']['status']): string {
  switch (status) {
    case 'closed':
      return 'This deviation is closed. Nothing more can be done to it.';
    case 'cancelled':
      return 'This deviation is cancelled. Nothing more can be done to it.';
    case 'discarded':
      return 'You discarded this draft. It was never reported, and only you can see it.';
    default:
      return 'Your role has nothing to do on this deviation at this stage.';
  }
}

const dateOnly = (iso: string | null) => (iso ? iso.slice(0, 10) : null);


export default async function DeviationPage({ params, searchParams }: PageProps<'/deviations/[id]'>) {
  const { id: rawId } = await params;
  const user = await requirePageUser('deviation.read', { returnTo: `/deviations/${encodeURIComponent(rawId)}` });
  const id = /^\d{1,9}$/.test(rawId) ? Number(rawId) : NaN;
  if (!Number.isSafeInteger(id) || id < 1) notFound();
  const detail = await getDeviationDetail(id, user).catch((err: unknown) => {
    if (err instanceof NotFoundError) notFound();
    throw err;
  });
  const { deviation: d, defect } = detail;
  const investigation = await getInvestigationView(id, user);
  const done = (await searchParams).done;
  const doneMessage = typeof done === 'string' && done in doneMessages ? doneMessages[done as keyof typeof doneMessages] : null;
  const critical = d.classification === 'critical' || (d.classification === null && defect?.defaultClassification === 'critical');

  // Every form below is offered exactly when the deviation's rules (lib/deviations/kind.ts) let this person use it.
  const { sections } = detail;
  const triage = sections.triage.editable ? await triageProps(detail) : null;
  const dispositionMode = sections.recommendation.editable ? 'recommend' : sections.disposition.editable ? 'decide' : null;
  const [batchSizes, holds] = await Promise.all([
    dispositionMode ? listHeldBatchSizes(id) : Promise.resolve({} as Record<number, number>),
    sections.holds.editable ? listHoldSuggestions(id, user) : Promise.resolve(null),
  ]);
  const title = d.number ?? 'Draft';
  const [evidence, attachRefusal, comments, mentionPeople] = await Promise.all([
    listAttachments('deviation', id, user),
    getAttachRefusal('deviation', id, user),
    listComments('deviation', id, user),
    listMentionOptions('deviation', id, user),
  ]);

  return (
    <>
      <p className="mb-2">
        <Link href="/deviations" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
          ← Deviations
        </Link>
      </p>
      <PageHeader
        title={`${title}: ${d.title}`}
        description={
          <dl className="mt-1 flex flex-wrap items-center gap-x-6 gap-y-2">
            <div className="flex items-center gap-2">
              <dt className="sr-only">Status</dt>
              <dd>
                <DeviationStatusBadge status={d.status} />
              </dd>
            </div>
            <div className="flex items-center gap-2">
              <dt>Classification</dt>
              <dd>{d.classification ? <ClassificationBadge classification={d.classification} /> : <span className="text-ink-800">Not classified yet</span>}</dd>
            </div>
            <div className="flex items-center gap-2">
              <dt>Due</dt>
              <dd className="text-ink-800">{dateOnly(d.dueAt) ?? 'Not set'}</dd>
            </div>
            <div className="flex items-center gap-2">
              <dt>Owner</dt>
              <dd className="text-ink-800">{detail.ownerName ?? 'Not assigned'}</dd>
            </div>
          </dl>
        }
      />
      {doneMessage ? (
        <div className="mb-6">
          <Notice tone="ok" title={doneMessage} />
        </div>
      ) : null}
      {critical ? (
        <div className="mb-6">
          <Notice tone="danger" title="Quarantine first" live={false}>
            {defect?.caution ?? quarantineCaution}
          </Notice>
        </div>
      ) : null}

      <div className="grid grid-cols-1 gap-6 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="flex min-w-0 flex-col gap-6 xl:col-start-1 xl:row-start-1">
          <section aria-labelledby="what-heading" className="rounded-lg border border-ink-200 bg-white p-5">
            <h2 id="what-heading" className="text-lg font-semibold">
              What happened
            </h2>
            <p className="mt-2 whitespace-pre-line text-ink-900">{d.whatHappened}</p>
            <dl className="mt-4 grid grid-cols-[max-content_minmax(0,1fr)] gap-x-6 gap-y-2">
              <DetailRow label="Defect">{defect ? `${defect.name} (${defect.code})` : 'Not named'}</DetailRow>
              <DetailRow label="Product">{detail.product ? `${detail.product.name} ${detail.product.strength} (${detail.product.code})` : 'Not named'}</DetailRow>
              <DetailRow label="Lot">{detail.lotNumber ?? 'Not named'}</DetailRow>
              <DetailRow label="Machine">{detail.machine ? `${detail.machine.name} (${detail.machine.assetTag})` : 'Not named'}</DetailRow>
              <DetailRow label="Filling ring">
                {detail.ring ? (
                  <Link href={`/equipment/rings/${detail.ring.id}`} className="underline underline-offset-4">
                    {detail.ring.serial}
                  </Link>
                ) : (
                  'Not named'
                )}
              </DetailRow>
              <DetailRow label="Capsules affected">{d.affectedCount ?? '—'}</DetailRow>
              {d.sampleDescription ? <DetailRow label="Sample">{d.sampleDescription}</DetailRow> : null}
              <DetailRow label="Occurred">{formatUtc(d.occurredAt)}</DetailRow>
              <DetailRow label="Raised by">{detail.raisedByName}</DetailRow>
              {d.reportedAt ? <DetailRow label="Reported">{formatUtc(d.reportedAt)}</DetailRow> : null}
              <DetailRow label="Done at once">
                {[d.lineStopped ? 'Line stopped' : null, d.capsulesSegregated ? 'Capsules segregated' : null].filter(Boolean).join(', ') || 'Nothing ticked'}
                {d.immediateActions ? <span className="mt-1 block whitespace-pre-line">{d.immediateActions}</span> : null}
              </DetailRow>
            </dl>
            <h3 id="held-batches-heading" className="mt-5 font-semibold">
              Held batches
            </h3>
            {detail.heldBatches.length === 0 ? (
              <p className="text-ink-600">No batches are held by this deviation.</p>
            ) : (
              <div className="mt-2 overflow-x-auto" role="region" aria-labelledby="held-batches-heading" tabIndex={0}>
                <table className="w-full text-left">
                  <caption className="sr-only">Batches held by this deviation, their status, recommended and final disposition</caption>
                  <thead>
                    <tr className="border-b border-ink-200 text-sm text-ink-600">
                      <th scope="col" className="py-2 pr-4">Lot</th>
                      <th scope="col" className="py-2 pr-4">Batch status</th>
                      <th scope="col" className="py-2 pr-4">Recommended</th>
                      <th scope="col" className="py-2 pr-4">Final disposition</th>
                    </tr>
                  </thead>
                  <tbody>
                    {detail.heldBatches.map((b) => (
                      <tr key={b.batchId} className="border-b border-ink-100 align-top">
                        <td className="py-2 pr-4 font-semibold">
                          {b.lotNumber}
                          {b.onHold ? null : <span className="block text-sm font-normal text-ink-600">hold lifted</span>}
                        </td>
                        <td className="py-2 pr-4">
                          <BatchStatusBadge status={b.batchStatus} />
                        </td>
                        <td className="py-2 pr-4">{b.recommendedDisposition ? dispositionLabels[b.recommendedDisposition] : '—'}</td>
                        <td className="py-2 pr-4">
                          <DispositionBadge disposition={b.disposition} />
                          {b.dispositionNote ? <span className="mt-1 block text-sm">{b.dispositionNote}</span> : null}
                          {b.samplingPlan ? <span className="mt-1 block text-sm text-ink-700">Sampling: {b.samplingPlan}</span> : null}
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            )}
            {dispositionMode
              ? detail.heldBatches
                  .filter((b) => b.onHold)
                  .map((b) => (
                    <DispositionForm
                      key={`disposition-${b.batchId}-${d.version}`}
                      action={submitDisposition}
                      deviationId={d.id}
                      version={d.version}
                      mode={dispositionMode}
                      overruling={d.status === 'approval'}
                      batch={{
                        batchId: b.batchId,
                        lotNumber: b.lotNumber,
                        lotSize: batchSizes[b.batchId] ?? 0,
                        recommendedDisposition: b.recommendedDisposition,
                        disposition: b.disposition,
                        dispositionNote: b.dispositionNote,
                      }}
                    />
                  ))
              : null}
          </section>

          {d.classification || d.rpn !== null || d.investigatorId !== null ? (
            <section aria-labelledby="triage-heading" className="rounded-lg border border-ink-200 bg-white p-5">
              <h2 id="triage-heading" className="text-lg font-semibold">
                Triage
              </h2>
              <dl className="mt-3 grid grid-cols-[max-content_minmax(0,1fr)] gap-x-6 gap-y-2">
                <DetailRow label="Classification">{d.classification ? classificationLabels[d.classification] : 'Not classified yet'}</DetailRow>
                <DetailRow label="S · O · D">
                  {d.severity ?? '–'} · {d.occurrence ?? '–'} · {d.detection ?? '–'}
                </DetailRow>
                <DetailRow label="RPN">{d.rpn ?? '—'}</DetailRow>
                {d.classificationReason ? <DetailRow label="Reason">{d.classificationReason}</DetailRow> : null}
                <DetailRow label="Investigator">{detail.investigatorName ?? 'Not assigned'}</DetailRow>
                <DetailRow label="Due">{dateOnly(d.dueAt) ?? 'Not set'}</DetailRow>
              </dl>
            </section>
          ) : null}

          {investigation.canEdit || hasInvestigationContent(investigation) ? (
            <section aria-labelledby="investigation-heading" className="scroll-mt-4 rounded-lg border border-ink-200 bg-white p-5">
              <h2 id="investigation-heading" className="text-lg font-semibold">
                Investigation
              </h2>
              {investigation.canEdit ? (
                <InvestigationForm
                  key={`investigation-${investigation.version}`}
                  action={saveInvestigationAction}
                  deviationId={investigation.deviationId}
                  version={investigation.version}
                  defectName={investigation.defectName}
                  report={investigation.report}
                  fiveWhys={investigation.fiveWhys}
                  branches={investigation.branches}
                  cautions={investigation.cautions}
                  rootCauseCategory={investigation.rootCauseCategory}
                  rootCause={investigation.rootCause}
                  productImpact={investigation.productImpact}
                  capaRequired={investigation.capaRequired}
                  capas={investigation.capas}
                />
              ) : (
                <InvestigationView view={investigation} />
              )}
            </section>
          ) : null}

          {d.closureJustification || d.cancelReason ? (
            <section aria-labelledby="closure-heading" className="rounded-lg border border-ink-200 bg-white p-5">
              <h2 id="closure-heading" className="text-lg font-semibold">
                {d.cancelReason ? 'Cancellation' : 'Closure'}
              </h2>
              <p className="mt-2 whitespace-pre-line">{d.cancelReason ?? d.closureJustification}</p>
              {d.closedAt ? <p className="mt-1 text-sm text-ink-600">{formatUtc(d.closedAt)}</p> : null}
            </section>
          ) : null}

        </div>

        <section aria-labelledby="actions-heading" className="flex min-w-0 flex-col gap-4 xl:col-span-2 xl:row-start-2">
          <h2 id="actions-heading" className="text-lg font-semibold">
            What you can do
          </h2>
          {triage ? <TriageForm key={`triage-${d.version}`} {...triage} /> : null}
          {holds ? (
            <HoldSuggestions
              key={`holds-${d.version}`}
              action={submitHolds}
              deviationId={d.id}
              version={d.version}
              windowText={
                holds.basis.kind === 'weight_check'
                  ? `since the last passing weight check before the deviation (${formatUtc(holds.basis.checkedAt)})`
                  : `in the ${holds.basis.days} days before the deviation (no passing weight check on record for this filler)`
              }
              suggestions={holds.suggestions}
            />
          ) : null}
          {detail.blockedEvents.length > 0 ? <BlockedEventList events={detail.blockedEvents} labels={deviationEventLabels} /> : null}
          {detail.allowedEvents.length === 0 && !triage ? (
            detail.blockedEvents.length === 0 ? <p className="text-ink-700">{noActionsText(d.status)}</p> : null
          ) : (
            <div className="grid grid-cols-1 items-start gap-4 lg:grid-cols-2">
              {detail.allowedEvents.map((event) => (
                <DeviationEventForm key={`${event.type}-${d.version}`} {...formFor(detail, event, user.name)} />
              ))}
            </div>
          )}
        </section>

        {/* Reading order is record, actions, timeline; on wide screens the timeline sits beside the record and scrolls on its own. */}
        <section
          aria-labelledby="timeline-heading"
          tabIndex={0}
          className="min-w-0 xl:col-start-2 xl:row-start-1 xl:max-h-[48rem] xl:overflow-y-auto xl:pr-2"
        >
          <h2 id="timeline-heading" className="mb-3 text-lg font-semibold">
            Timeline
          </h2>
          <DeviationTimeline history={detail.history} signatures={detail.signatures} audit={detail.audit} comments={comments} userNames={detail.userNames} />
        </section>
      </div>

      <div className="mt-6 grid grid-cols-1 gap-6 xl:grid-cols-2">
        <section id="evidence" aria-labelledby="evidence-heading" className="flex min-w-0 flex-col gap-4 rounded-lg border border-ink-200 bg-white p-5">
          <h2 id="evidence-heading" className="text-lg font-semibold">
            Evidence
          </h2>
          <EvidenceList items={evidence} />
          {attachRefusal ? (
            <p className="text-sm text-ink-600">{attachRefusal}</p>
          ) : (
            <EvidenceDropzone uploadUrl={`/api/deviations/${d.id}/attachments`} refreshAfterUpload hint="Each file is checked, given its SHA-256 and kept with this deviation for good." />
          )}
        </section>

        <section id="comments" aria-labelledby="comments-heading" className="flex min-w-0 flex-col gap-4 rounded-lg border border-ink-200 bg-white p-5">
          <h2 id="comments-heading" className="text-lg font-semibold">
            Comments
          </h2>
          <CommentThread comments={comments} />
          <CommentForm recordId={d.id} people={mentionPeople} action={addDeviationComment} />
        </section>
      </div>

    </>
  );
}

async function triageProps(detail: DeviationDetailDto) {
  const [scales, investigators, dueSettings, timeZone] = await Promise.all([
    getCurrentRiskScales(),
    listActiveInvestigators(),
    getDueDaySettings(),
    getSiteTimeZone(),
  ]);
  if (!scales) return null;
  const d = detail.deviation;
  // The classification clock runs from the day the deviation was reported, in the site's time zone.
  const openedOn = todayIn(timeZone, new Date(d.reportedAt ?? d.occurredAt));
  const dueDays = dueDaysOf(dueSettings);
  const dueDates = Object.fromEntries(classifications.map((c) => [c, dueDateFor(openedOn, c, dueDays)])) as Record<(typeof classifications)[number], string>;
  const dueHints = Object.fromEntries(
    classifications.map((c) => [
      c,
      `${dueDays[c]} days after reporting for ${classificationLabels[c].toLowerCase()} (${dueSettings[c].source === 'setting' ? 'site setting' : 'default'})`,
    ]),
  ) as Record<(typeof classifications)[number], string>;
  return {
    action: submitTriage,
    deviationId: d.id,
    version: d.version,
    scales: scales.scales,
    scaleVersion: scales.version,
    defaultClassification: detail.defect?.defaultClassification ?? classificationWithoutDefect,
    catalogueSeverity: detail.defect?.defaultSeverity ?? null,
    caution: detail.defect?.caution ?? null,
    initial: {
      ...(d.severity !== null ? { severity: d.severity } : {}),
      ...(d.occurrence !== null ? { occurrence: d.occurrence } : {}),
      ...(d.detection !== null ? { detection: d.detection } : {}),
    },
    investigators,
    investigatorId: d.investigatorId,
    dueDates,
    dueOn: dateOnly(d.dueAt),
    dueHints,
  };
}
