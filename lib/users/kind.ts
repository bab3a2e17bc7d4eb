import 'server-only';
import { users } from '../../db/schema';
import { defineRecordKind } from '../records/kind';
import { type UserDto, toUserDto } from './queries';

/*
 * User accounts on the write path: a plain kind (no lifecycle machine), active or deactivated,
 * edited section by section. Administrators manage every account (users.manage); the holder of an
 * account sees it and replaces their own password, and nobody else does (21 CFR 11.300(b); the
 * password that signs their records is known to them alone, 11.100(a), 11.200(a)). Accounts are
 * never deleted, so every audit entry and signature keeps pointing at a real person (21 CFR 11.50).
 *
 * Sign-in bookkeeping (failure count, lock-out, last sign-in) is not a section: lib/auth/credentials.ts
 * writes it as a consequence of a password attempt, without bumping the version, so an
 * administrator's open form stays current while the person signs in.
 */

export type UserRow = typeof users.$inferSelect;

export const userStateLabels = { active: 'Active', inactive: 'Deactivated' } as const;

export const userKind = defineRecordKind({
  recordType: 'user',
  noun: 'user account',
  table: users,
  readPermission: 'account.read',
  owners: (t) => [t.id],
  stateOf: (row: UserRow) => (row.active ? 'active' : 'inactive'),
  stateLabels: userStateLabels,
  participants: {
    holder: { did: 'hold this account', of: (row) => [row.id] },
  },
  sections: {
    role: { label: 'Changing the role', permission: 'users.manage', states: 'any' },
    // A second administrator ends an administrator's access, so nobody locks the site out by mistake.
    deactivation: {
      label: 'Deactivating the account',
      permission: 'users.manage',
      states: ['active'],
      stateRefusal: (row) => `${row.name} is already deactivated.`,
      independentOf: ['holder'],
    },
    reactivation: {
      label: 'Reactivating the account',
      permission: 'users.manage',
      states: ['inactive'],
      stateRefusal: (row) => `${row.name} is already active.`,
    },
    password_reset: { label: 'Resetting the password', permission: 'users.manage', states: 'any' },
    unlock: {
      label: 'Unlocking the account',
      permission: 'users.manage',
      states: 'any',
      condition: { holds: (row) => row.lockedUntil !== null || row.failedSignins > 0, refusal: (row) => `${row.name} is not locked out.` },
    },
    own_password: {
      label: 'Changing your own password',
      permission: 'account.change_own_password',
      states: ['active'],
      holders: {
        of: (row) => [row.id],
        refusal: 'Only the account holder chooses their own password; an administrator can reset it.',
      },
    },
  },
  // Never the password hash: only whether the person must replace an administrator's password.
  auditFields: ['email', 'name', 'title', 'role', 'active', 'lockedUntil', 'failedSignins', 'mustChangePassword'],
  toDto: (row: UserRow): UserDto => toUserDto(row),
});
