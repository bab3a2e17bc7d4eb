/* The five roles and their names. Pure data: importable from the permission table and the client. */

import type { Role } from '../../workflows/roles';

export { type Role, roles } from '../../workflows/roles';

export const roleLabels: Record<Role, string> = {
  operator: 'Operator',
  supervisor: 'Supervisor',
  qa_investigator: 'QA investigator',
  qa_approver: 'QA approver',
  admin: 'Administrator',
};
