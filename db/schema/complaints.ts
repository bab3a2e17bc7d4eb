import { boolean, date, index, int, mysqlEnum, mysqlTable, text, uniqueIndex, varchar } from 'drizzle-orm/mysql-core';
import { complaintStates } from '../../workflows/states';
import { batches, products } from './master-data';
import { users } from './users';
import { createdAt, id, updatedAt, utc, version } from './columns';

/*
 * Customer complaints. Complainant personal data sits in its own columns so queries for lists and
 * exports can leave it out; only QA roles may read it (lib/auth/permissions.ts).
 */
export const complaints = mysqlTable(
  'complaints',
  {
    id: id(),
    number: varchar('number', { length: 20 }).notNull(),
    status: mysqlEnum('status', complaintStates).notNull().default('received'),
    version: version(),
    receivedOn: date('received_on', { mode: 'string' }).notNull(),
    channel: varchar('channel', { length: 32 }).notNull(),
    complainantName: varchar('complainant_name', { length: 160 }),
    complainantContact: varchar('complainant_contact', { length: 255 }),
    complainantKind: varchar('complainant_kind', { length: 32 }).notNull(),
    productId: int('product_id').references(() => products.id),
    batchId: int('batch_id').references(() => batches.id),
    /** The lot as the customer gave it; kept even when it matches no batch (then flagged). */
    lotAsReported: varchar('lot_as_reported', { length: 60 }),
    lotUnknown: boolean('lot_unknown').notNull().default(false),
    description: text('description').notNull(),
    unitsAffected: int('units_affected'),
    personHarmed: boolean('person_harmed').notNull().default(false),
    harmDescription: text('harm_description'),
    samplesReturning: boolean('samples_returning').notNull().default(false),
    category: varchar('category', { length: 48 }),
    adverseEvent: boolean('adverse_event'),
    seriousAdverseEvent: boolean('serious_adverse_event'),
    reportable: boolean('reportable'),
    reportKind: varchar('report_kind', { length: 48 }),
    reportDueOn: date('report_due_on', { mode: 'string' }),
    reportSubmittedAt: utc('report_submitted_at'),
    assessmentRationale: text('assessment_rationale'),
    investigationSummary: text('investigation_summary'),
    responseText: text('response_text'),
    responseSentAt: utc('response_sent_at'),
    ownerId: int('owner_id').references(() => users.id),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id),
    dueAt: utc('due_at'),
    closedAt: utc('closed_at'),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    uniqueIndex('complaints_number_uq').on(t.number),
    index('complaints_received_idx').on(t.receivedOn),
    index('complaints_status_idx').on(t.status, t.receivedOn),
    index('complaints_product_idx').on(t.productId, t.receivedOn),
    index('complaints_batch_idx').on(t.batchId),
    index('complaints_category_idx').on(t.category, t.receivedOn),
    index('complaints_report_due_idx').on(t.reportable, t.reportDueOn),
    index('complaints_owner_idx').on(t.ownerId, t.status),
  ],
);
