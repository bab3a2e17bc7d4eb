import { eq, max, sql } from 'drizzle-orm';
import type { MySqlTable } from 'drizzle-orm/mysql-core';
import { expect } from 'vitest';
import { db } from '@/db/client';
import { attachments, auditEntries, comments, mailOutbox, signatures, stateHistory } from '@/db/schema';
import { NotFoundError } from '@/lib/errors';
import { type AnyRecordKind, checkEvent, checkSection, isVisibleTo } from '@/lib/records/kind';
import { loadRelated } from '@/lib/records/write-path';
import type { TestUser } from '../support/fixtures';

/*
 * How the route matrix calls the product and what it expects back. Route handlers are called as
 * Next calls them (a Request and a params promise); server actions with FormData; both run as the
 * signed-in user the test names (lib/auth/session is replaced by the test file). What to expect is
 * asked of the record kind's own rules on the record as it stands (lib/records/kind.ts), so the
 * matrix fails wherever a route or action decides something the kind does not say.
 */

export class RedirectSignal extends Error {
  constructor(readonly url: string) {
    super(`redirect to ${url}`);
  }
}

export type Outcome = { ok: true; status: number } | { ok: false; status: number | null; message: string };

export async function callRoute(
  handler: (request: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>,
  params: Record<string, string>,
  init: { method: string; json?: unknown; form?: FormData; query?: string },
): Promise<Outcome> {
  const request = new Request(`http://localhost:3100/api/matrix${init.query ? `?${init.query}` : ''}`, {
    method: init.method,
    ...(init.json !== undefined ? { body: JSON.stringify(init.json), headers: { 'content-type': 'application/json' } } : {}),
    ...(init.form ? { body: init.form } : {}),
  });
  const response = await handler(request, { params: Promise.resolve(params) });
  // A 302 to a presigned download link is a success too.
  if (response.status < 400) return { ok: true, status: response.status };
  const body = (await response.json().catch(() => ({}))) as { message?: string };
  return { ok: false, status: response.status, message: body.message ?? '' };
}

export function formOf(values: Record<string, unknown>): FormData {
  const form = new FormData();
  for (const [k, v] of Object.entries(values)) {
    if (v === undefined || v === null) continue;
    if (Array.isArray(v)) for (const item of v) form.append(k, String(item));
    else form.append(k, v instanceof Date ? v.toISOString() : String(v));
  }
  return form;
}

/** A server action's answer, whatever shape its form state has: a redirect or data is success. */
export async function callAction(run: () => Promise<unknown>): Promise<Outcome> {
  let result: unknown;
  try {
    result = await run();
  } catch (err) {
    if (err instanceof RedirectSignal) return { ok: true, status: 303 };
    throw err;
  }
  const r = (result ?? {}) as { ok?: boolean; failed?: boolean; status?: string; message?: string | null };
  if (r.ok === false || r.failed === true || r.status === 'failed') return { ok: false, status: null, message: r.message ?? '' };
  return { ok: true, status: 200 };
}

export type Ability =
  | { read: true }
  | { event: string }
  | { section: string; params?: unknown }
  /** Allowed to everyone who may see the record (comments). */
  | { visible: true };

export type Expected = { ok: true } | { ok: false; status: 403 | 404 | 409; reason: string };

const notFoundMessage = (kind: AnyRecordKind) => new NotFoundError(`This ${kind.noun}`).message;

/** What the kind's rules say this person gets from this record now. */
export async function expectedFor(kind: AnyRecordKind, actor: TestUser, id: number, ability: Ability): Promise<Expected> {
  const [row] = await db
    .select()
    .from(kind.table as MySqlTable)
    .where(eq(kind.table.id, id));
  if (!row || !isVisibleTo(kind, actor, row as never)) return { ok: false, status: 404, reason: notFoundMessage(kind) };
  if ('read' in ability || 'visible' in ability) return { ok: true };
  const facts = await loadRelated(kind, db, row as never);
  const check =
    'event' in ability
      ? checkEvent(kind, actor, row as never, facts, ability.event)
      : checkSection(kind, actor, row as never, facts, ability.section, ability.params);
  return check.ok ? { ok: true } : { ok: false, status: check.status, reason: check.reason };
}

/** Everything a refusal must leave as it was. */
export async function writesSnapshot(kind: AnyRecordKind, id: number): Promise<Record<string, unknown>> {
  const [row] = await db
    .select({ version: kind.table.version })
    .from(kind.table as MySqlTable)
    .where(eq(kind.table.id, id));
  const [counts] = await db
    .select({
      audit: sql<number>`(select ${max(auditEntries.id)} from ${auditEntries})`,
      history: sql<number>`(select ${max(stateHistory.id)} from ${stateHistory})`,
      signatures: sql<number>`(select ${max(signatures.id)} from ${signatures})`,
      outbox: sql<number>`(select ${max(mailOutbox.id)} from ${mailOutbox})`,
      attachments: sql<number>`(select ${max(attachments.id)} from ${attachments})`,
      comments: sql<number>`(select ${max(comments.id)} from ${comments})`,
    })
    .from(sql`dual`);
  return { version: row?.version ?? null, ...counts };
}

export function expectOutcome(label: string, got: Outcome, want: Expected, viaAction: boolean): void {
  if (want.ok) {
    expect(got, label).toMatchObject({ ok: true });
    return;
  }
  expect(got.ok, `${label}: expected a refusal (${want.status}: ${want.reason})`).toBe(false);
  if (got.ok) return;
  // A route answers the status; an action shows the message. Either way, the kind's own words.
  if (!viaAction) expect(got.status, `${label}: ${got.message}`).toBe(want.status);
  expect(got.message, label).toBe(want.reason);
}
