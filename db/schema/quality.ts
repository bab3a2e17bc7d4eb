import {
  boolean,
  date,
  decimal,
  index,
  int,
  mysqlEnum,
  mysqlTable,
  primaryKey,
  text,
  tinyint,
  uniqueIndex,
  varchar,
} from 'drizzle-orm/mysql-core';
import { batches, fillingRings, machines, products } from './master-data';
import { users } from './users';
import { createdAt, id, utc, version } from './columns';

/* Data behind the quality computations: risk scales, weight checks and the site calendar. */

export const riskDimensions = ['severity', 'occurrence', 'detection'] as const;

/**
 * A published set of the three 1-10 scales. Versions are never edited once published: an
 * administrator publishes a new version, and each scored record keeps the version it was scored with.
 */
export const riskScaleVersions = mysqlTable(
  'risk_scale_versions',
  {
    id: id(),
    /** The scale's own version number as people say it ("version 3"); `version` is the row's, always 1. */
    scaleVersion: int('scale_version').notNull(),
    note: varchar('note', { length: 500 }).notNull(),
    publishedBy: int('published_by')
      .notNull()
      .references(() => users.id),
    publishedAt: utc('published_at').notNull(),
    version: version(),
  },
  // Two administrators publishing from the same version both ask for the next number: one is refused here.
  (t) => [uniqueIndex('risk_scale_versions_scale_version_uq').on(t.scaleVersion)],
);

export const riskScaleLevels = mysqlTable(
  'risk_scale_levels',
  {
    scaleVersionId: int('scale_version_id')
      .notNull()
      .references(() => riskScaleVersions.id),
    dimension: mysqlEnum('dimension', riskDimensions).notNull(),
    score: tinyint('score').notNull(),
    label: varchar('label', { length: 80 }).notNull(),
    description: text('description').notNull(),
  },
  (t) => [primaryKey({ columns: [t.scaleVersionId, t.dimension, t.score] })],
);

export const weightCheckMethods = ['ph_eur_2_9_5', 'usp_905', 'usp_2091'] as const;
export const weightCheckVerdicts = ['pass', 'fail'] as const;

/** An in-process uniformity-of-mass check on a sample of capsules from a batch. */
export const weightChecks = mysqlTable(
  'weight_checks',
  {
    id: id(),
    batchId: int('batch_id')
      .notNull()
      .references(() => batches.id),
    productId: int('product_id')
      .notNull()
      .references(() => products.id),
    machineId: int('machine_id').references(() => machines.id),
    ringId: int('ring_id').references(() => fillingRings.id),
    /** Pharmacopoeial test applied (the product's own limits are always applied on top). */
    method: mysqlEnum('method', weightCheckMethods).notNull(),
    massMode: mysqlEnum('mass_mode', ['gross', 'net']).notNull(),
    /** Mean empty-shell mass subtracted from gross masses, when masses were weighed gross. */
    shellMassMg: decimal('shell_mass_mg', { precision: 8, scale: 2 }),
    /** JSON array of the individual masses as entered, in mg. */
    massesMg: text('masses_mg').notNull(),
    sampleSize: int('sample_size').notNull(),
    meanMg: decimal('mean_mg', { precision: 10, scale: 3 }).notNull(),
    sdMg: decimal('sd_mg', { precision: 10, scale: 3 }).notNull(),
    minMg: decimal('min_mg', { precision: 10, scale: 3 }).notNull(),
    maxMg: decimal('max_mg', { precision: 10, scale: 3 }).notNull(),
    outOfLimitCount: int('out_of_limit_count').notNull(),
    verdict: mysqlEnum('verdict', weightCheckVerdicts).notNull(),
    /** JSON of the full evaluation (rule by rule), as shown to the operator when recorded. */
    evaluation: text('evaluation').notNull(),
    note: varchar('note', { length: 1000 }),
    deviationId: int('deviation_id'),
    recordedBy: int('recorded_by')
      .notNull()
      .references(() => users.id),
    checkedAt: utc('checked_at').notNull(),
    version: version(),
    createdAt: createdAt(),
  },
  (t) => [
    index('weight_checks_batch_idx').on(t.batchId, t.checkedAt),
    index('weight_checks_machine_idx').on(t.machineId, t.checkedAt),
    index('weight_checks_checked_idx').on(t.checkedAt),
    index('weight_checks_verdict_idx').on(t.verdict, t.checkedAt),
  ],
);

/**
 * Days the site is closed besides weekends and US federal holidays; business-day clocks skip them.
 * One row per day, deactivated and reactivated but never deleted. The id is what the audit trail
 * names (entries from before it existed name the day as a number: lib/clocks/closure-id.ts).
 */
export const siteClosures = mysqlTable(
  'site_closures',
  {
    id: id(),
    day: date('day', { mode: 'string' }).notNull(),
    description: varchar('description', { length: 200 }).notNull(),
    active: boolean('active').notNull().default(true),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id),
    version: version(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('site_closures_day_uq').on(t.day)],
);
