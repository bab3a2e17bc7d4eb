import { describe, expect, it } from 'vitest';
import type { Role } from '@/lib/auth/roles';
import { capaKind } from '@/lib/capa/kind';
import { complaintKind } from '@/lib/complaints/kind';
import { deviationKind } from '@/lib/deviations/kind';
import { ringKind } from '@/lib/equipment/ring-kind';
import { type AnyRecordKind, abilitiesOf, checkEvent, checkSection } from '@/lib/records/kind';

/*
 * Segregation of duties, as each record kind declares it, for every signing or deciding event:
 * nobody approves, closes, signs effective or returns to service what they raised, own,
 * investigated, answered, carried out or took out of service. Sources: 21 CFR 211.22(a) (the
 * quality unit approves or rejects, as a second line to production), 21 CFR 211.192 (a thorough,
 * reviewed investigation), 21 CFR 211.198(a) (complaints reviewed by the quality unit), EU GMP
 * Chapter 1 §1.4 and Chapter 8, ICH Q10 3.2.2 (CAPA effectiveness evaluated); that the second
 * person is not any of these participants is common practice. Each refusal says why, and the page
 * gets the same words (abilitiesOf → blockedEvents).
 */

const ACTOR = 10;
const OTHER = 20;
const THIRD = 30;
const at = new Date('2026-11-02T09:00:00Z');
const actor = (role: Role) => ({ id: ACTOR, name: 'Person under test', role });

type Case = {
  kind: AnyRecordKind;
  event: string;
  role: Role;
  participant: string;
  /** A row and facts on which this participant is the actor and everything else is independent. */
  record: () => { row: Record<string, unknown>; facts: unknown };
  /** The same record with nobody tied to the actor. */
  independent: () => { row: Record<string, unknown>; facts: unknown };
};

// ── Deviations ──
const deviationRow = (status: string, over: Record<string, unknown> = {}) => ({
  id: 1,
  status,
  version: 3,
  raisedBy: OTHER,
  investigatorId: THIRD,
  classification: status === 'triage' ? 'minor' : 'major',
  ...over,
});
const deviationFacts = { held: [{ batchId: 5, onHold: true, recommendedDisposition: 'release', disposition: 'release', dispositionNote: null, samplingPlan: null }], evidence: [] };
const deviationCases: Case[] = (
  [
    ['approve', 'approval'],
    ['close_minor', 'triage'],
    ['return_for_rework', 'approval'],
    ['cancel', 'investigation'],
  ] as const
).flatMap(([event, status]) =>
  (
    [
      ['author', { raisedBy: ACTOR }],
      ['investigator', { investigatorId: ACTOR }],
    ] as const
  ).map(([participant, over]) => ({
    kind: deviationKind,
    event,
    role: 'qa_approver' as Role,
    participant,
    record: () => ({ row: deviationRow(status, over), facts: deviationFacts }),
    independent: () => ({ row: deviationRow(status), facts: deviationFacts }),
  })),
);

// ── CAPA ──
const action = (over: Record<string, unknown> = {}) => ({
  id: 7,
  capaId: 1,
  round: 1,
  kind: 'corrective',
  category: 'machine_setting',
  description: 'Re-set the vacuum',
  ownerId: OTHER,
  dueAt: at,
  completedAt: null as Date | null,
  completedBy: null as number | null,
  evidence: null,
  ...over,
});
const capaRow = (status: string, over: Record<string, unknown> = {}) => ({
  id: 1,
  status,
  version: 4,
  number: 'CAPA-2026-0100',
  ownerId: OTHER,
  createdBy: THIRD,
  planRound: 1,
  effectivenessCriteria: 'No broken bodies on Filler 2 over 20 batches',
  ...over,
});
const done = { completedAt: at, completedBy: OTHER };
const capaCases: Case[] = [
  ...(['owner', 'creator', 'actionOwner'] as const).map((participant) => ({
    kind: capaKind,
    event: 'approve_plan',
    role: 'qa_approver' as Role,
    participant,
    record: () => ({
      row: capaRow('proposed', participant === 'owner' ? { ownerId: ACTOR } : participant === 'creator' ? { createdBy: ACTOR } : {}),
      facts: { actions: [action(participant === 'actionOwner' ? { ownerId: ACTOR } : {})], evidence: [] },
    }),
    independent: () => ({ row: capaRow('proposed'), facts: { actions: [action()], evidence: [] } }),
  })),
  ...(['record_effective', 'record_not_effective'] as const).flatMap((event) =>
    (['owner', 'creator', 'actionOwner', 'actionCompleter'] as const).map((participant) => ({
      kind: capaKind,
      event,
      role: 'qa_approver' as Role,
      participant,
      record: () => ({
        row: capaRow('effectiveness_check', participant === 'owner' ? { ownerId: ACTOR } : participant === 'creator' ? { createdBy: ACTOR } : {}),
        facts: {
          actions: [
            action({
              ...done,
              ...(participant === 'actionOwner' ? { ownerId: ACTOR } : {}),
              ...(participant === 'actionCompleter' ? { completedBy: ACTOR } : {}),
            }),
          ],
          evidence: [],
        },
      }),
      independent: () => ({ row: capaRow('effectiveness_check'), facts: { actions: [action(done)], evidence: [] } }),
    })),
  ),
  {
    kind: capaKind,
    event: 'cancel',
    role: 'qa_investigator',
    participant: 'owner',
    record: () => ({ row: capaRow('effectiveness_check', { ownerId: ACTOR }), facts: { actions: [action(done)], evidence: [] } }),
    independent: () => ({ row: capaRow('effectiveness_check'), facts: { actions: [action(done)], evidence: [] } }),
  },
];

// ── Complaints ──
const complaintRow = (over: Record<string, unknown> = {}) => ({
  id: 1,
  status: 'response',
  version: 9,
  number: 'CMP-2026-0100',
  createdBy: OTHER,
  ownerId: THIRD,
  reportabilityDecidedBy: THIRD,
  responseSentBy: THIRD,
  responseSentAt: at,
  ...over,
});
const complaintFacts = (over: Partial<{ signers: { userId: number; meaning: string }[]; responseWriters: number[] }> = {}) => ({
  links: [],
  signers: [
    { userId: THIRD, meaning: 'reportability_decided' },
    { userId: THIRD, meaning: 'investigation_complete' },
  ],
  responseWriters: [THIRD],
  evidence: [],
  ...over,
});
const complaintCases: Case[] = (
  [
    ['intake', complaintRow({ createdBy: ACTOR }), complaintFacts()],
    ['owner', complaintRow({ ownerId: ACTOR }), complaintFacts()],
    ['decider', complaintRow({ reportabilityDecidedBy: ACTOR }), complaintFacts()],
    ['investigationSigner', complaintRow(), complaintFacts({ signers: [{ userId: ACTOR, meaning: 'investigation_complete' }] })],
    ['responder', complaintRow({ responseSentBy: ACTOR }), complaintFacts()],
    ['responder', complaintRow(), complaintFacts({ responseWriters: [THIRD, ACTOR] })],
  ] as const
).map(([participant, row, facts]) => ({
  kind: complaintKind,
  event: 'close',
  role: 'qa_approver' as Role,
  participant,
  record: () => ({ row, facts }),
  independent: () => ({ row: complaintRow(), facts: complaintFacts() }),
}));

// ── Filling rings ──
const ringRow = { id: 1, status: 'quarantined', version: 2, serial: 'BWR-0302', machineId: 1, capsuleSize: '0', condition: 'dented', statusReason: 'Dent' };
const ringCases: Case[] = (['return_to_service', 'retire'] as const).map((event) => ({
  kind: ringKind,
  event,
  role: 'qa_approver' as Role,
  participant: 'quarantiner',
  record: () => ({ row: ringRow, facts: { quarantinedBy: ACTOR } }),
  independent: () => ({ row: ringRow, facts: { quarantinedBy: OTHER } }),
}));

const cases = [...deviationCases, ...capaCases, ...complaintCases, ...ringCases].map((c) => ({ ...c, name: `${c.kind.recordType} ${c.event}` }));

describe('segregation of duties, per event', () => {
  it.each(cases)('$name: refuses the person who is the $participant, saying why, and lets an independent one', (c) => {
    const tied = c.record();
    const refused = checkEvent(c.kind, actor(c.role), tied.row as never, tied.facts as never, c.event);
    const did = (c.kind.participants as Record<string, { did: string }>)[c.participant]!.did;
    expect(refused).toMatchObject({ ok: false, status: 403, scope: 'record' });
    expect(refused.ok === false && refused.reason).toContain(`you ${did}`);
    expect(refused.ok === false && refused.reason).toMatch(/segregation of duties/);

    // The page is told the same thing: no button, and this reason beside the actions.
    const abilities = abilitiesOf(c.kind, actor(c.role), tied.row as never, tied.facts as never);
    expect(abilities.allowedEvents.map((e) => e.type)).not.toContain(c.event);
    expect(abilities.blockedEvents).toContainEqual({ type: c.event, reason: refused.ok === false ? refused.reason : '' });

    const free = c.independent();
    expect(checkEvent(c.kind, actor(c.role), free.row as never, free.facts as never, c.event)).toMatchObject({ ok: true });
  });

  it('names every way a person is tied to the record in one sentence', () => {
    const row = complaintRow({ createdBy: ACTOR, responseSentBy: ACTOR });
    const check = checkEvent(complaintKind, actor('qa_approver'), row as never, complaintFacts() as never, 'close');
    expect(check.ok === false && check.reason).toBe(
      '“Close the complaint” is for another person: you took this complaint down and wrote or sent its answer (segregation of duties).',
    );
  });

  it('lets the approver who raised a deviation still do what decides nothing else: comment on it', () => {
    const row = deviationRow('approval', { raisedBy: ACTOR });
    expect(checkSection(deviationKind, actor('qa_approver'), row as never, deviationFacts as never, 'comments')).toEqual({ ok: true });
  });
});

describe('segregation of duties, per section', () => {
  it.each([
    ['author', { raisedBy: ACTOR }],
    ['investigator', { investigatorId: ACTOR }],
  ])('keeps the %s of a deviation from deciding its batches’ disposition (21 CFR 211.22(a))', (_who, over) => {
    const check = checkSection(deviationKind, actor('qa_approver'), deviationRow('approval', over) as never, deviationFacts as never, 'disposition');
    expect(check).toMatchObject({ ok: false, status: 403 });
    expect(check.ok === false && check.reason).toMatch(/segregation of duties/);
    expect(checkSection(deviationKind, actor('qa_approver'), deviationRow('approval') as never, deviationFacts as never, 'disposition')).toEqual({ ok: true });
  });

  it('lets only the owner edit a CAPA plan, whatever other QA investigators may do', () => {
    const facts = { actions: [], evidence: [] };
    const mine = capaRow('proposed', { ownerId: ACTOR });
    expect(checkSection(capaKind, actor('qa_investigator'), mine as never, facts as never, 'plan')).toEqual({ ok: true });
    const theirs = capaRow('proposed');
    expect(checkSection(capaKind, actor('qa_investigator'), theirs as never, facts as never, 'plan')).toEqual({
      ok: false,
      status: 403,
      scope: 'record',
      reason: 'Only the owner of this CAPA edits its plan; a QA approver can reassign it.',
    });
    // Reassigning is its own permission: a QA approver, or the owner handing it on.
    expect(checkSection(capaKind, actor('qa_approver'), theirs as never, facts as never, 'owner')).toEqual({ ok: true });
    expect(checkSection(capaKind, actor('qa_investigator'), theirs as never, facts as never, 'owner')).toMatchObject({ ok: false, status: 403 });
    expect(checkSection(capaKind, actor('qa_investigator'), mine as never, facts as never, 'owner')).toEqual({ ok: true });
  });
});
