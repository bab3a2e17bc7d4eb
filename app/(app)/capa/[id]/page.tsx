import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { ActionForm, CompleteActionForm, RequestApprovalForm } from '@/components/capa/action-form';
import { CapaTimeline } from '@/components/capa/capa-timeline';
import { CapaEventForm, type CapaEventFormProps } from '@/components/capa/event-form';
import { PlanForm } from '@/components/capa/plan-form';
import { ReassignOwnerForm } from '@/components/capa/reassign-form';
import { BlockedEventList } from '@/components/records/blocked-events';
import { CapaStatusBadge } from '@/components/capa/status-badge';
import { EvidenceDropzone } from '@/components/evidence/evidence-dropzone';
import { EvidenceList } from '@/components/evidence/evidence-list';
import { RichTextView } from '@/components/rich-text/rich-text-view';
import { formatUtc } from '@/components/ui/format';
import { Notice } from '@/components/ui/notice';
import { eventFormProps, type EventFormText } from '@/components/records/event-form-text';
import { DetailRow } from '@/components/ui/detail-row';
import { PageHeader } from '@/components/ui/page-header';
import { StatusBadge } from '@/components/ui/status-badge';
import { getAttachRefusal, listAttachments } from '@/lib/attachments/queries';
import { requirePageUser } from '@/lib/auth/session';
import { type CapaActionDto, type CapaDetailDto, type CapaPlanOptionsDto, getCapaDetail, getCapaPlanOptions } from '@/lib/capa/detail';
import { evidenceAsHtml } from '@/lib/capa/evidence-text';
import { capaActionCategoryLabels, capaActionKindLabels, capaEventLabels, capaSourceLabels } from '@/lib/capa/labels';
import { NotFoundError } from '@/lib/errors';
import { type CapaEventType, capaEvents } from '@/workflows/capa';
import { askForPlanApproval, saveAction, saveCompletion, saveOwner, savePlan, submitCapaEvent } from './actions';

export const metadata: Metadata = { title: 'CAPA' };

const doneMessages: Record<CapaEventType | 'plan' | 'owner' | 'action_added' | 'action_updated' | 'action_completed' | 'approval_requested', string> = {
  plan: 'The plan is saved.',
  owner: 'The CAPA has a new owner, who is told by e-mail.',
  action_added: 'The action is added. Its owner is told by e-mail.',
  action_updated: 'The action is changed.',
  action_completed: 'The action is recorded as completed, with its evidence.',
  approval_requested: 'The QA approvers who may sign are asked by e-mail to approve the plan.',
  approve_plan: 'The plan is approved. Your signature is recorded.',
  start_implementation: 'The implementation has started. Action owners record their actions as they complete them.',
  open_effectiveness_check: 'The effectiveness check is open. QA approvers are asked by e-mail to review it.',
  record_effective: 'Recorded as effective and closed. Your signature is recorded.',
  record_not_effective: 'Recorded as not effective. The CAPA is back in planning for new actions; your signature is recorded.',
  cancel: 'The CAPA is cancelled. Your signature is recorded.',
};

const formTexts: Record<CapaEventType, EventFormText> = {
  approve_plan: {
    heading: 'Approve the plan',
    description: 'Your signature approves the actions, their owners and due dates, and the effectiveness criteria as written.',
    submitLabel: 'Sign and approve',
    pendingLabel: 'Signing…',
  },
  start_implementation: {
    heading: 'Start the implementation',
    description: 'The approved actions are under way; their owners can record them as completed.',
    submitLabel: 'Start',
    pendingLabel: 'Starting…',
  },
  open_effectiveness_check: {
    heading: 'Open the effectiveness check',
    description: 'Every action is completed. QA approvers are asked to compare the evidence with the criteria.',
    submitLabel: 'Open the check',
    pendingLabel: 'Opening…',
  },
  record_effective: {
    heading: 'Effective',
    description: 'The evidence meets the criteria written in the plan. Signing closes the CAPA.',
    submitLabel: 'Sign as effective',
    pendingLabel: 'Signing…',
  },
  record_not_effective: {
    heading: 'Not effective',
    description: 'The criteria were not met. The CAPA goes back to planning for new actions; the earlier ones stay on record.',
    submitLabel: 'Sign as not effective',
    pendingLabel: 'Signing…',
    danger: true,
    reasonLabel: 'Because…',
    reasonHint: 'What the evidence shows and why the actions did not work. Recorded with your signature.',
  },
  cancel: {
    heading: 'Cancel the CAPA',
    description: 'Raised in error or twice, or no longer needed. Nothing is deleted.',
    submitLabel: 'Sign and cancel',
    pendingLabel: 'Signing…',
    danger: true,
    reasonLabel: 'Reason',
    reasonHint: 'Why it is cancelled (e.g. the number of the CAPA it duplicates).',
  },
};

function formFor(detail: CapaDetailDto, event: CapaDetailDto['allowedEvents'][number], signerName: string): CapaEventFormProps {
  return {
    action: submitCapaEvent,
    capaId: detail.capa.id,
    version: detail.capa.version,
    event: event.type,
    ...eventFormProps(formTexts[event.type], event, signerName),
  };
}

const dateOnly = (iso: string | null) => (iso ? iso.slice(0, 10) : null);


function RecurrenceLine({ detail }: { detail: CapaDetailDto }) {
  const r = detail.recurrence;
  if (!r) return null;
  const tone = r.met === true ? 'ok' : r.met === false ? 'danger' : 'info';
  const label = r.met === true ? 'Criterion met' : r.met === false ? 'Recurred' : 'Pending';
  return (
    <div className="mt-3 flex flex-wrap items-start gap-3 rounded-md border border-ink-200 bg-ink-50 p-3" data-testid="recurrence-evidence">
      <StatusBadge tone={tone} label={label} />
      <p className="min-w-0 flex-1">
        <span className="font-semibold">Counted from Plumbline&apos;s records: </span>
        {r.summary.endsWith('.') ? r.summary : `${r.summary}.`}
      </p>
    </div>
  );
}

function ActionCard({ a, detail, options }: { a: CapaActionDto; detail: CapaDetailDto; options: CapaPlanOptionsDto | null }) {
  return (
    <li className="rounded-md border border-ink-200 p-4">
      <div className="flex flex-wrap items-center gap-2">
        <span className="font-semibold">Action {a.id}</span>
        <StatusBadge tone="neutral" label={capaActionKindLabels[a.kind]} />
        <span className="text-ink-700">{capaActionCategoryLabels[a.category] ?? a.category}</span>
        {a.completedAt ? (
          <StatusBadge tone="ok" label="Completed" />
        ) : a.overdue ? (
          <StatusBadge tone="danger" label="Overdue" />
        ) : (
          <StatusBadge tone="info" label="Open" />
        )}
      </div>
      <p className="mt-2 whitespace-pre-line">{a.description}</p>
      <dl className="mt-2 grid grid-cols-[max-content_minmax(0,1fr)] gap-x-4 gap-y-1 text-sm">
        <DetailRow label="Owner">{a.ownerName}</DetailRow>
        <DetailRow label="Due">{dateOnly(a.dueAt)}</DetailRow>
        {a.completedAt ? (
          <DetailRow label="Completed">
            {formatUtc(a.completedAt)} by {a.completedByName ?? 'unknown'}
          </DetailRow>
        ) : null}
      </dl>
      {a.evidence ? (
        <div className="mt-2 text-sm">
          <p className="text-ink-600">Evidence</p>
          <RichTextView html={evidenceAsHtml(a.evidence)} label={`Evidence of action ${a.id}`} className="mt-1 rounded-md border border-ink-200 p-3" />
        </div>
      ) : null}
      {a.canComplete ? (
        <div className="mt-3 border-t border-ink-200 pt-3">
          <CompleteActionForm key={`complete-${a.id}-${a.version}`} action={saveCompletion} capaId={detail.capa.id} actionId={a.id} actionVersion={a.version} />
        </div>
      ) : null}
      {a.canEdit && options ? (
        <details className="mt-3 border-t border-ink-200 pt-3">
          <summary className="inline-flex min-h-11 cursor-pointer items-center font-semibold underline underline-offset-4">Change this action</summary>
          <div className="mt-3">
            <ActionForm
              key={`edit-${a.id}-${detail.capa.version}`}
              action={saveAction}
              capaId={detail.capa.id}
              version={detail.capa.version}
              actionId={a.id}
              owners={options.actionOwners}
              submitLabel="Save the action"
              initial={{ kind: a.kind, category: a.category, description: a.description, ownerId: String(a.ownerId), dueAt: dateOnly(a.dueAt) ?? '' }}
            />
          </div>
        </details>
      ) : null}
    </li>
  );
}

export default async function CapaDetailPage({ params, searchParams }: PageProps<'/capa/[id]'>) {
  const { id: rawId } = await params;
  const user = await requirePageUser('capa.read', { returnTo: `/capa/${encodeURIComponent(rawId)}` });
  const id = /^\d{1,9}$/.test(rawId) ? Number(rawId) : NaN;
  if (!Number.isSafeInteger(id) || id < 1) notFound();
  const detail = await getCapaDetail(id, user).catch((err: unknown) => {
    if (err instanceof NotFoundError) notFound();
    throw err;
  });
  const [options, evidenceFiles, attachRefusal] = await Promise.all([
    detail.canPlan || detail.sections.owner.editable ? getCapaPlanOptions() : null,
    listAttachments('capa', id, user),
    getAttachRefusal('capa', id, user),
  ]);
  const { capa: c, source, criterion } = detail;
  const done = (await searchParams).done;
  const doneMessage = typeof done === 'string' && done in doneMessages ? doneMessages[done as keyof typeof doneMessages] : null;
  const current = detail.actions.filter((a) => a.round === c.planRound);
  const earlier = detail.actions.filter((a) => a.round !== c.planRound);
  const overdue = c.dueAt !== null && Date.parse(c.dueAt) < Date.now() && c.status !== 'closed_effective' && c.status !== 'cancelled';

  return (
    <>
      <p className="mb-2">
        <Link href="/capa" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
          ← CAPA
        </Link>
      </p>
      <PageHeader
        title={`${c.number}: ${c.title}`}
        description={
          <dl className="mt-1 flex flex-wrap items-center gap-x-6 gap-y-2">
            <div className="flex items-center gap-2">
              <dt className="sr-only">Status</dt>
              <dd>
                <CapaStatusBadge status={c.status} />
              </dd>
            </div>
            <div className="flex items-center gap-2">
              <dt>Owner</dt>
              <dd className="text-ink-800">{detail.ownerName}</dd>
            </div>
            <div className="flex items-center gap-2">
              <dt>Due</dt>
              <dd className={overdue ? 'font-semibold text-danger-700' : 'text-ink-800'}>
                {dateOnly(c.dueAt) ?? 'Not set'}
                {overdue ? ' (overdue)' : ''}
              </dd>
            </div>
            <div className="flex items-center gap-2">
              <dt>Source</dt>
              <dd className="text-ink-800">
                {source.href ? (
                  <Link href={source.href} className="underline underline-offset-4">
                    {capaSourceLabels[source.type]} {source.number ?? `#${source.id}`}
                  </Link>
                ) : (
                  `${capaSourceLabels[source.type]}${source.number ? ` ${source.number}` : ''}`
                )}
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
      {c.effectivenessResult === 'not_effective' && c.status === 'proposed' ? (
        <div className="mb-6">
          <Notice tone="warn" title={`The last effectiveness check found the actions not effective; this is round ${c.planRound} of the plan.`} live={false}>
            {c.effectivenessNote}
          </Notice>
        </div>
      ) : null}

      <div className="grid grid-cols-1 gap-6 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="flex min-w-0 flex-col gap-6 xl:col-start-1 xl:row-start-1">
          <section aria-labelledby="plan-heading" className="rounded-lg border border-ink-200 bg-white p-5">
            <h2 id="plan-heading" className="text-lg font-semibold">
              Plan
            </h2>
            <dl className="mt-3 grid grid-cols-[max-content_minmax(0,1fr)] gap-x-6 gap-y-2">
              <DetailRow label="Problem">
                <span className="whitespace-pre-line">{c.problemStatement}</span>
              </DetailRow>
              <DetailRow label="Root cause">{c.rootCause ? <span className="whitespace-pre-line">{c.rootCause}</span> : 'Not written yet'}</DetailRow>
              {source.title ? <DetailRow label="Source record">{source.title}</DetailRow> : null}
              <DetailRow label="Opened">
                {formatUtc(c.createdAt)} by {detail.createdByName}
              </DetailRow>
              {c.planApprovedAt ? <DetailRow label="Plan approved">{formatUtc(c.planApprovedAt)}</DetailRow> : null}
              {c.actionsCompletedAt ? <DetailRow label="Actions completed">{formatUtc(c.actionsCompletedAt)}</DetailRow> : null}
              {c.effectivenessDueAt ? <DetailRow label="Check due">{dateOnly(c.effectivenessDueAt)}</DetailRow> : null}
              {c.closedAt ? <DetailRow label={c.status === 'cancelled' ? 'Cancelled' : 'Closed'}>{formatUtc(c.closedAt)}</DetailRow> : null}
              {c.cancelReason ? <DetailRow label="Why cancelled">{c.cancelReason}</DetailRow> : null}
            </dl>
            <h3 className="mt-5 font-semibold">Effectiveness criteria</h3>
            {c.effectivenessCriteria ? (
              <p className="mt-1 whitespace-pre-line">{c.effectivenessCriteria}</p>
            ) : (
              <p className="mt-1 text-ink-600">Not written yet. The plan cannot be approved without them.</p>
            )}
            {criterion ? <RecurrenceLine detail={detail} /> : null}
            {options && detail.sections.owner.editable ? (
              <details className="mt-4 border-t border-ink-200 pt-3">
                <summary className="inline-flex min-h-11 cursor-pointer items-center font-semibold underline underline-offset-4">Reassign the owner</summary>
                <div className="mt-3">
                  <ReassignOwnerForm key={`owner-${c.version}`} action={saveOwner} capaId={c.id} version={c.version} currentOwnerId={c.ownerId} owners={options.owners} />
                </div>
              </details>
            ) : null}
            {options && detail.canPlan ? (
              <details className="mt-4 border-t border-ink-200 pt-3" open={!c.effectivenessCriteria}>
                <summary className="inline-flex min-h-11 cursor-pointer items-center font-semibold underline underline-offset-4">Edit the plan</summary>
                <div className="mt-3">
                  <PlanForm
                    key={`plan-${c.version}`}
                    action={savePlan}
                    capaId={c.id}
                    version={c.version}
                    options={options}
                    initial={{
                      title: c.title,
                      problemStatement: c.problemStatement,
                      rootCause: c.rootCause ?? '',
                      effectivenessCriteria: c.effectivenessCriteria ?? '',
                      dueAt: dateOnly(c.dueAt) ?? '',
                      criterionDefectId: criterion?.defectId ? String(criterion.defectId) : '',
                      criterionMachineId: criterion?.machineId ? String(criterion.machineId) : '',
                      criterionRingId: criterion?.ringId ? String(criterion.ringId) : '',
                      criterionBatches: criterion?.batches ? String(criterion.batches) : '',
                      criterionDays: criterion?.days ? String(criterion.days) : '',
                    }}
                  />
                </div>
              </details>
            ) : null}
          </section>

          <section aria-labelledby="actions-list-heading" className="rounded-lg border border-ink-200 bg-white p-5">
            <h2 id="actions-list-heading" className="text-lg font-semibold">
              Actions{c.planRound > 1 ? ` (round ${c.planRound})` : ''}
            </h2>
            <p className="mt-1 text-ink-600">
              {current.length === 0
                ? 'No actions planned yet.'
                : `${current.length - c.actionsOpen} of ${current.length} completed.`}
            </p>
            {current.length > 0 ? (
              <ul className="mt-3 flex flex-col gap-3">
                {current.map((a) => (
                  <ActionCard key={a.id} a={a} detail={detail} options={options} />
                ))}
              </ul>
            ) : null}
            {options && detail.sections.actions.editable ? (
              <details className="mt-4 border-t border-ink-200 pt-3" open={current.length === 0}>
                <summary className="inline-flex min-h-11 cursor-pointer items-center font-semibold underline underline-offset-4">Add an action</summary>
                <div className="mt-3">
                  <ActionForm
                    key={`add-${c.version}`}
                    action={saveAction}
                    capaId={c.id}
                    version={c.version}
                    owners={options.actionOwners}
                    submitLabel="Add the action"
                    initial={{ kind: 'corrective', category: 'machine_setting', description: '', ownerId: '', dueAt: '' }}
                  />
                </div>
              </details>
            ) : null}
            {detail.sections.approval_request.editable && current.length > 0 && c.effectivenessCriteria ? (
              <div className="mt-4 border-t border-ink-200 pt-3">
                <RequestApprovalForm action={askForPlanApproval} capaId={c.id} version={c.version} />
              </div>
            ) : null}
            {earlier.length > 0 ? (
              <details className="mt-4 border-t border-ink-200 pt-3">
                <summary className="inline-flex min-h-11 cursor-pointer items-center font-semibold underline underline-offset-4">
                  Actions of earlier rounds ({earlier.length})
                </summary>
                <ul className="mt-3 flex flex-col gap-3">
                  {earlier.map((a) => (
                    <ActionCard key={a.id} a={a} detail={detail} options={options} />
                  ))}
                </ul>
              </details>
            ) : null}
          </section>

          <section id="evidence" aria-labelledby="evidence-heading" className="flex min-w-0 flex-col gap-4 rounded-lg border border-ink-200 bg-white p-5">
            <h2 id="evidence-heading" className="text-lg font-semibold">
              Evidence
            </h2>
            <EvidenceList items={evidenceFiles} />
            {attachRefusal ? (
              <p className="text-sm text-ink-600">{attachRefusal}</p>
            ) : (
              <EvidenceDropzone
                uploadUrl={`/api/capa/${c.id}/attachments`}
                refreshAfterUpload
                hint="Procedure revisions, training records, work orders, photos. Each file is checked, given its SHA-256 and kept with this CAPA for good."
              />
            )}
          </section>
        </div>

        <section aria-labelledby="do-heading" className="flex min-w-0 flex-col gap-4 xl:col-span-2 xl:row-start-2">
          <h2 id="do-heading" className="text-lg font-semibold">
            What you can do
          </h2>
          <BlockedEventList events={detail.blockedEvents} labels={capaEventLabels} />
          {detail.allowedEvents.length === 0 ? (
            detail.blockedEvents.length === 0 ? (
              <p className="text-ink-700">
                {c.status === 'closed_effective' || c.status === 'cancelled'
                  ? 'This CAPA is closed. Nothing more can be done to it.'
                  : 'Your role has no lifecycle step to take on this CAPA at this stage.'}
              </p>
            ) : null
          ) : (
            <div className="grid grid-cols-1 items-start gap-4 lg:grid-cols-2">
              {[...detail.allowedEvents]
                .sort((a, b) => capaEvents.indexOf(a.type) - capaEvents.indexOf(b.type))
                .map((event) => (
                <CapaEventForm key={`${event.type}-${c.version}`} {...formFor(detail, event, user.name)} />
              ))}
            </div>
          )}
        </section>

        <section
          aria-labelledby="timeline-heading"
          tabIndex={0}
          className="min-w-0 xl:col-start-2 xl:row-start-1 xl:max-h-[48rem] xl:overflow-y-auto xl:pr-2"
        >
          <h2 id="timeline-heading" className="mb-3 text-lg font-semibold">
            Timeline
          </h2>
          <CapaTimeline history={detail.history} signatures={detail.signatures} audit={detail.audit} userNames={detail.userNames} />
        </section>
      </div>
    </>
  );
}
