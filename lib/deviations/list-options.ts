import 'server-only';
import { asc, ne } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { capsuleDefects, fillingRings, machines, products, users } from '../../db/schema';
import { type Actor, assertCan } from '../auth/permissions';

/*
 * The choices offered by the deviation list's filters. Every lookup is a short master-data table, so
 * each is read whole; inactive entries stay listed because old deviations still point at them.
 */

export interface ListOptionDto {
  id: number;
  label: string;
}

export interface DeviationListOptionsDto {
  products: ListOptionDto[];
  machines: ListOptionDto[];
  rings: ListOptionDto[];
  defects: ListOptionDto[];
  owners: ListOptionDto[];
}

export async function listDeviationListOptions(viewer: Actor, database: DbOrTx = db): Promise<DeviationListOptionsDto> {
  assertCan(viewer, 'deviation.read');
  const [productRows, machineRows, ringRows, defectRows, ownerRows] = await Promise.all([
    database
      .select({ id: products.id, name: products.name, strength: products.strength, code: products.code })
      .from(products)
      .orderBy(asc(products.name), asc(products.strength)),
    database
      .select({ id: machines.id, assetTag: machines.assetTag, name: machines.name })
      .from(machines)
      .orderBy(asc(machines.assetTag)),
    database
      .select({ id: fillingRings.id, serial: fillingRings.serial, size: fillingRings.capsuleSize })
      .from(fillingRings)
      .orderBy(asc(fillingRings.serial)),
    database.select({ id: capsuleDefects.id, name: capsuleDefects.name }).from(capsuleDefects).orderBy(asc(capsuleDefects.name)),
    // Administrators neither raise nor investigate, so they never own a deviation.
    database.select({ id: users.id, name: users.name }).from(users).where(ne(users.role, 'admin')).orderBy(asc(users.name)),
  ]);
  return {
    products: productRows.map((p) => ({ id: p.id, label: `${p.name} ${p.strength} (${p.code})` })),
    machines: machineRows.map((m) => ({ id: m.id, label: `${m.assetTag} — ${m.name}` })),
    rings: ringRows.map((r) => ({ id: r.id, label: `${r.serial} (size ${r.size})` })),
    defects: defectRows.map((d) => ({ id: d.id, label: d.name })),
    owners: ownerRows.map((u) => ({ id: u.id, label: u.name })),
  };
}
