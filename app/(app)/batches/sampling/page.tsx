import type { Metadata } from 'next';
import Link from 'next/link';
import { SamplingCalculator } from '@/components/sampling/sampling-calculator';
import { Notice } from '@/components/ui/notice';
import { PageHeader } from '@/components/ui/page-header';
import { requirePageUser } from '@/lib/auth/session';
import { samplingFormValuesFrom } from '@/lib/validation/sampling';

export const metadata: Metadata = { title: 'Re-inspection sampling plan' };

export default async function SamplingPage({ searchParams }: PageProps<'/batches/sampling'>) {
  const initial = samplingFormValuesFrom(await searchParams);
  const query = new URLSearchParams(Object.entries(initial).filter(([, v]) => v !== '')).toString();
  await requirePageUser('sampling.use', { returnTo: `/batches/sampling${query ? `?${query}` : ''}` });

  return (
    <>
      <PageHeader
        title="Re-inspection sampling plan"
        description="How many capsules to pull from an affected lot and how many defects it may contain, per defect class. Single sampling plans by attributes."
        actions={
          <Link href="/batches" className="inline-flex min-h-11 items-center font-semibold underline underline-offset-4">
            Back to batches
          </Link>
        }
      />

      <div className="mb-6">
        <Notice tone="danger" title="Critical defects are not sampled away" live={false}>
          A foreign body, a mix-up (wrong product or strength) or an empty capsule found in a lot means the lot is
          quarantined and the site procedure followed. A sampling plan can never release such a lot.
        </Notice>
      </div>

      <SamplingCalculator initial={initial} />

      <section aria-labelledby="standard-heading" className="mt-8 flex max-w-3xl flex-col gap-3 text-ink-800">
        <h2 id="standard-heading" className="text-xl font-bold text-ink-900">
          Which standard, and how the tables are read
        </h2>
        <p>
          Plumbline follows <strong>ISO 2859-1:1999</strong>. The code letter comes from Table 1 (lot size and
          inspection level); the plan from Table 2-A (normal), 2-B (tightened) or 2-C (reduced). Where the table shows an
          arrow, the plan is the first one below (↓) or above (↑) it, and that plan&apos;s own sample size and code letter
          apply. When the sample size equals or exceeds the lot, every unit is inspected. The normal and tightened plans
          are the same in ANSI/ASQ Z1.4-2003 Tables II-A and II-B.
        </p>
        <h3 className="text-lg font-bold text-ink-900">Reduced inspection: where ISO 2859-1:1999 and Z1.4 differ</h3>
        <p>
          ANSI/ASQ Z1.4-2003 Table II-C leaves gaps between the acceptance and rejection numbers under reduced inspection
          (for example Ac 1, Re 3). A count inside the gap accepts that lot, but normal inspection is reinstated from the
          next lot. ISO 2859-1:1999 removed the gaps: every reduced plan has Re = Ac + 1, so a lot is either accepted or
          not, and a lot not accepted sends inspection back to normal. Plumbline uses the ISO 2859-1:1999 reduced
          plans. If a customer contract names Z1.4, use its table instead.
        </p>
        <p>
          <strong>Check before use:</strong> the normal and tightened plans in Plumbline were checked against published
          reprints of the same plans; the reduced plans were derived (Re = Ac + 1 on the reduced sample sizes) and have
          not yet been checked against ISO 2859-1:1999 Table 2-C. Confirm a reduced plan against your site&apos;s licensed
          copy of the standard before relying on it.
        </p>
        <h3 className="text-lg font-bold text-ink-900">Switching rules (ISO 2859-1:1999 clause 9)</h3>
        <ul className="list-disc space-y-1 pl-6">
          <li>Inspection starts at normal.</li>
          <li>
            <strong>Normal → tightened</strong> when 2 of 5 or fewer consecutive lots are not accepted on original
            inspection.
          </li>
          <li>
            <strong>Tightened → normal</strong> when 5 consecutive lots are accepted on original inspection.
          </li>
          <li>
            <strong>Tightened → stop</strong>: when 5 lots in total are not accepted while on tightened inspection,
            acceptance under the scheme stops until the supplier or line has corrected the cause.
          </li>
          <li>
            <strong>Normal → reduced</strong> only when the switching score reaches 30, production is steady and the
            responsible authority agrees. The score starts at 0 on normal inspection. For a plan with Ac 0 or 1 it gains 2
            for each accepted lot; for Ac 2 or more it gains 3 if the lot would also have been accepted at the next
            tighter AQL. Any other outcome sets it back to 0.
          </li>
          <li>
            <strong>Reduced → normal</strong> when a lot is not accepted, production becomes irregular or delayed, or
            other conditions call for it.
          </li>
        </ul>
        <p className="text-sm text-ink-600">
          The defect-class AQLs offered by default (major 0.65, minor 2.5, critical 100 %) are common practice on capsule
          lines, not a requirement of the standard; the site SOP governs.
        </p>
      </section>
    </>
  );
}
