import {
  boolean,
  date,
  decimal,
  index,
  int,
  mysqlEnum,
  mysqlTable,
  text,
  tinyint,
  uniqueIndex,
  varchar,
} from 'drizzle-orm/mysql-core';
import { ringStates } from '../../workflows/states';
import { createdAt, id, updatedAt, utc, version } from './columns';

/* Master data: products, batches, machines, filling rings and the capsule defect catalogue. */

export const capsuleSizes = ['000', '00', '0', '1', '2', '3', '4', '5'] as const;
export const shellMaterials = ['gelatin', 'hpmc'] as const;
export const batchStatuses = ['in_process', 'on_hold', 'released', 'rejected'] as const;
export const classifications = ['critical', 'major', 'minor'] as const;
export const ringConditions = ['good', 'worn', 'dented', 'damaged'] as const;

export const products = mysqlTable(
  'products',
  {
    id: id(),
    code: varchar('code', { length: 32 }).notNull(),
    name: varchar('name', { length: 160 }).notNull(),
    strength: varchar('strength', { length: 80 }).notNull(),
    capsuleSize: mysqlEnum('capsule_size', capsuleSizes).notNull(),
    shellMaterial: mysqlEnum('shell_material', shellMaterials).notNull(),
    /** Dietary supplement (21 CFR 111) or drug (21 CFR 211): decides reporting clocks. */
    regulatoryClass: mysqlEnum('regulatory_class', ['supplement', 'drug']).notNull(),
    targetFillMg: decimal('target_fill_mg', { precision: 8, scale: 2 }).notNull(),
    fillLowerMg: decimal('fill_lower_mg', { precision: 8, scale: 2 }).notNull(),
    fillUpperMg: decimal('fill_upper_mg', { precision: 8, scale: 2 }).notNull(),
    /** Tapped bulk density of the fill powder (g/mL), for the fill-weight sanity check. */
    tappedDensityGPerMl: decimal('tapped_density_g_per_ml', { precision: 5, scale: 3 }),
    active: boolean('active').notNull().default(true),
    version: version(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('products_code_uq').on(t.code)],
);

export const machines = mysqlTable(
  'machines',
  {
    id: id(),
    assetTag: varchar('asset_tag', { length: 32 }).notNull(),
    name: varchar('name', { length: 120 }).notNull(),
    room: varchar('room', { length: 60 }).notNull(),
    model: varchar('model', { length: 120 }).notNull(),
    /** Capsule sizes this filler has change parts for, comma-separated in catalogue order. */
    capsuleSizes: varchar('capsule_sizes', { length: 60 }).notNull(),
    active: boolean('active').notNull().default(true),
    version: version(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('machines_asset_tag_uq').on(t.assetTag)],
);

export const fillingRings = mysqlTable(
  'filling_rings',
  {
    id: id(),
    serial: varchar('serial', { length: 40 }).notNull(),
    machineId: int('machine_id')
      .notNull()
      .references(() => machines.id),
    capsuleSize: mysqlEnum('capsule_size', capsuleSizes).notNull(),
    condition: mysqlEnum('condition', ringConditions).notNull().default('good'),
    status: mysqlEnum('status', ringStates).notNull().default('in_service'),
    /** Why the ring is out of service; required by the ring lifecycle on quarantine and retirement. */
    statusReason: varchar('status_reason', { length: 500 }),
    retiredAt: utc('retired_at'),
    version: version(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    uniqueIndex('filling_rings_serial_uq').on(t.serial),
    index('filling_rings_machine_idx').on(t.machineId, t.status),
  ],
);

export const batches = mysqlTable(
  'batches',
  {
    id: id(),
    lotNumber: varchar('lot_number', { length: 40 }).notNull(),
    productId: int('product_id')
      .notNull()
      .references(() => products.id),
    machineId: int('machine_id').references(() => machines.id),
    ringId: int('ring_id').references(() => fillingRings.id),
    sizeCapsules: int('size_capsules').notNull(),
    unitsShipped: int('units_shipped').notNull().default(0),
    status: mysqlEnum('status', batchStatuses).notNull().default('in_process'),
    manufacturedOn: date('manufactured_on', { mode: 'string' }).notNull(),
    expiresOn: date('expires_on', { mode: 'string' }),
    version: version(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    uniqueIndex('batches_lot_uq').on(t.lotNumber),
    index('batches_manufactured_idx').on(t.manufacturedOn, t.id),
    index('batches_product_idx').on(t.productId, t.manufacturedOn),
    index('batches_machine_idx').on(t.machineId, t.manufacturedOn),
    index('batches_ring_idx').on(t.ringId, t.manufacturedOn),
    index('batches_status_idx').on(t.status, t.manufacturedOn),
  ],
);

export const capsuleDefects = mysqlTable(
  'capsule_defects',
  {
    id: id(),
    code: varchar('code', { length: 32 }).notNull(),
    name: varchar('name', { length: 120 }).notNull(),
    description: text('description').notNull(),
    defaultClassification: mysqlEnum('default_classification', classifications).notNull(),
    /** Default severity on the 1-10 scale. */
    defaultSeverity: tinyint('default_severity').notNull(),
    /** Shown whenever the defect is picked; critical defects carry the quarantine caution. */
    caution: text('caution'),
    active: boolean('active').notNull().default(true),
    version: version(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('capsule_defects_code_uq').on(t.code)],
);
