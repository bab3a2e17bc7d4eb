import 'server-only';
import { asc, eq, inArray } from 'drizzle-orm';
import { settings } from '../../db/schema';
import { type FieldChange, writeAudit } from '../audit';
import { assertCan, type Permission } from '../auth/permissions';
import type { RecordActor } from './kind';
import { writeTransaction } from './transaction';

/*
 * The one writer of the key/value `settings` table. Settings are not records with an id and a
 * version; what makes their writes safe is the same as for records: the keys are locked in one
 * fixed order (by key) before anything is compared, so two administrators saving at once queue
 * instead of each overwriting half of the other's change, and a key that does not exist yet is
 * inserted under the same transaction (two first saves of one key meet on the index; the write
 * transaction runs the one the database stops again, which then finds the row). One audit entry
 * names every key that changed, old → new, with the reason (21 CFR 11.10(e)).
 */

export interface SettingsWrite {
  actor: RecordActor;
  permission: Permission;
  /** The audit entry's action, e.g. "due_days_changed". */
  action: string;
  reason: string | null;
  /** The value each key should have. Keys not named are left alone. */
  values: Record<string, string>;
}

export interface SettingsWritten {
  /** Each named key's stored value before the write, as read under the lock (null: not set). */
  before: Record<string, string | null>;
  /** What changed; empty when every key already had its value, and then nothing was written. */
  changes: FieldChange[];
}

/**
 * Settings are keyed by name, not number; the audit trail names the keys in the changes and uses
 * this record id, as the demo seed's entries do.
 */
export const settingsRecordId = 0;

export async function writeSettings(req: SettingsWrite): Promise<SettingsWritten> {
  assertCan(req.actor, req.permission);
  const keys = Object.keys(req.values).sort();
  if (keys.length === 0) return { before: {}, changes: [] };
  return writeTransaction(async (tx) => {
    const rows = await tx.select().from(settings).where(inArray(settings.key, keys)).orderBy(asc(settings.key)).for('update');
    const stored = new Map(rows.map((r) => [r.key, r.value]));
    const before = Object.fromEntries(keys.map((k) => [k, stored.get(k) ?? null]));
    const changes: FieldChange[] = [];
    for (const key of keys) {
      const next = req.values[key]!;
      const old = stored.get(key);
      if (old === next) continue;
      changes.push({ field: key, from: old ?? null, to: next });
      if (old === undefined) await tx.insert(settings).values({ key, value: next });
      else await tx.update(settings).set({ value: next }).where(eq(settings.key, key));
    }
    if (changes.length > 0) {
      await writeAudit(tx, {
        actor: { id: req.actor.id, name: req.actor.name },
        recordType: 'setting',
        recordId: settingsRecordId,
        action: req.action,
        changes,
        reason: req.reason?.trim() || null,
      });
    }
    return { before, changes };
  });
}
