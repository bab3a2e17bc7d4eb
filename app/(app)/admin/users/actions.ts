'use server';

import { revalidatePath } from 'next/cache';
import { redirect } from 'next/navigation';
import type { AdminFormState } from '@/components/admin/form-state';
import { roleLabels } from '@/lib/auth/roles';
import { requireUser } from '@/lib/auth/session';
import {
  changeUserRole,
  createUser,
  deactivateUser,
  reactivateUser,
  resetUserPassword,
  unlockUser,
  type UserActor,
} from '@/lib/users/commands';
import type { UserDto } from '@/lib/users/queries';
import { describeError } from '@/lib/define-action';

/*
 * Form actions for Admin → Users. Each one re-reads the signed-in user (requireUser) and hands the
 * form to the command, which checks the permission, validates and audits. The typed values come back
 * so a failed form keeps them; password fields are left out.
 */

const secretFields = new Set(['password']);

function typedValues(formData: FormData): Record<string, string> {
  const values: Record<string, string> = {};
  for (const [key, value] of formData.entries()) {
    if (typeof value === 'string' && !key.startsWith('$ACTION') && !secretFields.has(key)) values[key] = value;
  }
  return values;
}

function fields(formData: FormData): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [key, value] of formData.entries()) if (typeof value === 'string') out[key] = value;
  return out;
}

async function execute(
  previous: AdminFormState,
  formData: FormData,
  command: (actor: UserActor, input: Record<string, string>) => Promise<UserDto>,
): Promise<{ user: UserDto; state?: undefined } | { user?: undefined; state: AdminFormState }> {
  let user: UserDto;
  try {
    user = await command(await requireUser(), fields(formData));
  } catch (err) {
    const { message, fieldErrors } = describeError(err);
    return {
      state: { status: 'failed', message, fieldErrors, values: typedValues(formData), submissions: previous.submissions + 1 },
    };
  }
  revalidatePath('/admin/users', 'layout');
  return { user };
}

async function run(
  previous: AdminFormState,
  formData: FormData,
  command: (actor: UserActor, input: Record<string, string>) => Promise<UserDto>,
  successMessage: (user: UserDto) => string,
): Promise<AdminFormState> {
  const outcome = await execute(previous, formData, command);
  if (outcome.state) return outcome.state;
  return {
    status: 'saved',
    message: successMessage(outcome.user),
    fieldErrors: {},
    values: {},
    submissions: previous.submissions + 1,
  };
}

export async function createUserAction(previous: AdminFormState, formData: FormData): Promise<AdminFormState> {
  const outcome = await execute(previous, formData, createUser);
  if (outcome.state) return outcome.state;
  redirect(`/admin/users/${outcome.user.id}?created=1`);
}

export async function changeRoleAction(
  userId: number,
  previous: AdminFormState,
  formData: FormData,
): Promise<AdminFormState> {
  return run(previous, formData, (actor, input) => changeUserRole(actor, userId, input), (u) => `${u.name} is now ${roleLabels[u.role]}.`);
}

export async function deactivateAction(
  userId: number,
  previous: AdminFormState,
  formData: FormData,
): Promise<AdminFormState> {
  return run(
    previous,
    formData,
    (actor, input) => deactivateUser(actor, userId, input),
    (u) => `${u.name} is deactivated and can no longer sign in.`,
  );
}

export async function reactivateAction(
  userId: number,
  previous: AdminFormState,
  formData: FormData,
): Promise<AdminFormState> {
  return run(previous, formData, (actor, input) => reactivateUser(actor, userId, input), (u) => `${u.name} can sign in again.`);
}

export async function resetPasswordAction(
  userId: number,
  previous: AdminFormState,
  formData: FormData,
): Promise<AdminFormState> {
  return run(
    previous,
    formData,
    (actor, input) => resetUserPassword(actor, userId, input),
    (u) => `The password of ${u.name} is reset. Give them the temporary password in person.`,
  );
}

export async function unlockAction(
  userId: number,
  previous: AdminFormState,
  formData: FormData,
): Promise<AdminFormState> {
  return run(previous, formData, (actor, input) => unlockUser(actor, userId, input), (u) => `${u.name} can try to sign in again.`);
}
