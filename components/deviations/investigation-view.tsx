import Link from 'next/link';
import { RichTextView } from '@/components/rich-text/rich-text-view';
import { type CauseState, causeStateLabels, rootCauseCategoryLabels } from '@/lib/deviations/investigation-schema';
import type { InvestigationViewDto } from '@/lib/deviations/investigation';

/*
 * The investigation as everyone else reads it: the report (cleaned again before it is shown), the
 * five whys, the causes that were concluded on, by branch, and the conclusions with any CAPA raised.
 */

const stateOrder: CauseState[] = ['root_cause', 'contributing', 'ruled_out', 'not_assessed'];

const stateClasses: Record<CauseState, string> = {
  root_cause: 'border-danger-700 bg-danger-100 text-danger-700',
  contributing: 'border-warn-700 bg-warn-100 text-warn-700',
  ruled_out: 'border-ink-400 bg-ink-100 text-ink-700',
  not_assessed: 'border-ink-300 bg-white text-ink-700',
};

function Row({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <>
      <dt className="text-ink-600">{label}</dt>
      <dd className="min-w-0 break-words whitespace-pre-line">{children}</dd>
    </>
  );
}

export function hasInvestigationContent(view: InvestigationViewDto): boolean {
  return (
    view.report !== null ||
    view.fiveWhys.length > 0 ||
    view.causeAnalysis.catalogue.length + view.causeAnalysis.own.length > 0 ||
    view.rootCauseCategory !== null ||
    view.rootCause !== null ||
    view.productImpact !== null ||
    view.capaRequired !== null ||
    view.capas.length > 0
  );
}

export function InvestigationView({ view }: { view: InvestigationViewDto }) {
  const branches = view.branches
    .map((b) => ({
      ...b,
      causes: b.causes
        .filter((c) => c.state !== 'not_assessed' || c.note !== '')
        .sort((x, y) => stateOrder.indexOf(x.state) - stateOrder.indexOf(y.state)),
    }))
    .filter((b) => b.causes.length > 0);

  return (
    <div className="mt-3 flex flex-col gap-5">
      <dl className="grid grid-cols-[max-content_minmax(0,1fr)] gap-x-6 gap-y-2">
        <Row label="Investigator">{view.investigatorName ?? 'Not assigned'}</Row>
        <Row label="Root-cause category">{view.rootCauseCategory ? rootCauseCategoryLabels[view.rootCauseCategory] : 'Not recorded yet'}</Row>
        <Row label="Root cause">{view.rootCause ?? 'Not recorded yet'}</Row>
        <Row label="Product impact">{view.productImpact ?? 'Not recorded yet'}</Row>
        <Row label="CAPA needed">
          {view.capaRequired === null ? 'Not decided yet' : view.capaRequired ? 'Yes' : 'No'}
          {view.capas.length > 0 ? (
            <span className="block">
              Raised:{' '}
              {view.capas.map((c, i) => (
                <span key={c.id}>
                  {i > 0 ? ', ' : null}
                  <Link href={`/capa/${c.id}`} className="font-semibold underline underline-offset-4">
                    {c.number}
                  </Link>
                </span>
              ))}
            </span>
          ) : null}
        </Row>
      </dl>

      <div>
        <h3 className="font-semibold">Report</h3>
        {view.report ? (
          <RichTextView html={view.report} label="Investigation report" className="mt-2 rounded-md border border-ink-200 p-4" />
        ) : (
          <p className="text-ink-600">No report written yet.</p>
        )}
      </div>

      {view.fiveWhys.length > 0 ? (
        <div>
          <h3 className="font-semibold">Five whys</h3>
          <ol className="mt-2 flex flex-col gap-2">
            {view.fiveWhys.map((w, i) => (
              <li key={i} className="grid grid-cols-[auto_minmax(0,1fr)] gap-x-2 rounded-md border border-ink-200 p-2">
                <span className="font-semibold text-ink-700">{i + 1}.</span>
                <span>
                  <span className="font-semibold">Why?</span> {w.why || '—'}
                  <span className="block">
                    <span className="font-semibold">Because</span> {w.because || '—'}
                  </span>
                </span>
              </li>
            ))}
          </ol>
        </div>
      ) : null}

      <div>
        <h3 className="font-semibold">Cause and effect</h3>
        {branches.length === 0 ? (
          <p className="text-ink-600">No probable cause concluded on yet.</p>
        ) : (
          <div className="mt-2 grid grid-cols-1 gap-3 md:grid-cols-2">
            {branches.map((b) => (
              <section key={b.branch} aria-label={`${b.label} branch`} className="rounded-md border border-ink-200 p-3">
                <h4 className="font-semibold">{b.label}</h4>
                <ul className="mt-2 flex flex-col gap-2">
                  {b.causes.map((c, i) => (
                    <li key={c.causeId ?? `own-${i}`}>
                      <span className={`mr-2 inline-block rounded border px-1.5 text-sm font-semibold ${stateClasses[c.state]}`}>
                        {causeStateLabels[c.state]}
                      </span>
                      {c.cause}
                      {c.causeId === null ? <span className="text-sm text-ink-600"> (added by the investigator)</span> : null}
                      {c.note ? <span className="block text-sm text-ink-700">{c.note}</span> : null}
                    </li>
                  ))}
                </ul>
              </section>
            ))}
          </div>
        )}
      </div>
    </div>
  );
}
