import { describe, expect, it } from 'vitest';
import { setup } from 'xstate';
import { fillingRings } from '@/db/schema';
import { ringEventLabels, ringStateLabels } from '@/lib/equipment/labels';
import { defineRecordKind } from '@/lib/records/kind';
import { machineAllowedEvents, planEvent, resolveSnapshot, rulesFromMeta } from '@/lib/records/workflow';
import { fillingRingMachine, ringGuardRefusals } from '@/workflows/filling-ring';

/*
 * The write path's questions to a machine, and the checks made when a record kind is defined, so
 * that a workflow cannot ship with an event nobody may send, a guard without an explanation, an
 * unknown signature meaning (21 CFR 11.50(a)(3)) or an effect nothing performs (common practice:
 * fail at start-up, not on the day the event is first sent).
 */

type Actor = { id: number; role: string };

const base = {
  recordType: 'filling_ring' as const,
  noun: 'filling ring',
  table: fillingRings,
  readPermission: 'equipment.read' as const,
  context: () => ({}),
  signedContent: { verified: () => ({}), approved: () => ({}) },
  auditFields: [] as const,
  toDto: (row: typeof fillingRings.$inferSelect) => row,
};

describe('defining a record kind', () => {
  it('accepts the filling ring kind as built', () => {
    expect(() =>
      defineRecordKind({
        ...base,
        machine: fillingRingMachine,
        eventPermissions: { quarantine: 'ring.quarantine', return_to_service: 'ring.return_to_service', retire: 'ring.retire' },
        eventLabels: ringEventLabels,
        stateLabels: ringStateLabels,
        guardRefusals: ringGuardRefusals,
        effects: { notifyQaOfQuarantine: {} },
      }),
    ).not.toThrow();
  });

  it('lists every gap between the kind and its machine', () => {
    const machine = setup({
      types: { events: {} as { type: 'retire'; actor: Actor } },
      guards: { byNobody: () => false },
      actions: { ringTheBell: () => {} },
    }).createMachine({
      id: 'gaps',
      initial: 'in_service',
      states: {
        in_service: { on: { retire: { target: 'retired', guard: 'byNobody', actions: 'ringTheBell', meta: { signature: 'okayed' } } } },
        retired: {},
      },
    });
    const attempt = () =>
      defineRecordKind({
        ...base,
        machine,
        eventPermissions: {} as { retire: 'ring.retire' },
        eventLabels: {} as { retire: string },
        stateLabels: { in_service: 'In service' },
        guardRefusals: {},
        independence: { retire: ['stranger'] } as never,
        sections: { notes: { label: 'Notes', permission: 'ring.retire', states: ['lost'] } } as never,
      });
    expect(attempt).toThrow(/event "retire" has no permission/);
    expect(attempt).toThrow(/event "retire" has no label/);
    expect(attempt).toThrow(/state "retired" has no label/);
    expect(attempt).toThrow(/unknown signature meaning: okayed/);
    expect(attempt).toThrow(/guard "byNobody" has no refusal message/);
    expect(attempt).toThrow(/action "ringTheBell" has no effect/);
    expect(attempt).toThrow(/independence of "retire" names unknown participant "stranger"/);
    expect(attempt).toThrow(/section "notes" names unknown state "lost"/);
  });

  it('refuses a signature meaning the kind says nothing about (21 CFR 11.70: a signature covers declared content)', () => {
    const attempt = () =>
      defineRecordKind({
        ...base,
        signedContent: { verified: () => ({}) },
        machine: fillingRingMachine,
        eventPermissions: { quarantine: 'ring.quarantine', return_to_service: 'ring.return_to_service', retire: 'ring.retire' },
        eventLabels: ringEventLabels,
        stateLabels: ringStateLabels,
        guardRefusals: ringGuardRefusals,
        effects: { notifyQaOfQuarantine: {} },
      });
    expect(attempt).toThrow(/quarantined --retire: no signed content for meaning "approved"/);
  });
});

describe('asking the machine', () => {
  it('refuses a stored status the machine does not know', () => {
    expect(() => resolveSnapshot(fillingRingMachine, 'lost')).toThrow(/not a state/);
  });

  it('reads reason and signature requirements from transition meta', () => {
    expect(rulesFromMeta(undefined)).toEqual({ reasonRequired: false, signature: null });
    expect(rulesFromMeta({ reason: 'required', signature: 'approved' })).toEqual({ reasonRequired: true, signature: 'approved' });
    expect(() => rulesFromMeta({ signature: 'okayed' })).toThrow(/unknown signature meaning/);
  });

  it('tells a guard refusal apart from an event the state does not take', () => {
    const quarantined = resolveSnapshot(fillingRingMachine, 'quarantined');
    expect(planEvent(fillingRingMachine, quarantined, { type: 'retire', actor: { id: 1, role: 'qa_investigator' } })).toEqual({
      ok: false,
      problem: 'refused',
      guard: 'byQaApprover',
    });
    expect(planEvent(fillingRingMachine, quarantined, { type: 'quarantine', actor: { id: 1, role: 'qa_approver' } })).toEqual({
      ok: false,
      problem: 'not_in_this_state',
    });
  });

  it('lists the events an actor may send, with their rules', () => {
    const quarantined = resolveSnapshot(fillingRingMachine, 'quarantined');
    expect(machineAllowedEvents(fillingRingMachine, quarantined, { id: 1, role: 'qa_approver' })).toEqual([
      { type: 'return_to_service', reasonRequired: true, signature: 'verified' },
      { type: 'retire', reasonRequired: true, signature: 'approved' },
    ]);
    expect(machineAllowedEvents(fillingRingMachine, quarantined, { id: 1, role: 'supervisor' })).toEqual([]);
  });
});
