import 'server-only';
import { and, asc, count, desc, eq, gt } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { users } from '../../db/schema';
import type { Role } from '../auth/roles';
import { type AuditEntryDto, listAuditTrail } from '../records/trail';

/* Reads for user administration. DTOs only: the password hash never leaves this module. */

export interface UserDto {
  id: number;
  email: string;
  name: string;
  title: string;
  role: Role;
  active: boolean;
  /** ISO time; set while sign-in is refused after repeated failures. */
  lockedUntil: string | null;
  failedSignins: number;
  lastSigninAt: string | null;
  passwordChangedAt: string | null;
  /** An administrator set the password; the person has not yet chosen their own. */
  mustChangePassword: boolean;
  version: number;
  createdAt: string;
}

export const userColumns = {
  id: users.id,
  email: users.email,
  name: users.name,
  title: users.title,
  role: users.role,
  active: users.active,
  lockedUntil: users.lockedUntil,
  failedSignins: users.failedSignins,
  lastSigninAt: users.lastSigninAt,
  passwordChangedAt: users.passwordChangedAt,
  mustChangePassword: users.mustChangePassword,
  version: users.version,
  createdAt: users.createdAt,
};

type UserRow = Pick<typeof users.$inferSelect, keyof typeof userColumns>;

const iso = (d: Date | null) => (d ? d.toISOString() : null);

/** Field by field, so a whole row (as the write path hands back) never carries its password hash out. */
export function toUserDto(row: UserRow): UserDto {
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    title: row.title,
    role: row.role,
    active: row.active,
    lockedUntil: iso(row.lockedUntil),
    failedSignins: row.failedSignins,
    lastSigninAt: iso(row.lastSigninAt),
    passwordChangedAt: iso(row.passwordChangedAt),
    mustChangePassword: row.mustChangePassword,
    version: row.version,
    createdAt: row.createdAt.toISOString(),
  };
}

export const usersPageSize = 50;

export interface UserPage {
  page: number;
  pageSize: number;
  total: number;
  rows: UserDto[];
}

/** Active people first, then by name; paged in SQL. */
export async function listUsers(page: number, pageSize = usersPageSize, database: DbOrTx = db): Promise<UserPage> {
  const [totalRow] = await database.select({ n: count() }).from(users);
  const rows = await database
    .select(userColumns)
    .from(users)
    .orderBy(desc(users.active), asc(users.name), asc(users.id))
    .limit(pageSize)
    .offset((page - 1) * pageSize);
  return { page, pageSize, total: totalRow?.n ?? 0, rows: rows.map(toUserDto) };
}

export async function getUser(id: number, database: DbOrTx = db): Promise<UserDto | null> {
  const [row] = await database.select(userColumns).from(users).where(eq(users.id, id)).limit(1);
  return row ? toUserDto(row) : null;
}

export interface UserOverview {
  active: number;
  lockedNow: number;
}

export async function getUserOverview(now = new Date(), database: DbOrTx = db): Promise<UserOverview> {
  const [active] = await database.select({ n: count() }).from(users).where(eq(users.active, true));
  const [locked] = await database
    .select({ n: count() })
    .from(users)
    .where(and(eq(users.active, true), gt(users.lockedUntil, now)));
  return { active: active?.n ?? 0, lockedNow: locked?.n ?? 0 };
}

/** The newest audit entries about one user account (sign-ins, lock-outs and administration). */
export async function listUserAuditTrail(userId: number, limit = 25, database: DbOrTx = db): Promise<AuditEntryDto[]> {
  return listAuditTrail(database, 'user', userId, { limit });
}
