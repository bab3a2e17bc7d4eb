import { eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { db } from '@/db/client';
import { deviations } from '@/db/schema';
import { findCapaSourceByNumber } from '@/lib/capa/queries';
import { ForbiddenError } from '@/lib/errors';
import { makeUser } from '../support/fixtures';

/*
 * Opening a CAPA from a record named by its number (ICH Q10 3.2.2: the CAPA is traceable to the
 * deviation or complaint it follows from). The demo's DEV-2026-0001 is seeded (scripts/seed/deviations.ts).
 */

describe('findCapaSourceByNumber', () => {
  it('finds a reported deviation by its number and nothing for an unknown one', async () => {
    const qa = await makeUser('qa_investigator');
    const [seeded] = await db.select({ id: deviations.id }).from(deviations).where(eq(deviations.number, 'DEV-2026-0001'));
    expect(await findCapaSourceByNumber('deviation', 'DEV-2026-0001', qa)).toBe(seeded!.id);
    expect(await findCapaSourceByNumber('deviation', 'DEV-2099-0001', qa)).toBeNull();
    expect(await findCapaSourceByNumber('complaint', 'CMP-2099-0001', qa)).toBeNull();
  });

  it('answers only those who may open a CAPA (21 CFR 11.10(d): access limited to authorised individuals)', async () => {
    const operator = await makeUser('operator');
    await expect(findCapaSourceByNumber('deviation', 'DEV-2026-0001', operator)).rejects.toThrow(ForbiddenError);
    await expect(findCapaSourceByNumber('complaint', 'CMP-2026-0001', operator)).rejects.toThrow(ForbiddenError);
  });
});
