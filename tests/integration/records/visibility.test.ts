import { and, inArray } from 'drizzle-orm';
import type { MySqlTable } from 'drizzle-orm/mysql-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { capaKind } from '@/lib/capa/kind';
import { complaintKind } from '@/lib/complaints/kind';
import { deviationKind } from '@/lib/deviations/kind';
import { ringKind } from '@/lib/equipment/ring-kind';
import { NotFoundError } from '@/lib/errors';
import { type AnyRecordKind, isVisibleTo, visibleWhere } from '@/lib/records/kind';
import { getVisibleRow } from '@/lib/records/write-path';
import { capaStates, complaintStates, deviationStates, ringStates } from '@/workflows/states';
import { type Cast, capaIn, complaintIn, deviationIn, makeCast, ringIn } from '../support/stories';

/*
 * Who may see a record is one rule per kind, written twice only because SQL and TypeScript are two
 * languages: `visibleTo` (a record page, every route) and `visibleWhere` (every list). This test
 * keeps them equal over every state of every kind, for every role, as the record's own people and as
 * others. Why it matters: a record one route hides and another shows tells anyone that it exists
 * (21 CFR 11.10(d): access limited to authorised individuals; EU GMP Annex 11 §12.1; a draft is its
 * author's until submitted, common practice).
 */

afterAll(closeDb);

let cast: Cast;
const built: Record<string, { kind: AnyRecordKind; ids: number[] }> = {};

beforeAll(async () => {
  cast = await makeCast();
  const ids = async <S extends string>(states: readonly S[], make: (s: S) => Promise<{ id: number }>) =>
    Promise.all(states.map((s) => make(s).then((r) => r.id)));
  built.deviation = {
    kind: deviationKind,
    // Two authors, so "own" and "someone else's" both occur for operators.
    ids: [
      ...(await ids(deviationStates, (s) => deviationIn(cast, s))),
      ...(await ids(['draft', 'discarded', 'reported'] as const, (s) => deviationIn(cast, s, cast.operator2))),
    ],
  };
  built.capa = { kind: capaKind, ids: await ids(capaStates, (s) => capaIn(cast, s)) };
  built.complaint = {
    kind: complaintKind,
    ids: [...(await ids(complaintStates, (s) => complaintIn(cast, s))), ...(await ids(['received'] as const, (s) => complaintIn(cast, s, cast.operator2)))],
  };
  built.filling_ring = { kind: ringKind, ids: await ids(ringStates, (s) => ringIn(cast, s)) };
}, 240_000);

const viewers = () => Object.entries(cast).map(([name, user]) => ({ name, user }));

describe('who sees a record: the page rule and the list rule agree', () => {
  it.each(['deviation', 'capa', 'complaint', 'filling_ring'])('for %s, for every role, own and not own, in every state', async (type) => {
    const { kind, ids } = built[type]!;
    const table = kind.table as MySqlTable & { id: never };
    const rows = await db.select().from(table).where(inArray(kind.table.id, ids));
    expect(rows).toHaveLength(ids.length);
    for (const { name, user } of viewers()) {
      const byRule = rows.filter((r) => isVisibleTo(kind, user, r as never)).map((r) => (r as { id: number }).id).sort((a, b) => a - b);
      const listed = (await db.select({ id: kind.table.id }).from(table).where(and(inArray(kind.table.id, ids), visibleWhere(kind, user))))
        .map((r) => r.id as number)
        .sort((a, b) => a - b);
      expect(listed, `${type} as ${name}`).toEqual(byRule);
    }
  });

  it('hides a draft and a discarded draft from everyone but their author, QA included', async () => {
    const rows = await db.select().from(deviationKind.table).where(inArray(deviationKind.table.id, built.deviation!.ids));
    const privateRows = rows.filter((r) => r.status === 'draft' || r.status === 'discarded');
    expect(privateRows.length).toBeGreaterThanOrEqual(4);
    for (const row of privateRows) {
      for (const { user } of viewers()) {
        const visible = isVisibleTo(deviationKind, user, row);
        expect(visible).toBe(user.id === row.raisedBy);
        if (!visible) await expect(getVisibleRow(db, deviationKind, row.id, user)).rejects.toBeInstanceOf(NotFoundError);
      }
    }
    // Once reported, every role that reads deviations sees it.
    for (const row of rows.filter((r) => r.status === 'reported')) {
      for (const { user } of viewers()) expect(isVisibleTo(deviationKind, user, row)).toBe(true);
    }
  });

  it('shows an operator only the complaints they took down', async () => {
    const rows = await db.select().from(complaintKind.table).where(inArray(complaintKind.table.id, built.complaint!.ids));
    for (const row of rows) {
      expect(isVisibleTo(complaintKind, cast.operator, row)).toBe(row.createdBy === cast.operator.id);
      expect(isVisibleTo(complaintKind, cast.operator2, row)).toBe(row.createdBy === cast.operator2.id);
      expect(isVisibleTo(complaintKind, cast.supervisor, row)).toBe(true);
    }
  });
});
