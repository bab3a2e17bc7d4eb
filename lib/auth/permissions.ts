import type { Role } from './roles';
import { ForbiddenError } from '../errors';

/*
 * The one role → permission table. Pages, server actions and API routes all ask it; hiding a
 * button is never the check. A cell is 'any' (every record) or 'own' (only records the user
 * raised, created or owns, passed as `record.ownerIds`). Segregation of duties on approvals is a
 * workflow guard on top of this table, not a setting.
 */

export const permissions = [
  'deviation.read',
  'deviation.raise',
  'deviation.edit_draft',
  'deviation.triage',
  'deviation.investigate',
  'deviation.approve',
  'deviation.cancel',
  'attachment.add',
  'capa.read',
  'capa.create',
  'capa.plan',
  'capa.reassign',
  'capa.complete_action',
  'capa.approve',
  'capa.cancel',
  'complaint.read',
  'complaint.intake',
  'complaint.read_personal',
  'complaint.assess',
  'complaint.approve',
  'complaint.respond',
  'complaint.reopen',
  'batch.read',
  'equipment.read',
  'ring.quarantine',
  'ring.return_to_service',
  'ring.retire',
  'weight_check.read',
  'weight_check.record',
  'sampling.use',
  'risk.score',
  'risk.manage_scales',
  'calendar.manage',
  'audit.read',
  'masterdata.manage',
  'users.manage',
  'account.read',
  'account.change_own_password',
  'settings.manage',
] as const;
export type Permission = (typeof permissions)[number];
export type Scope = 'any' | 'own';

const O = 'own' as const;
const A = 'any' as const;

export const permissionTable: Record<Permission, Partial<Record<Role, Scope>>> = {
  'deviation.read': { operator: A, supervisor: A, qa_investigator: A, qa_approver: A, admin: A },
  'deviation.raise': { operator: A, supervisor: A, qa_investigator: A, qa_approver: A },
  'deviation.edit_draft': { operator: O, supervisor: O, qa_investigator: O, qa_approver: O },
  'deviation.triage': { qa_investigator: A },
  'deviation.investigate': { qa_investigator: A },
  'deviation.approve': { qa_approver: A },
  'deviation.cancel': { qa_investigator: A, qa_approver: A },
  // Evidence on a record: its author (own) and QA (any); lib/attachments/record-access.ts adds the state rules.
  'attachment.add': { operator: O, supervisor: O, qa_investigator: A, qa_approver: A },
  'capa.read': { operator: A, supervisor: A, qa_investigator: A, qa_approver: A, admin: A },
  'capa.create': { qa_investigator: A, qa_approver: A },
  'capa.plan': { qa_investigator: A },
  // Handing a CAPA to another owner: QA approvers, and the owner themselves.
  'capa.reassign': { qa_investigator: O, qa_approver: A },
  'capa.complete_action': { operator: O, supervisor: O, qa_investigator: O, qa_approver: O },
  'capa.approve': { qa_approver: A },
  'capa.cancel': { qa_investigator: A, qa_approver: A },
  // An operator who took a caller's complaint may look at the record they entered ('own'), never at personal data.
  'complaint.read': { operator: O, supervisor: A, qa_investigator: A, qa_approver: A, admin: A },
  'complaint.intake': { operator: A, supervisor: A, qa_investigator: A, qa_approver: A },
  'complaint.read_personal': { qa_investigator: A, qa_approver: A },
  'complaint.assess': { qa_investigator: A },
  'complaint.approve': { qa_approver: A },
  'complaint.respond': { qa_investigator: A, qa_approver: A },
  'complaint.reopen': { qa_investigator: A, qa_approver: A },
  'batch.read': { operator: A, supervisor: A, qa_investigator: A, qa_approver: A, admin: A },
  'equipment.read': { operator: A, supervisor: A, qa_investigator: A, qa_approver: A, admin: A },
  'ring.quarantine': { operator: A, supervisor: A, qa_investigator: A, qa_approver: A },
  'ring.return_to_service': { qa_investigator: A, qa_approver: A },
  'ring.retire': { qa_approver: A },
  'weight_check.read': { operator: A, supervisor: A, qa_investigator: A, qa_approver: A },
  'weight_check.record': { operator: A, supervisor: A, qa_investigator: A },
  'sampling.use': { operator: A, supervisor: A, qa_investigator: A, qa_approver: A },
  'risk.score': { qa_investigator: A, qa_approver: A },
  'risk.manage_scales': { admin: A },
  'calendar.manage': { admin: A },
  'audit.read': { qa_investigator: A, qa_approver: A, admin: A },
  'masterdata.manage': { admin: A },
  'users.manage': { admin: A },
  // A user account is a record too: administrators see every one, each person their own, so the
  // person can change their own password on the same write path (lib/users/kind.ts).
  'account.read': { operator: O, supervisor: O, qa_investigator: O, qa_approver: O, admin: A },
  'account.change_own_password': { operator: O, supervisor: O, qa_investigator: O, qa_approver: O, admin: O },
  'settings.manage': { admin: A },
};

export interface Actor {
  id: number;
  role: Role;
}

export interface ScopedRecord {
  /** Users who count as the record's own people for 'own' permissions (raiser, creator, owner). */
  ownerIds: readonly (number | null | undefined)[];
}

/** Pure predicate: may this role do this at all (optionally to this record)? */
export function can(actor: Actor, permission: Permission, record?: ScopedRecord): boolean {
  const scope = permissionTable[permission][actor.role];
  if (!scope) return false;
  if (scope === 'any') return true;
  return record ? record.ownerIds.includes(actor.id) : true;
}

const describe = (p: Permission) => p.replace('.', ': ').replace(/_/g, ' ');

/** Throws ForbiddenError with a reason a person can read. */
export function assertCan(actor: Actor, permission: Permission, record?: ScopedRecord): void {
  const scope = permissionTable[permission][actor.role];
  if (!scope) {
    throw new ForbiddenError(`Your role does not allow this (${describe(permission)}).`);
  }
  if (scope === 'own' && record && !record.ownerIds.includes(actor.id)) {
    throw new ForbiddenError(`Your role allows this only on your own records (${describe(permission)}).`);
  }
}
