import { setup } from 'xstate';
import { capas, deviations } from '@/db/schema';
import { type Effect, defineRecordKind } from '@/lib/records/kind';

/*
 * Small record kinds over real tables, for exercising the write path itself (numbering, 'own'
 * scope, effects) apart from any one product workflow.
 */

type Actor = { id: number; role: string };

const proposedOnly = setup({ types: { events: {} as { type: 'noop'; actor: Actor } } }).createMachine({
  id: 'test_capa',
  initial: 'proposed',
  states: { proposed: {} },
});

/** CAPAs that are only ever created: enough to prove numbering through createRecord. */
export const numberedCapaKind = defineRecordKind({
  recordType: 'capa',
  noun: 'CAPA',
  table: capas,
  machine: proposedOnly,
  readPermission: 'capa.read',
  eventPermissions: { noop: 'capa.plan' },
  eventLabels: { noop: 'Nothing' },
  stateLabels: { proposed: 'Proposed' },
  guardRefusals: {},
  context: () => ({}),
  signedContent: { approved: (row) => ({ plan: { title: row.title, problemStatement: row.problemStatement } }) },
  auditFields: ['title', 'ownerId'],
  toDto: (row) => ({ id: row.id, number: row.number, status: row.status, version: row.version }),
});

const draftMachine = setup({
  types: { events: {} as { type: 'submit'; actor: Actor } },
  actions: { announceSubmission: () => {} },
}).createMachine({
  id: 'test_deviation',
  initial: 'draft',
  states: {
    draft: { on: { submit: { target: 'reported', actions: 'announceSubmission' } } },
    reported: {},
  },
});

/** Deviation drafts whose only event needs the 'own'-scoped deviation.edit_draft permission. */
export function draftDeviationKind(announceSubmission: Effect<typeof deviations.$inferSelect> = {}) {
  return defineRecordKind({
    recordType: 'deviation',
    noun: 'deviation',
    table: deviations,
    machine: draftMachine,
    readPermission: 'deviation.read',
    eventPermissions: { submit: 'deviation.edit_draft' },
    eventLabels: { submit: 'Submit' },
    stateLabels: { draft: 'Draft', reported: 'Reported' },
    guardRefusals: {},
    owners: (t) => [t.raisedBy, t.ownerId],
    context: () => ({}),
    signedContent: { approved: (row) => ({ report: { title: row.title, whatHappened: row.whatHappened } }) },
    auditFields: ['title'],
    toDto: (row) => ({ id: row.id, status: row.status, version: row.version }),
    effects: { announceSubmission },
  });
}
