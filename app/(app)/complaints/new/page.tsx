import type { Metadata } from 'next';
import { IntakeForm } from '@/components/complaints/intake-form';
import { PageHeader } from '@/components/ui/page-header';
import { requirePageUser } from '@/lib/auth/session';
import { todayIn } from '@/lib/clocks/dates';
import { listProductOptions } from '@/lib/complaints/queries';
import { getSiteTimeZone } from '@/lib/site-calendar/queries';
import { submitIntake } from './actions';

export const metadata: Metadata = { title: 'Take down a complaint' };

export default async function NewComplaintPage() {
  await requirePageUser('complaint.intake', { returnTo: '/complaints/new' });
  const [products, timeZone] = await Promise.all([listProductOptions(), getSiteTimeZone()]);
  return (
    <>
      <PageHeader
        title="Take down a complaint"
        description="For a caller, a letter or an e-mail. Write what they told you; QA assesses it. The name and contact are seen by QA only."
      />
      <IntakeForm action={submitIntake} products={products} today={todayIn(timeZone, new Date())} />
    </>
  );
}
