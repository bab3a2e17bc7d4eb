import bcrypt from 'bcryptjs';

/* Password hashing with bcrypt (cost 10). Pure apart from CPU time; importable from scripts. */

const cost = 10;

export function hashPassword(plain: string): Promise<string> {
  return bcrypt.hash(plain, cost);
}

export function verifyPassword(plain: string, hash: string): Promise<boolean> {
  return bcrypt.compare(plain, hash);
}

/** A hash of a random string, compared against when no account matches, so timing gives nothing away. */
export const decoyHash = '$2b$10$6z3OKVr96gwdjWHucv585u4MYeA3BPzZaHkOQQT6XDDsDE3MT6Leq';

export const passwordRules = { minLength: 12, maxLength: 128 } as const;
