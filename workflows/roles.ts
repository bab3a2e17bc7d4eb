/*
 * The five roles every lifecycle speaks of. Pure, with no imports: the machines' guards name them,
 * the database enum is built from this tuple (db/schema/users.ts), and lib/auth/roles.ts adds the
 * words people read.
 */

export const roles = ['operator', 'supervisor', 'qa_investigator', 'qa_approver', 'admin'] as const;
export type Role = (typeof roles)[number];
