import { index, int, mysqlEnum, mysqlTable, text, uniqueIndex, varchar } from 'drizzle-orm/mysql-core';
import { capaStates } from '../../workflows/states';
import { users } from './users';
import { createdAt, id, updatedAt, utc, version } from './columns';

export const capaSources = ['deviation', 'complaint', 'trend'] as const;
export const capaActionKinds = ['corrective', 'preventive'] as const;

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
    /** machine_setting, procedure, training, ring_retirement, supplier_change, other. */
    category: varchar('category', { length: 32 }).notNull(),
    description: text('description').notNull(),
    ownerId: int('owner_id')
      .notNull()
      .references(() => users.id),
    dueAt: utc('due_at').notNull(),
    completedAt: utc('completed_at'),
    evidence: text('evidence'),
    version: version(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index('capa_actions_capa_idx').on(t.capaId), index('capa_actions_owner_idx').on(t.ownerId, t.completedAt)],
);
