/* The five roles. Pure data: importable from the schema, the permission table and the client. */

export const roles = ['operator', 'supervisor', 'qa_investigator', 'qa_approver', 'admin'] as const;
export type Role = (typeof roles)[number];

export const roleLabels: Record<Role, string> = {
  operator: 'Operator',
  supervisor: 'Supervisor',
  qa_investigator: 'QA investigator',
  qa_approver: 'QA approver',
  admin: 'Administrator',
};
