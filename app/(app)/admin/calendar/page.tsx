import type { Metadata } from 'next';
import type { ReactNode } from 'react';
import { AddClosureForm, DueDaysForm } from '@/components/clocks/calendar-forms';
import { ClosureTable } from '@/components/clocks/closure-table';
import { DeadlineCalculator } from '@/components/clocks/deadline-calculator';
import { HolidayTable } from '@/components/clocks/holiday-table';
import { RetentionNote } from '@/components/clocks/retention-note';
import { PageHeader } from '@/components/ui/page-header';
import { requirePageUser } from '@/lib/auth/session';
import {
  addDays,
  addYears,
  complaintRecordRetention,
  dietarySupplementRecordRetention,
  drugBatchRecordRetention,
  todayIn,
  upcomingFederalHolidays,
} from '@/lib/clocks';
import { getDueDaySettings, getSiteTimeZone, listSiteClosures } from '@/lib/site-calendar/queries';
import { addClosureAction, deactivateClosureAction, updateDueDaysAction } from './actions';

export const metadata: Metadata = { title: 'Site calendar' };

function Section({ id, title, intro, children }: { id: string; title: string; intro: ReactNode; children: ReactNode }) {
  return (
    <section aria-labelledby={id} className="flex flex-col gap-4 rounded-lg border border-ink-200 bg-white p-5">
      <div className="flex flex-col gap-1">
        <h2 id={id} className="text-xl font-semibold">
          {title}
        </h2>
        <div className="max-w-3xl text-ink-700">{intro}</div>
      </div>
      {children}
    </section>
  );
}

export default async function SiteCalendarPage() {
  await requirePageUser('calendar.manage', { returnTo: '/admin/calendar' });
  const timeZone = await getSiteTimeZone();
  const today = todayIn(timeZone, new Date());
  const [dueDays, closures] = await Promise.all([
    getDueDaySettings(),
    // The past year for reference, and every future closure however far ahead (a site has a handful a
    // year), so an administrator can always see and deactivate what was added.
    listSiteClosures({ from: addDays(today, -365), to: '2199-12-31' }),
  ]);
  const usesDefault = Object.values(dueDays).some((d) => d.source === 'default');
  // Worked examples of the retention rules, from today, so the rule reads with a real date.
  const expiry = addYears(today, 2);

  return (
    <>
      <PageHeader
        title="Site calendar"
        description={`Closure targets, the days the site does not work, and the clocks that count them. Today at the site (${timeZone}) is ${today}.`}
      />
      <div className="flex flex-col gap-6">
        <Section
          id="targets"
          title="Closure targets by classification"
          intro={
            <>
              Days from opening a deviation or CAPA to its target closure. No regulation sets these numbers (21 CFR
              211.192 asks for timely investigation); 30 days is common practice.
              {usesDefault ? ' Some targets are not set yet, so the common defaults are shown.' : ''}
            </>
          }
        >
          <DueDaysForm
            action={updateDueDaysAction}
            current={{ critical: dueDays.critical.days, major: dueDays.major.days, minor: dueDays.minor.days }}
          />
        </Section>

        <Section
          id="closures"
          title="Site closures"
          intro="Days the site does not work besides weekends and federal holidays. Internal business-day clocks skip them; regulatory deadlines do not, because a shutdown does not stop FDA’s clock. Closures are deactivated, never deleted."
        >
          <AddClosureForm action={addClosureAction} minDay={today} />
          <ClosureTable closures={closures} deactivateAction={deactivateClosureAction} />
        </Section>

        <Section
          id="holidays"
          title="US federal holidays"
          intro="The legal public holidays of 5 U.S.C. 6103(a). A holiday on a Saturday is observed the Friday before, on a Sunday the Monday after (6103(b); Executive Order 11582), so New Year’s Day on a Saturday is observed on 31 December."
        >
          <HolidayTable holidays={upcomingFederalHolidays(today, 12)} />
        </Section>

        <Section
          id="reporting"
          title="Regulatory reporting deadlines"
          intro="Counted in business days (weekdays less federal holidays as observed) from the day after the information is first received."
        >
          <DeadlineCalculator today={today} />
        </Section>

        <Section
          id="retention"
          title="Record retention"
          intro={`How long records are kept, shown where each record is kept. Examples for a batch expiring ${expiry} and a complaint received today:`}
        >
          <div className="flex flex-col gap-3">
            <RetentionNote what="batch records" retention={drugBatchRecordRetention({ kind: 'expiry', expiresOn: expiry })} />
            <RetentionNote
              what="the complaint file"
              retention={complaintRecordRetention({ kind: 'expiry', expiresOn: expiry, receivedOn: today })}
            />
            <RetentionNote
              what="dietary supplement records"
              retention={dietarySupplementRecordRetention({ kind: 'shelf_life', shelfLifeDate: expiry })}
            />
          </div>
        </Section>
      </div>
    </>
  );
}
