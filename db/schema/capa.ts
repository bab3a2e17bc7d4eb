import { index, int, mysqlEnum, mysqlTable, text, uniqueIndex, varchar } from 'drizzle-orm/mysql-core';
import { capaActionCategories, capaActionKinds, capaSources } from '../../workflows/capa-terms';
import { capaStates } from '../../workflows/states';
import { users } from './users';
import { createdAt, id, updatedAt, utc, version } from './columns';

export { capaActionCategories, capaActionKinds, capaSources };

export const capas = mysqlTable(
  'capas',
  {
    id: id(),
    number: varchar('number', { length: 20 }).notNull(),
    status: mysqlEnum('status', capaStates).notNull().default('proposed'),
    version: version(),
    title: varchar('title', { length: 200 }).notNull(),
    sourceType: mysqlEnum('source_type', capaSources).notNull(),
    sourceId: int('source_id'),
    problemStatement: text('problem_statement').notNull(),
    rootCause: text('root_cause'),
    effectivenessCriteria: text('effectiveness_criteria'),
    /** Machine-readable recurrence criterion, e.g. {"defectId":3,"machineId":2,"batches":20}. */
    recurrenceCriterion: text('recurrence_criterion'),
    effectivenessResult: mysqlEnum('effectiveness_result', ['effective', 'not_effective']),
    effectivenessNote: text('effectiveness_note'),
    cancelReason: text('cancel_reason'),
    ownerId: int('owner_id')
      .notNull()
      .references(() => users.id),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id),
    dueAt: utc('due_at'),
    effectivenessDueAt: utc('effectiveness_due_at'),
    closedAt: utc('closed_at'),
    /**
     * The plan being worked: 1 at first, one more each time an effectiveness check finds the actions
     * did not work. Actions of earlier rounds stay on record; the guards look at this round only.
     */
    planRound: int('plan_round').notNull().default(1),
    /** Actions of the current round, and how many of them are not completed (kept in step by lib/capa/commands.ts). */
    actionsPlanned: int('actions_planned').notNull().default(0),
    actionsOpen: int('actions_open').notNull().default(0),
    /** When the last action of the current round was completed: the recurrence count starts here. */
    actionsCompletedAt: utc('actions_completed_at'),
    planApprovedAt: utc('plan_approved_at'),
    effectivenessOpenedAt: utc('effectiveness_opened_at'),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    uniqueIndex('capas_number_uq').on(t.number),
    index('capas_created_idx').on(t.createdAt),
    index('capas_status_idx').on(t.status, t.createdAt),
    index('capas_owner_idx').on(t.ownerId, t.status),
    index('capas_source_idx').on(t.sourceType, t.sourceId),
    index('capas_due_idx').on(t.status, t.dueAt),
  ],
);

export const capaActions = mysqlTable(
  'capa_actions',
  {
    id: id(),
    capaId: int('capa_id')
      .notNull()
      .references(() => capas.id),
    kind: mysqlEnum('kind', capaActionKinds).notNull(),
    /** One of capaActionCategories. */
    category: varchar('category', { length: 32 }).notNull(),
    /** The CAPA's plan round this action belongs to. */
    round: int('round').notNull().default(1),
    description: text('description').notNull(),
    ownerId: int('owner_id')
      .notNull()
      .references(() => users.id),
    dueAt: utc('due_at').notNull(),
    completedAt: utc('completed_at'),
    completedBy: int('completed_by').references(() => users.id),
    /** Evidence of completion: rich text, cleaned on the server (lib/rich-text). */
    evidence: text('evidence'),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id),
    version: version(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    index('capa_actions_capa_idx').on(t.capaId),
    index('capa_actions_owner_idx').on(t.ownerId, t.completedAt),
    // The reminder sweep reads open actions in due order (lib/reminders/run.ts).
    index('capa_actions_open_due_idx').on(t.completedAt, t.dueAt),
  ],
);
