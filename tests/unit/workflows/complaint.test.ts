import { describe, expect, it } from 'vitest';
import { initialTransition, transition } from 'xstate';
import { complaints } from '@/db/schema';
import { roles, type Role } from '@/lib/auth/roles';
import { allTransitions, machineAllowedEvents, planEvent, resolveSnapshot, rulesFromMeta } from '@/lib/records/workflow';
import {
  type ComplaintContext,
  type ComplaintEventType,
  complaintEvents,
  complaintGuardRefusals,
  complaintMachine,
} from '@/workflows/complaint';
import { type ComplaintState, complaintStates } from '@/workflows/states';

/*
 * The complaint lifecycle, every state × event × role, then the checks that depend on what has been
 * recorded on the complaint. Sources: 21 CFR 211.198 (written complaint procedures; review by the
 * quality control unit, including whether the complaint is a serious and unexpected adverse drug
 * experience to be reported; investigation unless it is found unnecessary, with the reason and the
 * name of the person who decided it recorded; the reply to the complainant kept with the record),
 * 21 CFR 111.560–111.570 (a qualified person reviews each product complaint and decides whether to
 * investigate; quality control approves the decisions; the record names the reviewer and the
 * findings), EU GMP Part I Chapter 8 (complaints recorded, assessed, investigated where a quality
 * defect is possible, decisions and follow-up recorded) and 21 CFR 11.50 (signatures show the printed
 * name, date and meaning). Who does which step beyond those rules is common practice.
 */

type Signature = 'reportability_decided' | 'investigation_complete' | 'approved';
type Expectation = { to: ComplaintState; roles: Role[]; reason: boolean; signature: Signature | null } | null;

const qa: Role[] = ['qa_investigator', 'qa_approver'];
const none = Object.fromEntries(complaintEvents.map((e) => [e, null])) as Record<ComplaintEventType, Expectation>;

const expected: Record<ComplaintState, Record<ComplaintEventType, Expectation>> = {
  received: {
    ...none,
    // 21 CFR 211.198(a), 111.560(a)(1): the complaint is reviewed by QA (a qualified person).
    start_assessment: { to: 'assessment', roles: ['qa_investigator'], reason: false, signature: null },
  },
  assessment: {
    ...none,
    // 21 CFR 211.198(a): QA decides whether it must be reported; 21 CFR 11.50: signed with its meaning.
    complete_assessment: { to: 'investigation', roles: ['qa_investigator'], reason: false, signature: 'reportability_decided' },
    // 21 CFR 211.198(b)(2), 111.560(a)(2): no investigation only with the reason recorded and signed.
    skip_investigation: { to: 'response', roles: ['qa_investigator'], reason: true, signature: 'reportability_decided' },
  },
  investigation: {
    ...none,
    // 21 CFR 211.198(b)(2), 211.192: the investigation's findings are written and signed.
    complete_investigation: { to: 'response', roles: ['qa_investigator'], reason: false, signature: 'investigation_complete' },
  },
  response: {
    ...none,
    // 21 CFR 111.560(b), EU GMP 8.15: quality control approves the outcome; common practice: a QA approver closes.
    close: { to: 'closed', roles: ['qa_approver'], reason: false, signature: 'approved' },
  },
  closed: {
    ...none,
    // EU GMP 8.14 (reassessment as new information arrives); the reason is recorded (common practice).
    reopen_assessment: { to: 'assessment', roles: qa, reason: true, signature: null },
    reopen_investigation: { to: 'investigation', roles: qa, reason: true, signature: null },
  },
};

const ACTOR = 10;
const OWNER = 20;

/** A complaint on which every recorded-content condition holds, so the table tests the role alone. */
function fitting(): ComplaintContext {
  return { ownerId: OWNER, assessmentRecorded: true, qualityDefectPossible: false, investigationRecorded: true, responseSent: true };
}

function ctx(overrides: Partial<ComplaintContext> = {}): ComplaintContext {
  return { ...fitting(), ...overrides };
}

function send(state: ComplaintState, context: ComplaintContext, type: ComplaintEventType, role: Role) {
  return planEvent(complaintMachine, resolveSnapshot(complaintMachine, state, { ...context }), { type, actor: { id: ACTOR, role } });
}

const cases = complaintStates.flatMap((state) =>
  complaintEvents.flatMap((event) => roles.map((role) => ({ state, event, role, rule: expected[state][event] }))),
);

describe('complaint machine', () => {
  it('has exactly the states of the database enum, in the same order', () => {
    expect(Object.keys(complaintMachine.states)).toEqual([...complaintStates]);
    expect(complaints.status.enumValues).toEqual([...complaintStates]);
  });

  it('starts as received, tells QA, and knows exactly the complaint events', () => {
    // 21 CFR 211.198(a): every complaint reaches the quality control unit.
    expect(complaintMachine.config.initial).toBe('received');
    expect([...complaintMachine.events].sort()).toEqual([...complaintEvents].sort());
    const [snapshot, actions] = initialTransition(complaintMachine);
    expect(snapshot.value).toBe('received');
    expect(actions.map((a) => a.type)).toContain('notifyQaOfNewComplaint');
  });

  it.each(cases)('$state × $event × $role', ({ state, event, role, rule }) => {
    const snapshot = resolveSnapshot(complaintMachine, state, { ...fitting() });
    const sent = { type: event, actor: { id: ACTOR, role } };
    const allowed = rule !== null && rule.roles.includes(role);
    expect(snapshot.can(sent)).toBe(allowed);

    const plan = planEvent(complaintMachine, snapshot, sent);
    if (rule === null) {
      expect(plan).toEqual({ ok: false, problem: 'not_in_this_state' });
    } else if (!allowed) {
      expect(plan.ok).toBe(false);
      if (!plan.ok && plan.problem === 'refused') expect(complaintGuardRefusals).toHaveProperty(plan.guard!);
      else throw new Error('expected a guard refusal');
    } else {
      const [next] = transition(complaintMachine, snapshot, sent);
      expect(next.value).toBe(rule.to);
      expect(plan).toMatchObject({ ok: true, nextState: rule.to, rules: { reasonRequired: rule.reason, signature: rule.signature } });
    }
  });

  it('names only known signature meanings and explains every guard', () => {
    // 21 CFR 11.50(a)(3): every signature shows its meaning, from the closed list.
    const transitions = allTransitions(complaintMachine);
    const count = Object.values(expected).flatMap((byEvent) => Object.values(byEvent).filter((r) => r !== null)).length;
    expect(transitions).toHaveLength(count);
    for (const t of transitions) {
      expect(() => rulesFromMeta(t.meta)).not.toThrow();
      expect(complaintGuardRefusals).toHaveProperty(String(t.guard));
    }
    expect(Object.keys(complaintGuardRefusals).sort()).toEqual(Object.keys(complaintMachine.implementations.guards).sort());
  });

  it('has no final state: a closed complaint can be reopened (EU GMP 8.14)', () => {
    const snapshot = resolveSnapshot(complaintMachine, 'closed', ctx());
    expect(snapshot.status).toBe('active');
    expect(machineAllowedEvents(complaintMachine, snapshot, { id: ACTOR, role: 'operator' })).toEqual([]);
    expect(machineAllowedEvents(complaintMachine, snapshot, { id: ACTOR, role: 'qa_approver' }).map((e) => e.type)).toEqual([
      'reopen_assessment',
      'reopen_investigation',
    ]);
  });
});

describe('what must be on record before each step', () => {
  it('refuses to sign the assessment before it is recorded (21 CFR 211.198(a), 111.560(a))', () => {
    expect(send('assessment', ctx({ assessmentRecorded: false }), 'complete_assessment', 'qa_investigator')).toEqual({
      ok: false,
      problem: 'refused',
      guard: 'assessedByQaInvestigator',
    });
  });

  it('skips the investigation only when the category rules out a quality defect (21 CFR 211.198(b)(2), EU GMP 8.9)', () => {
    expect(send('assessment', ctx({ qualityDefectPossible: true }), 'skip_investigation', 'qa_investigator')).toEqual({
      ok: false,
      problem: 'refused',
      guard: 'noDefectPossibleAssessedByQaInvestigator',
    });
    expect(send('assessment', ctx({ qualityDefectPossible: false, assessmentRecorded: false }), 'skip_investigation', 'qa_investigator')).toMatchObject({
      ok: false,
    });
    expect(send('assessment', ctx({ qualityDefectPossible: false }), 'skip_investigation', 'qa_investigator')).toMatchObject({
      ok: true,
      nextState: 'response',
      rules: { reasonRequired: true, signature: 'reportability_decided' },
    });
  });

  it('refuses to sign the investigation before its findings are written (21 CFR 211.198(b)(2))', () => {
    expect(send('investigation', ctx({ investigationRecorded: false }), 'complete_investigation', 'qa_investigator')).toMatchObject({
      ok: false,
      problem: 'refused',
    });
  });

  it('closes only once the answer has gone out (21 CFR 211.198(b)(3): the reply is part of the record)', () => {
    expect(send('response', ctx({ responseSent: false }), 'close', 'qa_approver')).toEqual({
      ok: false,
      problem: 'refused',
      guard: 'answeredClosedByQaApprover',
    });
  });

  it('tells the owner when a complaint is reopened (common practice)', () => {
    expect(send('closed', ctx(), 'reopen_investigation', 'qa_investigator')).toMatchObject({
      ok: true,
      effects: [{ type: 'notifyOwnerReopened' }],
    });
  });
});
