import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { AssessmentForm } from '@/components/complaints/assessment-form';
import { BatchDeviations } from '@/components/complaints/batch-deviations';
import { ComplaintEventForm, type ComplaintEventFormProps } from '@/components/complaints/event-form';
import { InvestigationForm, LinkForm, RaiseCapaForm, ReportSubmittedForm } from '@/components/complaints/investigation-forms';
import { LetterForm, SendForm } from '@/components/complaints/response-forms';
import { ComplaintStatusBadge, ReportCountdownBadge } from '@/components/complaints/status-badge';
import { ComplaintTimeline } from '@/components/complaints/timeline';
import { EvidenceDropzone } from '@/components/evidence/evidence-dropzone';
import { EvidenceList } from '@/components/evidence/evidence-list';
import { RichTextView } from '@/components/rich-text/rich-text-view';
import { buttonClasses } from '@/components/ui/button';
import { formatUtc } from '@/components/ui/format';
import { Notice } from '@/components/ui/notice';
import { BlockedEventList } from '@/components/records/blocked-events';
import { eventFormProps, type EventFormText } from '@/components/records/event-form-text';
import { DetailRow } from '@/components/ui/detail-row';
import { PageHeader } from '@/components/ui/page-header';
import { StatusBadge } from '@/components/ui/status-badge';
import { listAttachments } from '@/lib/attachments/queries';
import { requirePageUser } from '@/lib/auth/session';
import { todayIn } from '@/lib/clocks/dates';
import { type ComplaintDetailDto, getComplaintDetail, listCapaOwnerOptions } from '@/lib/complaints/detail';
import {
  complainantKindLabels,
  complaintEventLabels,
  complaintStateLabels,
  intakeChannelLabels,
  reportKindLabels,
  responseChannelLabels,
} from '@/lib/complaints/labels';
import { isEmailAddress } from '@/lib/complaints/letter';
import { listCategoryOptions } from '@/lib/complaints/queries';
import { NotFoundError } from '@/lib/errors';
import { getSiteTimeZone } from '@/lib/site-calendar/queries';
import { type ComplaintEventType, complaintEvents } from '@/workflows/complaint';
import {
  submitAssessment,
  submitComplaintEvent,
  submitInvestigation,
  submitLetter,
  submitLink,
  submitRaiseCapa,
  submitReport,
  submitSend,
} from './actions';

export const metadata: Metadata = { title: 'Complaint' };

const doneMessages: Record<string, string> = {
  received: 'The complaint is saved. QA is told by e-mail. Add photos or files under Evidence if you have them.',
  assessment: 'The assessment is saved. Sign it below when the decision is final.',
  investigation: 'The investigation is saved.',
  link_deviation: 'The deviation is linked.',
  link_capa: 'The CAPA is linked.',
  capa: 'The CAPA is raised and linked; its owner is told by e-mail.',
  letter: 'The letter is saved. Send it when it is ready.',
  sent_email: 'The answer is queued for e-mail to the complainant and kept with the record. QA approvers are asked to close the complaint.',
  sent_post: 'The answer is recorded as sent by post and kept with the record. QA approvers are asked to close the complaint.',
  report: 'The report submission is recorded; the countdown has stopped.',
  start_assessment: 'The assessment has started; you own this complaint now.',
  complete_assessment: 'The reportability decision is signed. The investigation is open.',
  skip_investigation: 'The decision and the reason for not investigating are signed. Write the answer next.',
  complete_investigation: 'The investigation is signed. Write the answer next.',
  close: 'The complaint is closed. Your signature is recorded.',
  reopen_assessment: 'The complaint is reopened for assessment.',
  reopen_investigation: 'The complaint is reopened for investigation.',
};

const formTexts: Record<ComplaintEventType, EventFormText> = {
  start_assessment: {
    heading: 'Start the assessment',
    description: 'You take the complaint on as its owner and decide whether it is an adverse event and must be reported.',
    submitLabel: 'Start the assessment',
    pendingLabel: 'Starting…',
  },
  complete_assessment: {
    heading: 'Sign the assessment',
    description: 'Your signature fixes the category, the adverse-event answers and the reportability decision as recorded above; the investigation opens.',
    submitLabel: 'Sign the decision',
    pendingLabel: 'Signing…',
  },
  skip_investigation: {
    heading: 'Skip the investigation',
    description: 'The assessment rules out a quality defect. Say why no investigation is needed; it is signed with the decision.',
    submitLabel: 'Sign and skip',
    pendingLabel: 'Signing…',
    reasonLabel: 'Why no investigation is needed',
    reasonHint: 'What the assessment showed (21 CFR 211.198(b)(2) asks for the reason to be recorded).',
  },
  complete_investigation: {
    heading: 'Sign the investigation',
    description: 'The retained samples, the findings and the links are as recorded. The answer to the complainant comes next.',
    submitLabel: 'Sign the investigation',
    pendingLabel: 'Signing…',
  },
  close: {
    heading: 'Close the complaint',
    description: 'The complaint was assessed, investigated where needed and answered. Signing closes it.',
    submitLabel: 'Sign and close',
    pendingLabel: 'Signing…',
  },
  reopen_assessment: {
    heading: 'Reopen for assessment',
    description: 'New information about the event: the decision is taken and signed again.',
    submitLabel: 'Reopen',
    pendingLabel: 'Reopening…',
    danger: true,
    reasonLabel: 'Reason',
    reasonHint: 'What came to light.',
  },
  reopen_investigation: {
    heading: 'Reopen for investigation',
    description: 'New findings: the investigation is done and signed again, and a new answer is sent.',
    submitLabel: 'Reopen',
    pendingLabel: 'Reopening…',
    danger: true,
    reasonLabel: 'Reason',
    reasonHint: 'What came to light.',
  },
};

function formFor(detail: ComplaintDetailDto, event: ComplaintDetailDto['allowedEvents'][number], signerName: string): ComplaintEventFormProps {
  return {
    action: submitComplaintEvent,
    complaintId: detail.complaint.id,
    version: detail.complaint.version,
    event: event.type,
    ...eventFormProps(formTexts[event.type], event, signerName),
  };
}


function Section({ id, title, children, testId }: { id: string; title: string; children: React.ReactNode; testId?: string }) {
  return (
    <section aria-labelledby={`${id}-heading`} className="rounded-lg border border-ink-200 bg-white p-5" data-testid={testId}>
      <h2 id={`${id}-heading`} className="text-lg font-semibold">
        {title}
      </h2>
      {children}
    </section>
  );
}

const yesNo = (v: boolean | null) => (v === null ? 'Not answered' : v ? 'Yes' : 'No');
const dl = 'mt-3 grid grid-cols-[max-content_minmax(0,1fr)] gap-x-6 gap-y-2';

export default async function ComplaintDetailPage({ params, searchParams }: PageProps<'/complaints/[id]'>) {
  const { id: rawId } = await params;
  const user = await requirePageUser('complaint.read', { returnTo: `/complaints/${encodeURIComponent(rawId)}` });
  const id = /^\d{1,9}$/.test(rawId) ? Number(rawId) : NaN;
  if (!Number.isSafeInteger(id) || id < 1) notFound();
  const detail = await getComplaintDetail(id, user).catch((err: unknown) => {
    if (err instanceof NotFoundError) notFound();
    throw err;
  });
  const c = detail.complaint;
  const [evidence, categories, capaOwners, timeZone] = await Promise.all([
    listAttachments('complaint', c.id, user),
    detail.can.assess ? listCategoryOptions() : Promise.resolve(null),
    detail.can.raiseCapa ? listCapaOwnerOptions() : Promise.resolve([]),
    getSiteTimeZone(),
  ]);
  const today = todayIn(timeZone, new Date());
  const done = (await searchParams).done;
  const doneMessage = typeof done === 'string' ? (doneMessages[done] ?? null) : null;
  const lot = detail.batch?.lotNumber ?? c.lotAsReported;
  const overdue = c.dueAt !== null && Date.parse(c.dueAt) < Date.now() && c.status !== 'closed';
  const productLabel = detail.product ? `${detail.product.name} ${detail.product.strength}` : 'Not known';

  return (
    <>
      <p className="mb-2">
        <Link href="/complaints" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
          ← Complaints
        </Link>
      </p>
      <PageHeader
        title={`${c.number}: ${productLabel}`}
        description={
          <dl className="mt-1 flex flex-wrap items-center gap-x-6 gap-y-2" data-testid="complaint-header">
            <div className="flex items-center gap-2">
              <dt className="sr-only">Status</dt>
              <dd>
                <ComplaintStatusBadge status={c.status} />
              </dd>
            </div>
            {detail.report ? (
              <div className="flex items-center gap-2" data-testid="report-countdown">
                <dt className="sr-only">Report deadline</dt>
                <dd>
                  <ReportCountdownBadge report={detail.report} />
                </dd>
              </div>
            ) : null}
            <div className="flex items-center gap-2">
              <dt>Received</dt>
              <dd className="text-ink-800">{c.receivedOn}</dd>
            </div>
            <div className="flex items-center gap-2">
              <dt>Owner</dt>
              <dd className="text-ink-800">{detail.ownerName ?? 'Not assessed yet'}</dd>
            </div>
            <div className="flex items-center gap-2">
              <dt>Due</dt>
              <dd className={overdue ? 'font-semibold text-danger-700' : 'text-ink-800'}>
                {c.dueAt ? c.dueAt.slice(0, 10) : 'Not set'}
                {overdue ? ' (overdue)' : ''}
              </dd>
            </div>
          </dl>
        }
      />
      {doneMessage ? (
        <div className="mb-6">
          <Notice tone="ok" title={doneMessage} />
        </div>
      ) : null}
      {c.reopenReason && c.status !== 'closed' ? (
        <div className="mb-6">
          <Notice tone="warn" title="This complaint was reopened" live={false}>
            {c.reopenReason}
          </Notice>
        </div>
      ) : null}

      <div className="grid grid-cols-1 gap-6 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="flex min-w-0 flex-col gap-6 xl:col-start-1 xl:row-start-1">
          <Section id="intake" title="What was received" testId="intake-section">
            <dl className={dl}>
              <DetailRow label="Received">
                {c.receivedOn} by {intakeChannelLabels[c.channel] ?? c.channel}, taken down by {detail.createdByName}
              </DetailRow>
              <DetailRow label="From">{complainantKindLabels[c.complainantKind] ?? c.complainantKind}</DetailRow>
              {detail.personal ? (
                <>
                  <DetailRow label="Name">{detail.personal.complainantName}</DetailRow>
                  <DetailRow label="Contact">{detail.personal.complainantContact}</DetailRow>
                </>
              ) : (
                <DetailRow label="Name and contact">
                  <span className="text-ink-600">Visible to QA only.</span>
                </DetailRow>
              )}
              <DetailRow label="Product">{detail.product ? `${productLabel} (${detail.product.code}, ${detail.product.regulatoryClass === 'drug' ? 'drug' : 'dietary supplement'})` : 'Not known'}</DetailRow>
              <DetailRow label="Lot">
                <span className="inline-flex flex-wrap items-center gap-2">
                  {lot ?? 'Not given'}
                  {c.lotUnknown ? <StatusBadge tone="warn" label={lot ? 'Not in the batch records' : 'Lot unknown'} /> : null}
                </span>
              </DetailRow>
              {detail.batch ? (
                <DetailRow label="Batch record">
                  Made {detail.batch.manufacturedOn}
                  {detail.batch.machine ? ` on ${detail.batch.machine.name} (${detail.batch.machine.assetTag})` : ''}
                  {detail.batch.ring ? `, ring ${detail.batch.ring.serial}` : ''}; {detail.batch.unitsShipped.toLocaleString('en-US')} capsules shipped; {detail.batch.status.replace('_', ' ')}
                </DetailRow>
              ) : null}
              <DetailRow label="What they found">
                <span className="whitespace-pre-line">{c.description}</span>
              </DetailRow>
              <DetailRow label="Capsules affected">{c.unitsAffected ?? 'Not said'}</DetailRow>
              <DetailRow label="Person harmed">
                {c.personHarmed ? (
                  detail.personal ? (
                    <span className="whitespace-pre-line font-semibold text-danger-700">Yes: {detail.personal.harmDescription}</span>
                  ) : (
                    <span className="font-semibold text-danger-700">Yes (details visible to QA only)</span>
                  )
                ) : (
                  'No'
                )}
              </DetailRow>
              <DetailRow label="Samples coming back">{c.samplesReturning ? 'Yes' : 'No'}</DetailRow>
            </dl>
          </Section>

          <Section id="assessment" title="Assessment" testId="assessment-section">
            {c.category !== null ? (
              <dl className={dl}>
                <DetailRow label="Category">{detail.categoryLabel}</DetailRow>
                <DetailRow label="Adverse event">{yesNo(c.adverseEvent)}</DetailRow>
                {c.adverseEvent ? <DetailRow label="Serious">{yesNo(c.seriousAdverseEvent)}</DetailRow> : null}
                <DetailRow label="Reportable">
                  {c.reportable ? `Yes: ${c.reportKind ? reportKindLabels[c.reportKind] : ''}, due ${c.reportDueOn}` : yesNo(c.reportable)}
                </DetailRow>
                {c.reportSubmittedAt ? <DetailRow label="Report submitted">{c.reportSubmittedAt.slice(0, 10)}</DetailRow> : null}
                <DetailRow label="Rationale">
                  <span className="whitespace-pre-line">{c.assessmentRationale}</span>
                </DetailRow>
                {c.reportabilityDecidedAt ? (
                  <DetailRow label="Decision signed">
                    {formatUtc(c.reportabilityDecidedAt)} by {detail.decidedByName}
                  </DetailRow>
                ) : null}
                {c.investigationSkipReason ? (
                  <DetailRow label="No investigation because">
                    <span className="whitespace-pre-line">{c.investigationSkipReason}</span>
                  </DetailRow>
                ) : null}
              </dl>
            ) : (
              <p className="mt-2 text-ink-600">{c.status === 'received' ? 'Waiting for a QA investigator to start the assessment.' : 'Not recorded yet.'}</p>
            )}
            {detail.can.assess && categories && detail.product ? (
              <details className="mt-4 border-t border-ink-200 pt-3" open={c.category === null}>
                <summary className="inline-flex min-h-11 cursor-pointer items-center font-semibold underline underline-offset-4">
                  {c.category === null ? 'Record the assessment' : 'Change the assessment'}
                </summary>
                <div className="mt-3">
                  <AssessmentForm
                    key={`assessment-${c.version}`}
                    action={submitAssessment}
                    complaintId={c.id}
                    version={c.version}
                    regulatoryClass={detail.product.regulatoryClass}
                    receivedOn={c.receivedOn}
                    categories={categories}
                    initial={{
                      category: c.category ?? '',
                      adverseEvent: c.adverseEvent === null ? '' : c.adverseEvent ? 'yes' : 'no',
                      seriousAdverseEvent: c.seriousAdverseEvent === null ? '' : c.seriousAdverseEvent ? 'yes' : 'no',
                      reportable: c.reportable === null ? '' : c.reportable ? 'yes' : 'no',
                      assessmentRationale: c.assessmentRationale ?? '',
                    }}
                  />
                </div>
              </details>
            ) : null}
            {detail.can.recordReport ? (
              <div className="mt-4 border-t border-ink-200 pt-3">
                <ReportSubmittedForm key={`report-${c.version}`} action={submitReport} complaintId={c.id} version={c.version} today={today} />
              </div>
            ) : null}
          </Section>

          {c.status !== 'received' && c.status !== 'assessment' && !c.investigationSkipReason ? (
            <Section id="investigation" title="Investigation" testId="investigation-section">
              <dl className={dl}>
                <DetailRow label="Retained samples checked">{yesNo(c.retainedSamplesChecked)}</DetailRow>
                {c.retainedSamplesNote ? (
                  <DetailRow label="Retained samples">
                    <span className="whitespace-pre-line">{c.retainedSamplesNote}</span>
                  </DetailRow>
                ) : null}
                <DetailRow label="Summary">{c.investigationSummary ? <span className="whitespace-pre-line">{c.investigationSummary}</span> : 'Not written yet'}</DetailRow>
                <DetailRow label="Linked records">
                  {detail.links.length === 0 ? (
                    'None yet'
                  ) : (
                    <ul className="flex flex-col gap-1" data-testid="complaint-links">
                      {detail.links.map((l) => (
                        <li key={`${l.type}-${l.id}`}>
                          <Link href={l.href} className="font-semibold underline underline-offset-4">
                            {l.number}
                          </Link>{' '}
                          {l.title} <span className="text-ink-600">({l.relation === 'raised_capa' ? 'raised from this complaint' : 'linked'}, {l.status.replace(/_/g, ' ')})</span>
                        </li>
                      ))}
                    </ul>
                  )}
                </DetailRow>
              </dl>
              {detail.batch && detail.batchDeviations ? (
                <div className="mt-4">
                  <h3 className="mb-2 font-semibold">Deviations beside this batch</h3>
                  <BatchDeviations lists={detail.batchDeviations} lot={detail.batch.lotNumber} machine={detail.batch.machine?.assetTag ?? null} ring={detail.batch.ring?.serial ?? null} />
                </div>
              ) : null}
              {detail.can.investigate ? (
                <div className="mt-4 flex flex-col gap-5 border-t border-ink-200 pt-4">
                  <InvestigationForm
                    key={`inv-${c.version}`}
                    action={submitInvestigation}
                    complaintId={c.id}
                    version={c.version}
                    initial={{
                      retainedSamplesChecked: c.retainedSamplesChecked === null ? '' : c.retainedSamplesChecked ? 'yes' : 'no',
                      retainedSamplesNote: c.retainedSamplesNote ?? '',
                      investigationSummary: c.investigationSummary ?? '',
                    }}
                  />
                  <div className="flex flex-col gap-3 border-t border-ink-200 pt-4">
                    <LinkForm key={`ld-${c.version}`} action={submitLink} complaintId={c.id} version={c.version} target="deviation" />
                    {lot ? (
                      <p>
                        <Link href={`/deviations/new?lot=${encodeURIComponent(lot)}`} className={buttonClasses('secondary')}>
                          Raise a deviation on lot {lot}
                        </Link>
                      </p>
                    ) : null}
                    <LinkForm key={`lc-${c.version}`} action={submitLink} complaintId={c.id} version={c.version} target="capa" />
                  </div>
                  {detail.can.raiseCapa ? (
                    <details className="border-t border-ink-200 pt-3">
                      <summary className="inline-flex min-h-11 cursor-pointer items-center font-semibold underline underline-offset-4">Raise a CAPA from this complaint</summary>
                      <div className="mt-3">
                        <RaiseCapaForm
                          key={`capa-${c.version}`}
                          action={submitRaiseCapa}
                          complaintId={c.id}
                          version={c.version}
                          owners={capaOwners}
                          initial={{
                            title: `${detail.categoryLabel ?? 'Complaint'}: ${productLabel}${lot ? `, lot ${lot}` : ''}`.slice(0, 200),
                            problemStatement: `Raised from complaint ${c.number} (received ${c.receivedOn}): ${c.description}${c.investigationSummary ? `\n\nInvestigation: ${c.investigationSummary}` : ''}`,
                            ownerId: String(user.id),
                          }}
                        />
                      </div>
                    </details>
                  ) : null}
                </div>
              ) : null}
            </Section>
          ) : null}

          {c.status === 'response' || c.status === 'closed' || c.responseSentAt ? (
            <Section id="response" title="Answer to the complainant" testId="response-section">
              {c.responseSentAt ? (
                <p className="mt-2" data-testid="response-sent">
                  Sent {c.responseChannel ? `by ${responseChannelLabels[c.responseChannel].toLowerCase()}` : ''} on {formatUtc(c.responseSentAt)} by {detail.sentByName}.
                </p>
              ) : (
                <p className="mt-2 text-ink-600">Not sent yet.</p>
              )}
              {detail.personal?.letterSent ? (
                <div className="mt-3 rounded-md border border-ink-200 bg-ink-50 p-4">
                  <RichTextView html={detail.personal.letterSent} label="The letter as sent" />
                </div>
              ) : null}
              {!detail.personal && (c.responseSentAt || c.hasResponseDraft) ? <p className="mt-2 text-ink-600">The letter is addressed to the complainant and is visible to QA only.</p> : null}
              {detail.can.respond && detail.personal ? (
                <div className="mt-4 flex flex-col gap-5">
                  <LetterForm key={`letter-${c.version}`} action={submitLetter} complaintId={c.id} version={c.version} initialHtml={detail.personal.letterDraft} />
                  {c.hasResponseDraft ? (
                    <div className="border-t border-ink-200 pt-4">
                      <SendForm
                        key={`send-${c.version}`}
                        action={submitSend}
                        complaintId={c.id}
                        version={c.version}
                        contact={detail.personal.complainantContact ?? ''}
                        emailPossible={isEmailAddress(detail.personal.complainantContact)}
                      />
                    </div>
                  ) : (
                    <p className="text-ink-600">Save the letter first; then it can be sent.</p>
                  )}
                </div>
              ) : null}
            </Section>
          ) : null}

          <Section id="evidence" title="Evidence" testId="evidence-section">
            <div className="mt-3">
              <EvidenceList items={evidence} />
            </div>
            {detail.can.addEvidence ? (
              <div className="mt-4">
                <EvidenceDropzone uploadUrl={`/api/complaints/${c.id}/attachments`} refreshAfterUpload hint="Photos of the capsules and the pack, the customer's letter. Each file is checked and kept with this complaint." />
              </div>
            ) : null}
          </Section>
        </div>

        <section aria-labelledby="do-heading" className="flex min-w-0 flex-col gap-4 xl:col-span-2 xl:row-start-2">
          <h2 id="do-heading" className="text-lg font-semibold">
            What you can do
          </h2>
          <BlockedEventList events={detail.blockedEvents} labels={complaintEventLabels} />
          {detail.allowedEvents.length === 0 ? (
            detail.blockedEvents.length === 0 ? (
              <p className="text-ink-700">
                {c.status === 'closed'
                  ? 'This complaint is closed. QA can reopen it if new information arrives.'
                  : `Your role has no lifecycle step to take on this complaint while it is ${complaintStateLabels[c.status].toLowerCase()}.`}
              </p>
            ) : null
          ) : (
            <div className="grid grid-cols-1 items-start gap-4 lg:grid-cols-2">
              {[...detail.allowedEvents]
                .sort((a, b) => complaintEvents.indexOf(a.type) - complaintEvents.indexOf(b.type))
                .map((event) => (
                  <ComplaintEventForm key={`${event.type}-${c.version}`} {...formFor(detail, event, user.name)} />
                ))}
            </div>
          )}
        </section>

        <section
          aria-labelledby="timeline-heading"
          tabIndex={0}
          className="min-w-0 xl:col-start-2 xl:row-start-1 xl:max-h-[60rem] xl:overflow-y-auto xl:pr-2"
        >
          <h2 id="timeline-heading" className="mb-3 text-lg font-semibold">
            Timeline
          </h2>
          <ComplaintTimeline history={detail.history} signatures={detail.signatures} audit={detail.audit} userNames={detail.userNames} />
        </section>
      </div>
    </>
  );
}
