import { describe, expect, it } from 'vitest';
import { assertCan, can, permissionTable, permissions, type Permission } from '@/lib/auth/permissions';
import { roles, type Role } from '@/lib/auth/roles';
import { ForbiddenError } from '@/lib/errors';

/*
 * The role → permission matrix as intended, written out here independently of lib/auth/permissions.ts
 * so a changed cell fails a test. Where the cells come from:
 * - QA alone approves, rejects and decides fitness for use: 21 CFR 211.22(a) (the quality control
 *   unit's authority to approve or reject) and EU GMP Part I, Chapter 2 (responsibilities of the
 *   heads of Production and Quality).
 * - Floor roles raise deviations and quarantine equipment at once; QA triages and investigates:
 *   21 CFR 211.192 and EU GMP Part I, Chapter 1 ask that deviations be recorded and investigated;
 *   who does which step is common practice, not a rule of either.
 * - Access is restricted to what each role needs: Annex 11 §12.1. The administrator manages accounts
 *   and master data and takes no GMP decision (segregation of duties: common practice).
 * - Complaints: anyone on site may take a complaint down for a caller (21 CFR 211.198(a): every written
 *   or oral complaint is recorded); QA reviews, investigates, answers and reopens it (21 CFR 211.198(a),
 *   21 CFR 111.560); the complainant's personal data is for QA alone (Annex 11 §12.1; data minimisation,
 *   GDPR Art. 5(1)(c)); an operator sees only the complaints they entered.
 * - Accounts: administrators see and manage every account (Annex 11 §12.3: creating, changing and
 *   cancelling access is recorded); every person sees their own and changes their own password, which
 *   only they may know (21 CFR 11.300(b) on revising passwords, 11.100(a) on uniqueness to one person).
 * - 'own' = only records the user raised, created or owns (drafts before submission, own CAPA actions).
 */

const matrix = `
permission                op   sup  inv  appr admin
deviation.read            any  any  any  any  any
deviation.raise           any  any  any  any  -
deviation.edit_draft      own  own  own  own  -
deviation.triage          -    -    any  -    -
deviation.investigate     -    -    any  -    -
deviation.approve         -    -    -    any  -
deviation.cancel          -    -    any  any  -
attachment.add            own  own  any  any  -
capa.read                 any  any  any  any  any
capa.create               -    -    any  any  -
capa.plan                 -    -    any  -    -
capa.reassign             -    -    own  any  -
capa.complete_action      own  own  own  own  -
capa.approve              -    -    -    any  -
capa.cancel               -    -    any  any  -
complaint.read            own  any  any  any  any
complaint.intake          any  any  any  any  -
complaint.read_personal   -    -    any  any  -
complaint.assess          -    -    any  -    -
complaint.approve         -    -    -    any  -
complaint.respond         -    -    any  any  -
complaint.reopen          -    -    any  any  -
batch.read                any  any  any  any  any
equipment.read            any  any  any  any  any
ring.quarantine           any  any  any  any  -
ring.return_to_service    -    -    any  any  -
ring.retire               -    -    -    any  -
weight_check.read         any  any  any  any  -
weight_check.record       any  any  any  -    -
sampling.use              any  any  any  any  -
risk.score                -    -    any  any  -
risk.manage_scales        -    -    -    -    any
calendar.manage           -    -    -    -    any
audit.read                -    -    any  any  any
masterdata.manage         -    -    -    -    any
users.manage              -    -    -    -    any
account.read              own  own  own  own  any
account.change_own_password own own own own own
settings.manage           -    -    -    -    any
`;

const columns: Role[] = ['operator', 'supervisor', 'qa_investigator', 'qa_approver', 'admin'];
type Cell = 'any' | 'own' | '-';
const intended = new Map<string, Record<Role, Cell>>(
  matrix
    .trim()
    .split('\n')
    .slice(1)
    .map((line) => {
      const [permission, ...cells] = line.trim().split(/\s+/);
      return [permission!, Object.fromEntries(columns.map((r, i) => [r, cells[i] as Cell])) as Record<Role, Cell>];
    }),
);

describe('permission table', () => {
  it('covers exactly the permissions the matrix intends, for exactly the five roles', () => {
    expect([...intended.keys()].sort()).toEqual([...permissions].sort());
    expect([...roles].sort()).toEqual([...columns].sort());
  });

  const cases = [...intended.entries()].flatMap(([permission, row]) =>
    columns.map((role) => ({ permission: permission as Permission, role, cell: row[role] })),
  );

  it.each(cases)('$role × $permission is $cell', ({ permission, role, cell }) => {
    expect(permissionTable[permission][role] ?? '-').toBe(cell);
    const me = { id: 7, role };
    const mine = { ownerIds: [7] };
    const theirs = { ownerIds: [8, null] };
    expect(can(me, permission)).toBe(cell !== '-');
    expect(can(me, permission, mine)).toBe(cell !== '-');
    expect(can(me, permission, theirs)).toBe(cell === 'any');
    if (cell === '-') {
      expect(() => assertCan(me, permission)).toThrow(/role does not allow/);
    } else if (cell === 'own') {
      expect(() => assertCan(me, permission, theirs)).toThrow(/only on your own records/);
      expect(() => assertCan(me, permission, mine)).not.toThrow();
    } else {
      expect(() => assertCan(me, permission, theirs)).not.toThrow();
    }
  });

  it('refuses with a ForbiddenError a person can read', () => {
    const err = (() => {
      try {
        assertCan({ id: 1, role: 'operator' }, 'ring.retire');
      } catch (e) {
        return e;
      }
    })();
    expect(err).toBeInstanceOf(ForbiddenError);
    expect((err as Error).message).toBe('Your role does not allow this (ring: retire).');
  });
});
