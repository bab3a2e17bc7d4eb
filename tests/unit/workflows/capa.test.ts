import { describe, expect, it } from 'vitest';
import { initialTransition, transition } from 'xstate';
import { capas } from '@/db/schema';
import { roles, type Role } from '@/lib/auth/roles';
import { allTransitions, machineAllowedEvents, planEvent, resolveSnapshot, rulesFromMeta } from '@/lib/records/workflow';
import { type CapaContext, type CapaEventType, capaEvents, capaGuardRefusals, capaMachine } from '@/workflows/capa';
import { type CapaState, capaStates } from '@/workflows/states';

/*
 * The CAPA lifecycle, every state × event × role, then the checks that depend on who the person is
 * on this CAPA and on its plan. Sources: 21 CFR 820.100(a) (CAPA procedures: analyse, identify the
 * action, verify or validate that it is effective and does not harm the product, implement and
 * record), ICH Q10 §3.2.2 (a CAPA system whose effectiveness is evaluated), EU GMP Part I Chapter 1,
 * 1.4(xiv) (appropriate CAPAs identified and taken, their effectiveness monitored and assessed),
 * 21 CFR 11.50 (signatures show the printed name, date and meaning). That the plan is approved by a
 * second person and the owner cannot sign off their own CAPA is common practice (segregation of duties).
 */

type Signature = 'approved' | 'effective' | 'not_effective';
type Expectation = { to: CapaState; roles: Role[]; reason: boolean; signature: Signature | null } | null;

const qa: Role[] = ['qa_investigator', 'qa_approver'];
const everyoneButNobody: Role[] = [...roles];
// 21 CFR 820.100(a)(7) records the CAPA and its outcome; a cancellation says why and is signed (common practice).
const cancel: Expectation = { to: 'cancelled', roles: qa, reason: true, signature: 'approved' };
const none = Object.fromEntries(capaEvents.map((e) => [e, null])) as Record<CapaEventType, Expectation>;

const expected: Record<CapaState, Record<CapaEventType, Expectation>> = {
  proposed: {
    ...none,
    // 21 CFR 820.100(a)(3), 11.50: the plan is approved by QA, signed with its meaning.
    approve_plan: { to: 'plan_approved', roles: ['qa_approver'], reason: false, signature: 'approved' },
    cancel,
  },
  plan_approved: {
    ...none,
    // Common practice: the owner starts the work the plan describes (the guard is about the person, any role).
    start_implementation: { to: 'implementation', roles: everyoneButNobody, reason: false, signature: null },
    cancel,
  },
  implementation: {
    ...none,
    // ICH Q10 §3.2.2: effectiveness is evaluated once the actions are done.
    open_effectiveness_check: { to: 'effectiveness_check', roles: everyoneButNobody, reason: false, signature: null },
    cancel,
  },
  effectiveness_check: {
    ...none,
    // EU GMP 1.4(xiv): effectiveness assessed; 21 CFR 11.50: signed with its meaning.
    record_effective: { to: 'closed_effective', roles: ['qa_approver'], reason: false, signature: 'effective' },
    // Common practice: not effective says why and goes back to planning for new actions.
    record_not_effective: { to: 'proposed', roles: ['qa_approver'], reason: true, signature: 'not_effective' },
    cancel,
  },
  closed_effective: none,
  cancelled: none,
};

const ACTOR = 10;
const OWNER = 20;

/**
 * A CAPA on which the actor fits every record-level condition of the event, so the table tests the
 * role alone: the actor owns it for the owner's events and is independent of it otherwise; the plan
 * has actions and criteria; every action is done.
 */
function fittingContext(event: CapaEventType): CapaContext {
  const ownsIt = event === 'start_implementation' || event === 'open_effectiveness_check';
  return { ownerId: ownsIt ? ACTOR : OWNER, actionsPlanned: 3, actionsOpen: 0, criteriaWritten: true };
}

function ctx(overrides: Partial<CapaContext> = {}): CapaContext {
  return { ownerId: OWNER, actionsPlanned: 2, actionsOpen: 0, criteriaWritten: true, ...overrides };
}

function send(state: CapaState, context: CapaContext, type: CapaEventType, actor: { id: number; role: Role }) {
  return planEvent(capaMachine, resolveSnapshot(capaMachine, state, { ...context }), { type, actor });
}

const cases = capaStates.flatMap((state) =>
  capaEvents.flatMap((event) => roles.map((role) => ({ state, event, role, rule: expected[state][event] }))),
);

describe('CAPA machine', () => {
  it('has exactly the states of the database enum, in the same order', () => {
    expect(Object.keys(capaMachine.states)).toEqual([...capaStates]);
    expect(capas.status.enumValues).toEqual([...capaStates]);
  });

  it('starts as proposed, tells the owner, and knows exactly the CAPA events', () => {
    expect(capaMachine.config.initial).toBe('proposed');
    expect([...capaMachine.events].sort()).toEqual([...capaEvents].sort());
    const [snapshot, actions] = initialTransition(capaMachine);
    expect(snapshot.value).toBe('proposed');
    expect(actions.map((a) => a.type)).toContain('notifyOwnerAssigned');
  });

  it.each(cases)('$state × $event × $role', ({ state, event, role, rule }) => {
    const snapshot = resolveSnapshot(capaMachine, state, { ...fittingContext(event) });
    const sent = { type: event, actor: { id: ACTOR, role } };
    const allowed = rule !== null && rule.roles.includes(role);
    expect(snapshot.can(sent)).toBe(allowed);

    const plan = planEvent(capaMachine, snapshot, sent);
    if (rule === null) {
      expect(plan).toEqual({ ok: false, problem: 'not_in_this_state' });
    } else if (!allowed) {
      expect(plan.ok).toBe(false);
      if (!plan.ok && plan.problem === 'refused') expect(capaGuardRefusals).toHaveProperty(plan.guard!);
      else throw new Error('expected a guard refusal');
    } else {
      const [next] = transition(capaMachine, snapshot, sent);
      expect(next.value).toBe(rule.to);
      expect(plan).toMatchObject({ ok: true, nextState: rule.to, rules: { reasonRequired: rule.reason, signature: rule.signature } });
    }
  });

  it('treats closed (effective) and cancelled as final', () => {
    for (const state of ['closed_effective', 'cancelled'] as const) {
      const snapshot = resolveSnapshot(capaMachine, state, ctx());
      expect(snapshot.status).toBe('done');
      for (const role of roles) expect(machineAllowedEvents(capaMachine, snapshot, { id: OWNER, role })).toEqual([]);
    }
  });

  it('names only known signature meanings and explains every guard', () => {
    // 21 CFR 11.50(a)(3): every signature shows its meaning, from the closed list.
    const transitions = allTransitions(capaMachine);
    const expectedCount = Object.values(expected).flatMap((byEvent) => Object.values(byEvent).filter((r) => r !== null)).length;
    expect(transitions).toHaveLength(expectedCount);
    for (const t of transitions) {
      expect(() => rulesFromMeta(t.meta)).not.toThrow();
      expect(t.guard).not.toBeNull();
      expect(capaGuardRefusals).toHaveProperty(String(t.guard));
    }
    expect(Object.keys(capaGuardRefusals).sort()).toEqual(Object.keys(capaMachine.implementations.guards).sort());
  });
});

describe('who may act on this CAPA, and when', () => {
  const approver = { id: ACTOR, role: 'qa_approver' } as const;

  it('lets a QA approver approve a complete plan (who may not, because of what they did, is tests/unit/records/segregation.test.ts)', () => {
    expect(send('proposed', ctx(), 'approve_plan', approver)).toMatchObject({ ok: true, nextState: 'plan_approved' });
    expect(send('proposed', ctx(), 'approve_plan', { id: ACTOR, role: 'qa_investigator' })).toEqual({
      ok: false,
      problem: 'refused',
      guard: 'completePlanByApprover',
    });
  });

  it('refuses to approve a plan without actions or without effectiveness criteria (21 CFR 820.100(a)(3), (a)(4))', () => {
    expect(send('proposed', ctx({ actionsPlanned: 0 }), 'approve_plan', approver)).toMatchObject({ ok: false, problem: 'refused' });
    expect(send('proposed', ctx({ criteriaWritten: false }), 'approve_plan', approver)).toMatchObject({ ok: false, problem: 'refused' });
  });

  it('lets only the owner start the implementation (common practice)', () => {
    expect(send('plan_approved', ctx(), 'start_implementation', { id: ACTOR, role: 'qa_investigator' })).toEqual({
      ok: false,
      problem: 'refused',
      guard: 'byOwner',
    });
    expect(send('plan_approved', ctx({ ownerId: ACTOR }), 'start_implementation', { id: ACTOR, role: 'qa_investigator' })).toMatchObject({
      ok: true,
    });
  });

  it('opens the effectiveness check only when every action is completed (ICH Q10 §3.2.2)', () => {
    const owner = { id: OWNER, role: 'qa_investigator' } as const;
    expect(send('implementation', ctx({ actionsOpen: 1 }), 'open_effectiveness_check', owner)).toEqual({
      ok: false,
      problem: 'refused',
      guard: 'actionsDoneByOwnerOrQa',
    });
    expect(send('implementation', ctx({ actionsPlanned: 0, actionsOpen: 0 }), 'open_effectiveness_check', owner)).toMatchObject({ ok: false });
    expect(send('implementation', ctx(), 'open_effectiveness_check', owner)).toMatchObject({ ok: true, nextState: 'effectiveness_check' });
    // QA who does not own it may open it on demand; an operator who does not own it may not.
    expect(send('implementation', ctx(), 'open_effectiveness_check', { id: ACTOR, role: 'qa_approver' })).toMatchObject({ ok: true });
    expect(send('implementation', ctx(), 'open_effectiveness_check', { id: ACTOR, role: 'operator' })).toMatchObject({ ok: false });
  });

  it('leaves the effectiveness decision to QA approvers', () => {
    for (const event of ['record_effective', 'record_not_effective'] as const) {
      expect(send('effectiveness_check', ctx(), event, { id: ACTOR, role: 'qa_investigator' })).toEqual({
        ok: false,
        problem: 'refused',
        guard: 'byApprover',
      });
    }
  });

  it('sends a CAPA that did not work back to planning, with a reason and a signature (EU GMP 1.4(xiv))', () => {
    expect(send('effectiveness_check', ctx(), 'record_not_effective', approver)).toMatchObject({
      ok: true,
      nextState: 'proposed',
      rules: { reasonRequired: true, signature: 'not_effective' },
      effects: [{ type: 'notifyNotEffective' }],
    });
  });

  it('keeps floor roles from cancelling (21 CFR 820.100(a): the CAPA procedure is QA\'s)', () => {
    for (const role of ['operator', 'supervisor', 'admin'] as const) {
      expect(send('proposed', ctx({ ownerId: ACTOR }), 'cancel', { id: ACTOR, role })).toEqual({ ok: false, problem: 'refused', guard: 'byQa' });
    }
  });
});
