import { Notice } from '@/components/ui/notice';
import type { Fishbone, FishboneBranch } from '@/lib/causes';

/*
 * The cause-and-effect view of one defect. On a wide screen it is drawn as a fishbone: three
 * branches above the spine, three below, the defect at the head. Below the lg breakpoint (a
 * portrait tablet) the same markup is a plain list of six sections. The spine is decoration; the
 * structure a screen reader hears is headings and lists, in the order the branches are named.
 */

export interface CauseMapDefect {
  name: string;
}

function Branch({ branch, position }: { branch: FishboneBranch; position: 'top' | 'bottom' }) {
  const headingId = `branch-${branch.branch}`;
  const edge = position === 'top' ? 'lg:border-b-4' : 'lg:border-t-4';
  return (
    <section
      aria-labelledby={headingId}
      className={`flex flex-col gap-2 rounded-lg border border-ink-200 border-l-4 border-l-brass-600 bg-white p-4 lg:border-l lg:border-l-ink-200 ${edge} lg:border-brass-600`}
    >
      <div>
        <h3 id={headingId} className="text-lg font-semibold text-ink-900">
          {branch.label}{' '}
          <span className="text-sm font-normal text-ink-600">
            ({branch.causes.length} {branch.causes.length === 1 ? 'cause' : 'causes'})
          </span>
        </h3>
        <p className="text-sm text-ink-600">{branch.question}</p>
      </div>
      {branch.causes.length === 0 ? (
        <p className="text-ink-600">No usual causes listed on this branch. Consider it anyway.</p>
      ) : (
        <ul className="flex flex-col gap-3">
          {branch.causes.map((c) => (
            <li key={c.id} className="border-t border-ink-100 pt-2 first:border-t-0 first:pt-0">
              <p className="text-ink-900">{c.cause}</p>
              <p className="mt-1 text-sm text-ink-700">
                <span className="font-semibold">Check: </span>
                {c.check}
              </p>
              <p className="mt-1 text-xs text-ink-500">
                {c.basis === 'from memory' ? 'Value from memory of shell makers’ literature; confirm with your supplier' : 'Common practice'}
              </p>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}

export function CauseMap({ defect, fishbone }: { defect: CauseMapDefect; fishbone: Fishbone }) {
  const top = fishbone.branches.slice(0, 3);
  const bottom = fishbone.branches.slice(3);
  return (
    <div className="flex flex-col gap-5">
      {fishbone.cautions.length > 0 ? (
        <div className="flex flex-col gap-2">
          {fishbone.cautions.map((c) => (
            <Notice key={c.id} tone={c.id === 'quarantine' ? 'danger' : 'warn'} title="Caution" live={false}>
              {c.text}
            </Notice>
          ))}
        </div>
      ) : null}
      <p className="text-ink-700">
        Starting points for the investigation of <strong>{defect.name.toLowerCase()}</strong>, grouped on the six
        cause-and-effect branches. They are usual causes on a semi-automatic filler, not conclusions: confirm each with
        evidence.
      </p>
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-3">
        {top.map((b) => (
          <Branch key={b.branch} branch={b} position="top" />
        ))}
      </div>
      <div aria-hidden="true" className="hidden items-center gap-0 lg:flex">
        <div className="h-1.5 flex-1 rounded-l bg-brass-600" />
        <div className="h-0 w-0 border-y-[14px] border-l-[20px] border-y-transparent border-l-brass-600" />
        <div className="ml-2 rounded-md bg-ink-900 px-4 py-2 font-semibold text-white">{defect.name}</div>
      </div>
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-3">
        {bottom.map((b) => (
          <Branch key={b.branch} branch={b} position="bottom" />
        ))}
      </div>
    </div>
  );
}
