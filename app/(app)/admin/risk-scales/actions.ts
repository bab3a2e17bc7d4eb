'use server';

import { revalidatePath } from 'next/cache';
import { redirect } from 'next/navigation';
import type { PublishScalesFormState } from '@/components/risk/publish-form-state';
import { requireUser } from '@/lib/auth/session';
import { describeError, formDataToObject } from '@/lib/define-action';
import { publishRiskScales } from '@/lib/risk-scales/commands';

/* Admin → Risk scales: the publish form hands its fields to the command, which checks, saves and audits. */

export async function publishRiskScalesAction(
  _previous: PublishScalesFormState,
  formData: FormData,
): Promise<PublishScalesFormState> {
  const input = formDataToObject(formData);
  let version: number;
  try {
    version = (await publishRiskScales(await requireUser(), input)).version;
  } catch (err) {
    const { message, fieldErrors } = describeError(err);
    const values = Object.fromEntries(Object.entries(input).filter((e): e is [string, string] => typeof e[1] === 'string'));
    return { status: 'failed', message, fieldErrors, values };
  }
  revalidatePath('/admin/risk-scales', 'layout');
  redirect(`/admin/risk-scales?published=${version}`);
}
