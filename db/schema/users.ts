import { boolean, index, int, mysqlEnum, mysqlTable, uniqueIndex, varchar } from 'drizzle-orm/mysql-core';
import { roles } from '../../workflows/roles';
import { createdAt, id, updatedAt, utc, version } from './columns';

export const users = mysqlTable(
  'users',
  {
    id: id(),
    email: varchar('email', { length: 254 }).notNull(),
    name: varchar('name', { length: 120 }).notNull(),
    /** Job title printed under the name on signatures, e.g. "QA Manager". */
    title: varchar('title', { length: 120 }).notNull().default(''),
    role: mysqlEnum('role', roles).notNull(),
    passwordHash: varchar('password_hash', { length: 100 }).notNull(),
    active: boolean('active').notNull().default(true),
    failedSignins: int('failed_signins').notNull().default(0),
    lockedUntil: utc('locked_until'),
    lastSigninAt: utc('last_signin_at'),
    passwordChangedAt: utc('password_changed_at'),
    /** Set when an administrator chose the password; the person must pick their own before working. */
    mustChangePassword: boolean('must_change_password').notNull().default(false),
    version: version(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('users_email_uq').on(t.email), index('users_role_active_idx').on(t.role, t.active)],
);

export const settings = mysqlTable('settings', {
  key: varchar('key', { length: 64 }).primaryKey(),
  value: varchar('value', { length: 1000 }).notNull(),
  updatedAt: updatedAt(),
});
