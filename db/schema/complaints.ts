import { boolean, date, index, int, mysqlEnum, mysqlTable, text, uniqueIndex, varchar } from 'drizzle-orm/mysql-core';
import { complaintStates } from '../../workflows/states';
import { batches, capsuleDefects, products } from './master-data';
import { users } from './users';
import { createdAt, id, updatedAt, utc, version } from './columns';

export const responseChannels = ['email', 'post'] as const;

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
    /** A capsule defect code (capsule_defects.code) or a non-defect category (lib/complaints/labels.ts). */
    category: varchar('category', { length: 48 }),
    /** Set when the category is a capsule defect, so trends and CAPA criteria join on the catalogue. */
    defectId: int('defect_id').references(() => capsuleDefects.id),
    adverseEvent: boolean('adverse_event'),
    seriousAdverseEvent: boolean('serious_adverse_event'),
    reportable: boolean('reportable'),
    reportKind: varchar('report_kind', { length: 48 }),
    reportDueOn: date('report_due_on', { mode: 'string' }),
    reportSubmittedAt: utc('report_submitted_at'),
    assessmentRationale: text('assessment_rationale'),
    /** Who signed the reportability decision, and when (21 CFR 11.50). */
    reportabilityDecidedAt: utc('reportability_decided_at'),
    reportabilityDecidedBy: int('reportability_decided_by').references(() => users.id),
    /** Why no investigation was needed, when the assessment ruled out a quality defect (21 CFR 211.198(b)(2)). */
    investigationSkipReason: text('investigation_skip_reason'),
    retainedSamplesChecked: boolean('retained_samples_checked'),
    retainedSamplesNote: text('retained_samples_note'),
    investigationSummary: text('investigation_summary'),
    /** The letter being written (cleaned HTML). Personal data: it is addressed to the complainant. */
    responseText: text('response_text'),
    responseChannel: mysqlEnum('response_channel', responseChannels),
    /** The letter exactly as it went out; kept with the record. Personal data. */
    responseSentText: text('response_sent_text'),
    responseSentAt: utc('response_sent_at'),
    responseSentBy: int('response_sent_by').references(() => users.id),
    /** The reason given the last time the complaint was reopened. */
    reopenReason: text('reopen_reason'),
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
    index('complaints_created_by_idx').on(t.createdBy, t.receivedOn),
  ],
);
