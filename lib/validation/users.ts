import { z } from 'zod';
import { passwordRules } from '../auth/passwords';
import { roles } from '../auth/roles';

/*
 * User administration input, shared by the admin forms (FormData: every value a string) and the
 * JSON API. EU GMP Annex 11 §12.3 asks that creating, changing and cancelling access be recorded,
 * so every change after creation carries a reason for the audit trail.
 */

export const passwordMinLength = passwordRules.minLength;
export const passwordMaxLength = passwordRules.maxLength;

const trimmed = (max: number, label: string) =>
  z
    .string({ error: `${label} is required.` })
    .trim()
    .max(max, `${label} must be at most ${max} characters.`);

const name = trimmed(120, 'Name').min(1, 'Enter the person’s full name as it should appear on signatures.');
const email = z
  .string({ error: 'E-mail is required.' })
  .trim()
  .toLowerCase()
  .pipe(z.email({ error: 'Enter an e-mail address like name@example.com.' }).max(254, 'E-mail is too long.'));
const title = trimmed(120, 'Title').default('');
const role = z.enum(roles, { error: 'Choose a role.' });
const password = z
  .string({ error: 'Enter a password.' })
  .min(passwordMinLength, `Use at least ${passwordMinLength} characters.`)
  .max(passwordMaxLength, `Use at most ${passwordMaxLength} characters.`)
  .refine((p) => p.trim().length === p.length, 'Remove spaces from the start and end.');
const version = z.coerce
  .number({ error: 'The form is missing the record version. Reload the page.' })
  .int()
  .positive('The form is missing the record version. Reload the page.');
const reason = trimmed(500, 'Reason').min(3, 'Say why (at least 3 characters); it goes into the audit trail.');
const optionalReason = trimmed(500, 'Reason')
  .optional()
  .transform((r) => (r ? r : undefined));

export const createUserSchema = z.object({ name, email, title, role, password });
export type CreateUserInput = z.input<typeof createUserSchema>;

export const changeRoleSchema = z.object({ version, role, reason });
export const setActiveSchema = z.object({ version, reason });
export const resetPasswordSchema = z.object({ version, password, reason: optionalReason });
export const unlockUserSchema = z.object({ version, reason: optionalReason });

/** PATCH /api/users/:id — one change per request, named by `action`. */
export const userPatchSchema = z.discriminatedUnion('action', [
  changeRoleSchema.extend({ action: z.literal('change_role') }),
  setActiveSchema.extend({ action: z.literal('deactivate') }),
  setActiveSchema.extend({ action: z.literal('reactivate') }),
  resetPasswordSchema.extend({ action: z.literal('reset_password') }),
  unlockUserSchema.extend({ action: z.literal('unlock') }),
]);
export type UserPatchInput = z.input<typeof userPatchSchema>;
export type UserPatchAction = z.output<typeof userPatchSchema>['action'];

/*
 * A person replacing their own password. The current one proves it is them at the keyboard
 * (21 CFR 11.300(b)); the new one follows the same rules an administrator's does, is typed twice so
 * a slip does not lock them out, and must differ from the current one, which after a reset is the
 * temporary password an administrator chose.
 */
const requiredPassword = (message: string) => z.string({ error: message }).min(1, message);

export const changeOwnPasswordSchema = z
  .object({
    currentPassword: requiredPassword('Enter your current password.'),
    newPassword: password,
    confirmPassword: requiredPassword('Type the new password again.'),
  })
  .refine((p) => p.confirmPassword === p.newPassword, {
    path: ['confirmPassword'],
    message: 'This does not match the new password. Type it again.',
    // Checked as soon as both are strings, so a mismatch is reported together with any other problem.
    when: (payload) => bothStrings(payload.value, 'newPassword', 'confirmPassword'),
  })
  .refine((p) => p.newPassword !== p.currentPassword, {
    path: ['newPassword'],
    message: 'Choose a password different from your current one.',
    when: (payload) => bothStrings(payload.value, 'newPassword', 'currentPassword'),
  });
export type ChangeOwnPasswordInput = z.input<typeof changeOwnPasswordSchema>;

function bothStrings(value: unknown, a: string, b: string): boolean {
  const v = value as Record<string, unknown> | null;
  return typeof v?.[a] === 'string' && typeof v?.[b] === 'string' && v[a] !== '' && v[b] !== '';
}

export const listUsersQuerySchema = z.object({
  page: z.coerce.number().int().min(1).catch(1),
});
