import {
  boolean,
  index,
  int,
  mysqlEnum,
  mysqlTable,
  primaryKey,
  smallint,
  text,
  tinyint,
  uniqueIndex,
  varchar,
} from 'drizzle-orm/mysql-core';
import { deviationStates } from '../../workflows/states';
import { batches, capsuleDefects, classifications, fillingRings, machines, products } from './master-data';
import { users } from './users';
import { createdAt, id, updatedAt, utc, version } from './columns';

export const dispositions = ['release', 'reject', 'rework', 're_inspect'] as const;

/*
 * A deviation from the approved procedure on a capsule line. List columns (status, classification,
 * product, batch, machine, ring, defect, owner, raised, due) each lead an index so that paging,
 * sorting and filtering stay in SQL at a hundred thousand rows.
 */
export const deviations = mysqlTable(
  'deviations',
  {
    id: id(),
    /** DEV-YYYY-NNNN; null while a draft. */
    number: varchar('number', { length: 20 }),
    status: mysqlEnum('status', deviationStates).notNull().default('draft'),
    version: version(),
    title: varchar('title', { length: 200 }).notNull(),
    whatHappened: text('what_happened').notNull(),
    immediateActions: text('immediate_actions'),
    lineStopped: boolean('line_stopped').notNull().default(false),
    capsulesSegregated: boolean('capsules_segregated').notNull().default(false),
    affectedCount: int('affected_count'),
    sampleDescription: varchar('sample_description', { length: 255 }),
    defectId: int('defect_id').references(() => capsuleDefects.id),
    productId: int('product_id').references(() => products.id),
    batchId: int('batch_id').references(() => batches.id),
    machineId: int('machine_id').references(() => machines.id),
    ringId: int('ring_id').references(() => fillingRings.id),
    classification: mysqlEnum('classification', classifications),
    classificationReason: text('classification_reason'),
    severity: tinyint('severity'),
    occurrence: tinyint('occurrence'),
    detection: tinyint('detection'),
    rpn: smallint('rpn'),
    riskScaleVersion: int('risk_scale_version'),
    investigationReport: text('investigation_report'),
    /** JSON array of up to five why/answer strings. */
    fiveWhys: text('five_whys'),
    /** JSON: the probable causes marked on the six-branch cause-and-effect view, with notes. */
    causeAnalysis: text('cause_analysis'),
    rootCauseCategory: varchar('root_cause_category', { length: 32 }),
    rootCause: text('root_cause'),
    productImpact: text('product_impact'),
    capaRequired: boolean('capa_required'),
    closureJustification: text('closure_justification'),
    cancelReason: text('cancel_reason'),
    raisedBy: int('raised_by')
      .notNull()
      .references(() => users.id),
    ownerId: int('owner_id').references(() => users.id),
    investigatorId: int('investigator_id').references(() => users.id),
    occurredAt: utc('occurred_at').notNull(),
    reportedAt: utc('reported_at'),
    dueAt: utc('due_at'),
    closedAt: utc('closed_at'),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    uniqueIndex('deviations_number_uq').on(t.number),
    index('deviations_created_idx').on(t.createdAt),
    index('deviations_status_idx').on(t.status, t.createdAt),
    index('deviations_class_idx').on(t.classification, t.createdAt),
    index('deviations_product_idx').on(t.productId, t.createdAt),
    index('deviations_batch_idx').on(t.batchId, t.createdAt),
    index('deviations_machine_idx').on(t.machineId, t.createdAt),
    index('deviations_ring_idx').on(t.ringId, t.createdAt),
    index('deviations_defect_idx').on(t.defectId, t.createdAt),
    index('deviations_owner_idx').on(t.ownerId, t.status),
    index('deviations_raised_by_idx').on(t.raisedBy, t.status),
    index('deviations_due_idx').on(t.status, t.dueAt),
    index('deviations_rpn_idx').on(t.rpn),
  ],
);

/** Batches a deviation puts on hold, and the disposition each one takes at closure. */
export const deviationBatches = mysqlTable(
  'deviation_batches',
  {
    deviationId: int('deviation_id')
      .notNull()
      .references(() => deviations.id),
    batchId: int('batch_id')
      .notNull()
      .references(() => batches.id),
    onHold: boolean('on_hold').notNull().default(true),
    recommendedDisposition: mysqlEnum('recommended_disposition', dispositions),
    disposition: mysqlEnum('disposition', dispositions),
    dispositionNote: text('disposition_note'),
    samplingPlan: varchar('sampling_plan', { length: 120 }),
  },
  (t) => [primaryKey({ columns: [t.deviationId, t.batchId] }), index('deviation_batches_batch_idx').on(t.batchId)],
);
