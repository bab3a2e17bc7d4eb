import { describe, expect, it } from 'vitest';
import { transition } from 'xstate';
import { deviations } from '@/db/schema';
import { roles, type Role } from '@/lib/auth/roles';
import { allTransitions, machineAllowedEvents, planEvent, resolveSnapshot, rulesFromMeta } from '@/lib/records/workflow';
import {
  type DeviationContext,
  type DeviationEventType,
  deviationEvents,
  deviationGuardRefusals,
  deviationMachine,
} from '@/workflows/deviation';
import { type DeviationState, deviationStates } from '@/workflows/states';

/*
 * The deviation lifecycle, every state × event × role, then the checks that depend on who the
 * person is on this record. Sources: 21 CFR 211.192 (unexplained discrepancies are thoroughly
 * investigated and the conclusions recorded), 21 CFR 211.22(a) (the quality control unit approves
 * or rejects), EU GMP Part I Chapter 1, 1.4(xiv) (deviations are reported, investigated and
 * recorded), 21 CFR 11.50 and 11.200 (signatures show their meaning; each is by one identified
 * person). Which role does which step is common practice. That a second person signs (segregation
 * of duties) is the record kind's rule, tested in tests/unit/records/segregation.test.ts.
 */

type Signature = 'investigation_complete' | 'approved';
type Expectation = { to: DeviationState; roles: Role[]; reason: boolean; signature: Signature | null } | null;

const floorAndQa: Role[] = ['operator', 'supervisor', 'qa_investigator', 'qa_approver'];
const qa: Role[] = ['qa_investigator', 'qa_approver'];
const cancel: Expectation = { to: 'cancelled', roles: qa, reason: true, signature: 'approved' };
const none = Object.fromEntries(deviationEvents.map((e) => [e, null])) as Record<DeviationEventType, Expectation>;

const expected: Record<DeviationState, Record<DeviationEventType, Expectation>> = {
  draft: {
    ...none,
    // Common practice: whoever saw it reports it, floor or QA.
    submit: { to: 'reported', roles: floorAndQa, reason: false, signature: null },
    // A draft is not a record yet: its author throws it away, nobody signs (common practice).
    discard: { to: 'discarded', roles: floorAndQa, reason: false, signature: null },
  },
  reported: {
    ...none,
    // 21 CFR 211.22(a): the quality unit takes it from here.
    start_triage: { to: 'triage', roles: ['qa_investigator'], reason: false, signature: null },
    cancel,
  },
  triage: {
    ...none,
    // 21 CFR 211.22(a), 11.50: the QC unit's approval, signed with its meaning.
    close_minor: { to: 'closed', roles: ['qa_approver'], reason: true, signature: 'approved' },
    // 21 CFR 211.192: a thorough investigation, by QA.
    assign_investigation: { to: 'investigation', roles: ['qa_investigator'], reason: false, signature: null },
    cancel,
  },
  investigation: {
    ...none,
    // 21 CFR 211.192 (conclusions recorded), 11.50 (meaning of the signature).
    submit_for_approval: { to: 'approval', roles: ['qa_investigator'], reason: false, signature: 'investigation_complete' },
    cancel,
  },
  approval: {
    ...none,
    // Common practice: a returned investigation says why.
    return_for_rework: { to: 'investigation', roles: ['qa_approver'], reason: true, signature: null },
    // 21 CFR 211.22(a), 11.50: the QC unit approves, signed "approved".
    approve: { to: 'closed', roles: ['qa_approver'], reason: false, signature: 'approved' },
  },
  closed: none,
  cancelled: none,
  discarded: none,
};

const ACTOR = 10;
const SOMEONE_ELSE = 20;
const ANOTHER = 30;

/**
 * A record on which the actor fits every record-level condition of the event, so the table tests
 * the role alone: the author submits, the assigned investigator submits for approval, everybody
 * else is independent of the record; the deviation is minor and every held batch is dispositioned.
 */
function fittingContext(event: DeviationEventType): DeviationContext {
  return {
    raisedBy: event === 'submit' || event === 'discard' ? ACTOR : SOMEONE_ELSE,
    investigatorId: event === 'submit_for_approval' ? ACTOR : ANOTHER,
    classification: 'minor',
    heldBatchesWithoutDisposition: 0,
  };
}

const cases = deviationStates.flatMap((state) =>
  deviationEvents.flatMap((event) => roles.map((role) => ({ state, event, role, rule: expected[state][event] }))),
);

function ctx(overrides: Partial<DeviationContext> = {}): DeviationContext {
  return { raisedBy: SOMEONE_ELSE, investigatorId: ANOTHER, classification: 'major', heldBatchesWithoutDisposition: 0, ...overrides };
}

function send(state: DeviationState, context: DeviationContext, type: DeviationEventType, actor: { id: number; role: Role }) {
  return planEvent(deviationMachine, resolveSnapshot(deviationMachine, state, { ...context }), { type, actor });
}

describe('deviation machine', () => {
  it('has exactly the states of the database enum, in the same order', () => {
    expect(Object.keys(deviationMachine.states)).toEqual([...deviationStates]);
    expect(deviations.status.enumValues).toEqual([...deviationStates]);
  });

  it('starts as a draft and knows exactly the deviation events', () => {
    expect(deviationMachine.config.initial).toBe('draft');
    expect([...deviationMachine.events].sort()).toEqual([...deviationEvents].sort());
  });

  it.each(cases)('$state × $event × $role', ({ state, event, role, rule }) => {
    const snapshot = resolveSnapshot(deviationMachine, state, { ...fittingContext(event) });
    const sent = { type: event, actor: { id: ACTOR, role } };
    const allowed = rule !== null && rule.roles.includes(role);
    expect(snapshot.can(sent)).toBe(allowed);

    const plan = planEvent(deviationMachine, snapshot, sent);
    if (rule === null) {
      expect(plan).toEqual({ ok: false, problem: 'not_in_this_state' });
    } else if (!allowed) {
      expect(plan.ok).toBe(false);
      if (!plan.ok && plan.problem === 'refused') expect(deviationGuardRefusals).toHaveProperty(plan.guard!);
      else throw new Error('expected a guard refusal');
    } else {
      const [next] = transition(deviationMachine, snapshot, sent);
      expect(next.value).toBe(rule.to);
      expect(plan).toMatchObject({
        ok: true,
        nextState: rule.to,
        rules: { reasonRequired: rule.reason, signature: rule.signature },
      });
    }
  });

  it('treats closed, cancelled and discarded as final', () => {
    for (const state of ['closed', 'cancelled', 'discarded'] as const) {
      const snapshot = resolveSnapshot(deviationMachine, state, ctx());
      expect(snapshot.status).toBe('done');
      for (const role of roles) expect(machineAllowedEvents(deviationMachine, snapshot, { id: ACTOR, role })).toEqual([]);
    }
  });

  it('names only known signature meanings and explains every guard', () => {
    // 21 CFR 11.50(a)(3): every signature shows its meaning, from the closed list.
    const transitions = allTransitions(deviationMachine);
    const expectedCount = Object.values(expected).flatMap((byEvent) => Object.values(byEvent).filter((r) => r !== null)).length;
    expect(transitions).toHaveLength(expectedCount);
    for (const t of transitions) {
      expect(() => rulesFromMeta(t.meta)).not.toThrow();
      expect(t.guard).not.toBeNull();
      expect(deviationGuardRefusals).toHaveProperty(String(t.guard));
    }
    expect(Object.keys(deviationGuardRefusals).sort()).toEqual(Object.keys(deviationMachine.implementations.guards).sort());
  });
});

describe('who may act on this deviation', () => {
  it('lets only the author submit their draft (common practice: an operator cannot submit another operator\'s draft)', () => {
    expect(send('draft', ctx({ raisedBy: ACTOR }), 'submit', { id: ACTOR, role: 'operator' })).toMatchObject({
      ok: true,
      nextState: 'reported',
    });
    expect(send('draft', ctx({ raisedBy: SOMEONE_ELSE }), 'submit', { id: ACTOR, role: 'operator' })).toEqual({
      ok: false,
      problem: 'refused',
      guard: 'byItsAuthor',
    });
    expect(send('draft', ctx({ raisedBy: SOMEONE_ELSE }), 'submit', { id: ACTOR, role: 'qa_approver' })).toMatchObject({ ok: false });
  });

  it('keeps an operator from triaging (21 CFR 211.22(a): the quality unit decides)', () => {
    expect(send('reported', ctx({ raisedBy: ACTOR }), 'start_triage', { id: ACTOR, role: 'operator' })).toEqual({
      ok: false,
      problem: 'refused',
      guard: 'byQaInvestigator',
    });
  });

  it('opens an investigation only once an investigator is assigned (21 CFR 211.192)', () => {
    const qaInvestigator = { id: ACTOR, role: 'qa_investigator' } as const;
    expect(send('triage', ctx({ investigatorId: null }), 'assign_investigation', qaInvestigator)).toEqual({
      ok: false,
      problem: 'refused',
      guard: 'byQaInvestigatorOnceAssigned',
    });
    expect(send('triage', ctx({ investigatorId: ANOTHER }), 'assign_investigation', qaInvestigator)).toMatchObject({
      ok: true,
      nextState: 'investigation',
    });
  });

  it('lets only the assigned investigator submit the investigation (21 CFR 211.192, 11.200(a))', () => {
    expect(send('investigation', ctx({ investigatorId: ACTOR }), 'submit_for_approval', { id: ACTOR, role: 'qa_investigator' })).toMatchObject({
      ok: true,
      rules: { signature: 'investigation_complete' },
    });
    expect(send('investigation', ctx({ investigatorId: ANOTHER }), 'submit_for_approval', { id: ACTOR, role: 'qa_investigator' })).toEqual({
      ok: false,
      problem: 'refused',
      guard: 'byAssignedInvestigator',
    });
    expect(send('investigation', ctx({ investigatorId: null }), 'submit_for_approval', { id: ACTOR, role: 'qa_investigator' })).toMatchObject({
      ok: false,
    });
  });

  describe('approval (21 CFR 211.22(a))', () => {
    const approver = { id: ACTOR, role: 'qa_approver' } as const;

    it('lets a QA approver approve with an "approved" signature', () => {
      expect(send('approval', ctx(), 'approve', approver)).toMatchObject({ ok: true, nextState: 'closed', rules: { signature: 'approved' } });
    });

    it('refuses the investigator role (the quality unit approves)', () => {
      expect(send('approval', ctx({ investigatorId: ACTOR }), 'approve', { id: ACTOR, role: 'qa_investigator' })).toMatchObject({ ok: false });
    });

    it('refuses approval while a held batch has no disposition (21 CFR 211.192: the investigation extends to the batches)', () => {
      expect(send('approval', ctx({ heldBatchesWithoutDisposition: 2 }), 'approve', approver)).toEqual({
        ok: false,
        problem: 'refused',
        guard: 'byApproverWithBatchesDisposed',
      });
    });

    it('offers an approver what the lifecycle allows, with the rules each asks for', () => {
      const approval = (context: DeviationContext) => resolveSnapshot(deviationMachine, 'approval', { ...context });
      expect(machineAllowedEvents(deviationMachine, approval(ctx()), approver)).toEqual([
        { type: 'return_for_rework', reasonRequired: true, signature: null },
        { type: 'approve', reasonRequired: false, signature: 'approved' },
      ]);
      expect(machineAllowedEvents(deviationMachine, approval(ctx({ heldBatchesWithoutDisposition: 1 })), approver)).toEqual([
        { type: 'return_for_rework', reasonRequired: true, signature: null },
      ]);
    });
  });

  describe('closing a minor deviation at triage (21 CFR 211.22(a), 11.50; EU GMP Part I 1.4(xiv))', () => {
    const approver = { id: ACTOR, role: 'qa_approver' } as const;

    it('closes a minor deviation with a justification and an "approved" signature', () => {
      expect(send('triage', ctx({ classification: 'minor' }), 'close_minor', approver)).toMatchObject({
        ok: true,
        nextState: 'closed',
        rules: { reasonRequired: true, signature: 'approved' },
      });
    });

    it.each(['major', 'critical', null] as const)('refuses when the classification is %s', (classification) => {
      expect(send('triage', ctx({ classification }), 'close_minor', approver)).toEqual({
        ok: false,
        problem: 'refused',
        guard: 'minorByApproverWithBatchesDisposed',
      });
    });

    it('refuses a minor deviation with a held batch lacking a disposition', () => {
      expect(send('triage', ctx({ classification: 'minor', heldBatchesWithoutDisposition: 1 }), 'close_minor', approver)).toMatchObject({
        ok: false,
        problem: 'refused',
      });
    });
  });

  describe('cancelling (common practice: raised in error or twice, signed by QA)', () => {
    it('lets QA cancel a reported deviation with a reason and a signature', () => {
      for (const role of qa) {
        expect(send('investigation', ctx(), 'cancel', { id: ACTOR, role })).toMatchObject({
          ok: true,
          nextState: 'cancelled',
          rules: { reasonRequired: true, signature: 'approved' },
        });
      }
    });

    it('is not possible on a draft, which only its author may discard', () => {
      expect(send('draft', ctx(), 'cancel', { id: ACTOR, role: 'qa_approver' })).toEqual({ ok: false, problem: 'not_in_this_state' });
      expect(send('draft', ctx({ raisedBy: SOMEONE_ELSE }), 'discard', { id: ACTOR, role: 'qa_approver' })).toEqual({
        ok: false,
        problem: 'refused',
        guard: 'byItsAuthor',
      });
    });

    it('is not possible once the deviation is in approval', () => {
      expect(send('approval', ctx(), 'cancel', { id: ACTOR, role: 'qa_approver' })).toEqual({ ok: false, problem: 'not_in_this_state' });
    });
  });

  it('decides by the stored record, not by what the event carries', () => {
    const snapshot = resolveSnapshot(deviationMachine, 'draft', ctx({ raisedBy: SOMEONE_ELSE }));
    const forged = { type: 'submit', actor: { id: ACTOR, role: 'operator' }, raisedBy: ACTOR } as const;
    expect(planEvent(deviationMachine, snapshot, forged)).toMatchObject({ ok: false, problem: 'refused' });
  });
});

describe('effects the machine asks for', () => {
  it.each([
    { state: 'draft', context: ctx({ raisedBy: ACTOR }), event: 'submit', role: 'operator', effects: ['holdBatches'] },
    { state: 'triage', context: ctx(), event: 'assign_investigation', role: 'qa_investigator', effects: ['notifyInvestigatorAssigned'] },
    {
      state: 'triage',
      context: ctx({ classification: 'minor' }),
      event: 'close_minor',
      role: 'qa_approver',
      effects: ['applyDispositions', 'notifyClosed'],
    },
    {
      state: 'investigation',
      context: ctx({ investigatorId: ACTOR }),
      event: 'submit_for_approval',
      role: 'qa_investigator',
      effects: ['notifyApprovalRequested'],
    },
    { state: 'approval', context: ctx(), event: 'return_for_rework', role: 'qa_approver', effects: ['notifyReturnedForRework'] },
    { state: 'approval', context: ctx(), event: 'approve', role: 'qa_approver', effects: ['applyDispositions', 'notifyClosed'] },
    { state: 'reported', context: ctx(), event: 'start_triage', role: 'qa_investigator', effects: [] },
    { state: 'triage', context: ctx(), event: 'cancel', role: 'qa_approver', effects: [] },
  ] as const)('$state --$event→ asks for $effects', ({ state, context, event, role, effects }) => {
    const plan = send(state, context, event, { id: ACTOR, role });
    expect(plan.ok && plan.effects.map((e) => e.type)).toEqual(effects);
  });

  it('names every refusal in a sentence a person can read', () => {
    for (const message of Object.values(deviationGuardRefusals)) expect(message).toMatch(/^[A-Z].+\.$/);
  });
});
