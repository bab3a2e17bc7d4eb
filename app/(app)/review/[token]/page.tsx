import type { Metadata } from 'next';
import Link from 'next/link';
import { ReviewDecisionForms } from '@/components/capa/review-decision-forms';
import { ReviewFreshLinkForm } from '@/components/capa/review-fresh-link';
import { CapaStatusBadge } from '@/components/capa/status-badge';
import { EvidenceList } from '@/components/evidence/evidence-list';
import { RichTextView } from '@/components/rich-text/rich-text-view';
import { formatUtc } from '@/components/ui/format';
import { Notice } from '@/components/ui/notice';
import { DetailRow } from '@/components/ui/detail-row';
import { PageHeader } from '@/components/ui/page-header';
import { StatusBadge } from '@/components/ui/status-badge';
import { listAttachments } from '@/lib/attachments/queries';
import { requirePageUser } from '@/lib/auth/session';
import type { CapaActionDto, CapaDetailDto } from '@/lib/capa/detail';
import { evidenceAsHtml } from '@/lib/capa/evidence-text';
import { capaActionCategoryLabels, capaActionKindLabels, capaSourceLabels } from '@/lib/capa/labels';
import { type ReviewLinkView, openReviewLink } from '@/lib/capa/review-by-link';
import { signatureMeaningLabels, signatureMeaningStatements } from '@/lib/signatures/meanings';
import { askForFreshLink, signReview } from './actions';

/*
 * Where an effectiveness review e-mail leads. A signed-out reviewer signs in and comes back here
 * (returnTo). The link is checked against the person and the CAPA as it is now: a problem gets a page
 * that names it, changes nothing, and offers a fresh link where one may be sent. A good link shows
 * the CAPA, its actions and evidence, the criteria and the counted recurrence, and the two signed
 * decisions. The token is in the address only; nothing here logs it.
 */

export const metadata: Metadata = { title: 'Effectiveness review', referrer: 'no-referrer' };


function ProblemPage({ view, token }: { view: Extract<ReviewLinkView, { ok: false }>; token: string }) {
  return (
    <div className="max-w-3xl" data-testid="review-problem" data-problem={view.problem}>
      <PageHeader title={view.title} description="Effectiveness review link" />
      <div className="flex flex-col gap-5">
        <Notice tone="warn" title="Nothing was changed." live={false}>
          {view.body}
        </Notice>
        {view.capa ? (
          <p>
            The link was for{' '}
            <Link href={`/capa/${view.capa.id}`} className="font-semibold underline underline-offset-4">
              {view.capa.number}
            </Link>
            .
          </p>
        ) : null}
        <section aria-labelledby="fresh-link-heading" className="rounded-lg border border-ink-200 bg-white p-5">
          <h2 id="fresh-link-heading" className="text-lg font-semibold">
            A fresh link
          </h2>
          {view.freshLink.allowed ? (
            <div className="mt-3 flex flex-col gap-3">
              <p className="text-ink-700">A new personal link goes to your e-mail address. Any earlier link to this review stops working.</p>
              <ReviewFreshLinkForm action={askForFreshLink} token={token} />
            </div>
          ) : (
            <p className="mt-2 text-ink-700">{view.freshLink.why}</p>
          )}
          <p className="mt-3">
            <Link href="/capa?status=effectiveness_check" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
              CAPAs in the effectiveness check
            </Link>
          </p>
        </section>
      </div>
    </div>
  );
}

function ActionItem({ a }: { a: CapaActionDto }) {
  return (
    <li className="rounded-md border border-ink-200 p-4">
      <div className="flex flex-wrap items-center gap-2">
        <span className="font-semibold">Action {a.id}</span>
        <StatusBadge tone="neutral" label={capaActionKindLabels[a.kind]} />
        <span className="text-ink-700">{capaActionCategoryLabels[a.category] ?? a.category}</span>
        {a.completedAt ? <StatusBadge tone="ok" label="Completed" /> : <StatusBadge tone="warn" label="Not completed" />}
      </div>
      <p className="mt-2 whitespace-pre-line">{a.description}</p>
      <dl className="mt-2 grid grid-cols-[max-content_minmax(0,1fr)] gap-x-4 gap-y-1 text-sm">
        <DetailRow label="Owner">{a.ownerName}</DetailRow>
        <DetailRow label="Due">{a.dueAt.slice(0, 10)}</DetailRow>
        {a.completedAt ? (
          <DetailRow label="Completed">
            {formatUtc(a.completedAt)} by {a.completedByName ?? 'unknown'}
          </DetailRow>
        ) : null}
        {a.evidence ? null : <DetailRow label="Evidence">None recorded</DetailRow>}
      </dl>
      {a.evidence ? (
        <div className="mt-2 text-sm">
          <p className="text-ink-600">Evidence</p>
          <RichTextView html={evidenceAsHtml(a.evidence)} label={`Evidence of action ${a.id}`} className="mt-1 rounded-md border border-ink-200 p-3" />
        </div>
      ) : null}
    </li>
  );
}

function Recurrence({ detail }: { detail: CapaDetailDto }) {
  const r = detail.recurrence;
  if (!r) return <p className="mt-2 text-ink-600">The criteria are not about recurrence; Plumbline counts nothing for them. Judge them from the evidence above.</p>;
  const tone = r.met === true ? 'ok' : r.met === false ? 'danger' : 'info';
  const label = r.met === true ? 'Criterion met' : r.met === false ? 'Recurred' : 'Pending';
  return (
    <div className="mt-3 flex flex-wrap items-start gap-3 rounded-md border border-ink-200 bg-ink-50 p-3" data-testid="review-recurrence">
      <StatusBadge tone={tone} label={label} />
      <p className="min-w-0 flex-1">
        <span className="font-semibold">Counted from Plumbline&apos;s records: </span>
        {r.summary.endsWith('.') ? r.summary : `${r.summary}.`}
      </p>
    </div>
  );
}

export default async function ReviewPage({ params }: PageProps<'/review/[token]'>) {
  const { token } = await params;
  const user = await requirePageUser('capa.read', { returnTo: `/review/${encodeURIComponent(token)}` });
  const view = await openReviewLink(token, user);
  if (!view.ok) return <ProblemPage view={view} token={token} />;

  const { detail, expiresAt } = view;
  const { capa: c, source } = detail;
  const current = detail.actions.filter((a) => a.round === c.planRound);
  const evidenceFiles = await listAttachments('capa', c.id, user);

  return (
    <>
      <PageHeader
        title={`Effectiveness review: ${c.number}`}
        description={
          <div className="flex flex-col gap-2">
            <p className="text-lg text-ink-800">{c.title}</p>
            <dl className="flex flex-wrap items-center gap-x-6 gap-y-2">
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
                <dt>Link works until</dt>
                <dd className="text-ink-800">{formatUtc(expiresAt)}</dd>
              </div>
            </dl>
          </div>
        }
        actions={
          <Link href={`/capa/${c.id}`} className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
            Full record and timeline
          </Link>
        }
      />

      <div className="flex max-w-5xl flex-col gap-6">
        <section aria-labelledby="review-plan-heading" className="rounded-lg border border-ink-200 bg-white p-5">
          <h2 id="review-plan-heading" className="text-lg font-semibold">
            The problem and its cause
          </h2>
          <dl className="mt-3 grid grid-cols-[max-content_minmax(0,1fr)] gap-x-6 gap-y-2">
            <DetailRow label="Problem">
              <span className="whitespace-pre-line">{c.problemStatement}</span>
            </DetailRow>
            <DetailRow label="Root cause">{c.rootCause ? <span className="whitespace-pre-line">{c.rootCause}</span> : 'Not written'}</DetailRow>
            <DetailRow label="Source record">
              {source.href ? (
                <Link href={source.href} className="underline underline-offset-4">
                  {capaSourceLabels[source.type]} {source.number ?? `#${source.id}`}
                </Link>
              ) : (
                `${capaSourceLabels[source.type]}${source.number ? ` ${source.number}` : ''}`
              )}
              {source.title ? `: ${source.title}` : ''}
            </DetailRow>
            {c.actionsCompletedAt ? <DetailRow label="Actions completed">{formatUtc(c.actionsCompletedAt)}</DetailRow> : null}
            {c.effectivenessOpenedAt ? <DetailRow label="Check opened">{formatUtc(c.effectivenessOpenedAt)}</DetailRow> : null}
          </dl>
        </section>

        <section aria-labelledby="review-actions-heading" className="rounded-lg border border-ink-200 bg-white p-5">
          <h2 id="review-actions-heading" className="text-lg font-semibold">
            Actions and their evidence{c.planRound > 1 ? ` (round ${c.planRound})` : ''}
          </h2>
          {current.length === 0 ? (
            <p className="mt-2 text-ink-600">No actions in this round.</p>
          ) : (
            <ul className="mt-3 flex flex-col gap-3">
              {current.map((a) => (
                <ActionItem key={a.id} a={a} />
              ))}
            </ul>
          )}
          <h3 className="mt-5 font-semibold">Files attached to the CAPA</h3>
          <div className="mt-2">
            <EvidenceList items={evidenceFiles} />
          </div>
        </section>

        <section aria-labelledby="review-criteria-heading" className="rounded-lg border border-ink-200 bg-white p-5">
          <h2 id="review-criteria-heading" className="text-lg font-semibold">
            Effectiveness criteria
          </h2>
          <p className="mt-2 whitespace-pre-line">{c.effectivenessCriteria ?? 'Not written.'}</p>
          <Recurrence detail={detail} />
        </section>

        <section aria-labelledby="review-decision-heading" className="flex flex-col gap-4">
          <h2 id="review-decision-heading" className="text-lg font-semibold">
            Your decision
          </h2>
          {view.canSign ? (
            <ReviewDecisionForms
              action={signReview}
              token={token}
              signerName={user.name}
              effective={{ meaningLabel: signatureMeaningLabels.effective, statement: signatureMeaningStatements.effective }}
              notEffective={{ meaningLabel: signatureMeaningLabels.not_effective, statement: signatureMeaningStatements.not_effective }}
            />
          ) : (
            <Notice tone="warn" title="You cannot sign this review now." live={false}>
              Only an active QA approver who does not own the CAPA signs its effectiveness check. Nothing was changed; the link still works for
              its holder while it is valid.
            </Notice>
          )}
        </section>
      </div>
    </>
  );
}
