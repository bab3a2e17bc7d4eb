import { describe, expect, it } from 'vitest';
import { transition } from 'xstate';
import { fillingRings } from '@/db/schema';
import { roles, type Role } from '@/lib/auth/roles';
import { isSignatureMeaning } from '@/lib/signatures/meanings';
import { planEvent, resolveSnapshot } from '@/lib/records/workflow';
import { fillingRingMachine, ringEvents, ringGuardRefusals, type RingEventType } from '@/workflows/filling-ring';
import { ringStates, type RingState } from '@/workflows/states';

/*
 * The filling ring lifecycle, every state × event × role. Who may do what follows the segregation
 * of duties in 21 CFR 211.22(a) (QA decides fitness for use); the signatures follow 21 CFR 11.50
 * (meaning shown) and 11.200(a). That a retired ring never returns, and that a reason is required
 * to take a ring out of service, is common practice for change parts.
 */

type Expectation = { to: RingState; roles: Role[]; signature?: 'verified' | 'approved' } | null;

const floorAndQa: Role[] = ['operator', 'supervisor', 'qa_investigator', 'qa_approver'];

const expected: Record<RingState, Record<RingEventType, Expectation>> = {
  in_service: {
    quarantine: { to: 'quarantined', roles: floorAndQa },
    return_to_service: null,
    retire: null,
  },
  quarantined: {
    quarantine: null,
    return_to_service: { to: 'in_service', roles: ['qa_investigator', 'qa_approver'], signature: 'verified' },
    retire: { to: 'retired', roles: ['qa_approver'], signature: 'approved' },
  },
  retired: { quarantine: null, return_to_service: null, retire: null },
};

const cases = ringStates.flatMap((state) =>
  ringEvents.flatMap((event) => roles.map((role) => ({ state, event, role, rule: expected[state][event] }))),
);

describe('filling ring machine', () => {
  it('has exactly the states of the database enum, in the same order', () => {
    expect(Object.keys(fillingRingMachine.states)).toEqual([...ringStates]);
    expect(fillingRings.status.enumValues).toEqual([...ringStates]);
  });

  it('starts in service and knows exactly the three ring events', () => {
    expect(fillingRingMachine.config.initial).toBe('in_service');
    expect([...fillingRingMachine.events].sort()).toEqual([...ringEvents].sort());
  });

  it.each(cases)('$state × $event × $role', ({ state, event, role, rule }) => {
    const snapshot = resolveSnapshot(fillingRingMachine, state);
    const sent = { type: event, actor: { id: 1, role } };
    const allowed = rule !== null && rule.roles.includes(role);
    expect(snapshot.can(sent)).toBe(allowed);

    const plan = planEvent(fillingRingMachine, snapshot, sent);
    if (rule === null) {
      expect(plan).toEqual({ ok: false, problem: 'not_in_this_state' });
    } else if (!allowed) {
      expect(plan.ok).toBe(false);
      if (!plan.ok && plan.problem === 'refused') expect(ringGuardRefusals).toHaveProperty(plan.guard!);
      else throw new Error('expected a guard refusal');
    } else {
      const [next] = transition(fillingRingMachine, snapshot, sent);
      expect(next.value).toBe(rule.to);
      expect(plan).toMatchObject({ ok: true, nextState: rule.to, rules: { reasonRequired: true, signature: rule.signature ?? null } });
    }
  });

  it('asks QA to be told of every quarantine', () => {
    const plan = planEvent(fillingRingMachine, resolveSnapshot(fillingRingMachine, 'in_service'), {
      type: 'quarantine',
      actor: { id: 1, role: 'operator' },
    });
    expect(plan.ok && plan.effects.map((e) => e.type)).toEqual(['notifyQaOfQuarantine']);
  });

  it('treats retirement as final', () => {
    const retired = resolveSnapshot(fillingRingMachine, 'retired');
    expect(retired.status).toBe('done');
    for (const event of ringEvents) {
      for (const role of roles) expect(retired.can({ type: event, actor: { id: 1, role } })).toBe(false);
    }
  });

  it('names only known signature meanings and explains every guard', () => {
    for (const node of Object.values(fillingRingMachine.states)) {
      for (const list of node.transitions.values()) {
        for (const t of list) {
          const meta = (t.meta ?? {}) as { signature?: string };
          if (meta.signature !== undefined) expect(isSignatureMeaning(meta.signature)).toBe(true);
          expect(ringGuardRefusals).toHaveProperty(String(t.guard));
        }
      }
    }
  });
});
