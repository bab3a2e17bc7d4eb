import { randomBytes } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { db } from '@/db/client';
import { fillingRings, machines, users } from '@/db/schema';
import { hashPassword } from '@/lib/auth/passwords';
import type { Role } from '@/lib/auth/roles';
import type { RecordActor } from '@/lib/records/kind';

/*
 * Rows a test owns: every name is unique, so tests neither see each other's data nor depend on the
 * order they run in, and the demo data in the database stays as seeded.
 */

export const testPassword = 'ring-check 4 integration';

const unique = () => `${Date.now().toString(36)}${randomBytes(3).toString('hex')}`.toUpperCase();

/** bcrypt is slow on purpose; one hash serves every test user. */
let passwordHash: Promise<string> | undefined;

export interface TestUser extends RecordActor {
  email: string;
  title: string;
}

export async function makeUser(role: Role, overrides: { name?: string; title?: string } = {}): Promise<TestUser> {
  passwordHash ??= hashPassword(testPassword);
  const email = `it-${role}-${unique()}@brackwater.example`.toLowerCase();
  const name = overrides.name ?? `Test ${role.replace('_', ' ')} ${unique().slice(-4)}`;
  const title = overrides.title ?? '';
  const [row] = await db
    .insert(users)
    .values({ email, name, title, role, passwordHash: await passwordHash })
    .$returningId();
  return { id: row!.id, name, role, email, title };
}

export async function makeMachine(overrides: Partial<typeof machines.$inferInsert> = {}) {
  const assetTag = `IT-FIL-${unique()}`;
  const [row] = await db
    .insert(machines)
    .values({ assetTag, name: `Test filler ${assetTag}`, room: 'Test room', model: 'Test model', capsuleSizes: '00,0,1', ...overrides })
    .$returningId();
  return { id: row!.id, assetTag };
}

/** One machine per test file holds its rings, so the Equipment page of the test database stays readable. */
let sharedMachine: Promise<{ id: number; assetTag: string }> | undefined;

export async function makeRing(overrides: Partial<typeof fillingRings.$inferInsert> = {}) {
  sharedMachine ??= makeMachine();
  const machineId = overrides.machineId ?? (await sharedMachine).id;
  const serial = `IT-R-${unique()}`;
  const [row] = await db
    .insert(fillingRings)
    .values({ serial, machineId, capsuleSize: '0', ...overrides })
    .$returningId();
  return getRing(row!.id);
}

export async function getRing(id: number) {
  const [ring] = await db.select().from(fillingRings).where(eq(fillingRings.id, id));
  if (!ring) throw new Error(`ring ${id} is gone`);
  return ring;
}

/** The MySQL error number behind Drizzle's "Failed query" wrapper. */
export function mysqlErrno(err: unknown): number | undefined {
  const e = err as { errno?: number; cause?: { errno?: number } };
  return e?.cause?.errno ?? e?.errno;
}
