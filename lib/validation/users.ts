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

export const listUsersQuerySchema = z.object({
  page: z.coerce.number().int().min(1).catch(1),
});
