/*
 * The closed lists a CAPA is written in besides its states: where it comes from, and the kinds and
 * categories of its actions. Pure, with no imports, like workflows/states.ts: the database enums are
 * built from these tuples (db/schema/capa.ts) and forms and filters in the browser read them too.
 */

export const capaSources = ['deviation', 'complaint', 'trend'] as const;
export const capaActionKinds = ['corrective', 'preventive'] as const;
/** What an action changes: a machine setting, a procedure, training, a ring retirement, a supplier change. */
export const capaActionCategories = ['machine_setting', 'procedure', 'training', 'ring_retirement', 'supplier_change', 'other'] as const;
