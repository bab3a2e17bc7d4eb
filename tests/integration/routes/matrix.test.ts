import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { and, desc, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { closeDb, db } from '@/db/client';
import { attachments, capaActions, mailOutbox } from '@/db/schema';
import { newAttachmentKey, putAttachmentObject } from '@/lib/storage';
import type { CurrentUser } from '@/lib/auth/session';
import { capaKind } from '@/lib/capa/kind';
import { complaintKind } from '@/lib/complaints/kind';
import { deviationKind } from '@/lib/deviations/kind';
import { ringKind } from '@/lib/equipment/ring-kind';
import { userKind } from '@/lib/users/kind';
import { tokenProblemTexts } from '@/lib/action-tokens';
import { noRecordWhy } from '@/lib/capa/review-by-link';
import { NotFoundError, UnauthenticatedError } from '@/lib/errors';
import type { AnyRecordKind } from '@/lib/records/kind';
import { type Permission, permissionTable } from '@/lib/auth/permissions';
import { federalCalendar, isBusinessDay } from '@/lib/clocks/business-days';
import { completeAction } from '@/lib/capa/commands';
import { saveAssessment, saveInvestigation as saveComplaintInvestigation, saveResponseDraft, sendResponse } from '@/lib/complaints/commands';
import { recordDisposition } from '@/lib/deviations/batches';
import { recordTriage } from '@/lib/deviations/commands';
import { capaEvents } from '@/workflows/capa';
import { complaintEvents } from '@/workflows/complaint';
import { deviationEvents } from '@/workflows/deviation';
import { ringEvents } from '@/workflows/filling-ring';
import { capaStates, complaintStates, deviationStates, ringStates } from '@/workflows/states';
import { type TestUser, makeUser, testPassword } from '../support/fixtures';
import { type Built, type Cast, capaIn, complaintIn, deviationIn, makeCast, makeTestBatch, ringIn } from '../support/stories';
import { type Ability, type Expected, type Outcome, RedirectSignal, callAction, callRoute, expectOutcome, expectedFor, formOf, writesSnapshot } from './harness';

/*
 * Every route handler and server action that touches a record, called by every role as the record's
 * own people and as others, on records in every state of their lifecycle. What each call must answer
 * (404 not visible, 403 not theirs or not their role, 409 not in this state or not ready, 2xx done)
 * is asked of the record kind's own rules on the record as it stands, so a route that decides
 * anything the kind does not say (a permission check before the visibility check, a state check of
 * its own, a missing segregation-of-duties rule) fails here; and a refusal must write nothing at all
 * (21 CFR 11.10(d), (e); EU GMP Annex 11 §12; segregation of duties: common practice). The file also
 * fails when a route or action exists without an entry in the table below.
 */

const session = vi.hoisted(() => ({ user: null as CurrentUser | null }));

vi.mock('@/lib/auth/session', () => {
  const current = async () => session.user;
  const requireUser = async () => {
    if (!session.user) throw new UnauthenticatedError();
    return session.user;
  };
  return {
    getCurrentUser: current,
    requireUser,
    requireUserWith: async (permission: string) => {
      const user = await requireUser();
      const { assertCan } = await import('@/lib/auth/permissions');
      assertCan(user, permission as never);
      return user;
    },
    requirePageUser: requireUser,
    safeReturnPath: (p: string | undefined) => p ?? '/',
    changePasswordPath: '/account/password',
    choosePasswordFirst: 'Choose your own password first.',
  };
});
vi.mock('next/navigation', async () => {
  const { RedirectSignal: Signal } = await import('./harness');
  return {
    redirect: (url: string) => {
      throw new Signal(url);
    },
    notFound: () => {
      throw new Error('notFound() in a server action');
    },
    forbidden: () => {
      throw new Error('forbidden() in a server action');
    },
  };
});
vi.mock('next/cache', () => ({ revalidatePath: () => {}, revalidateTag: () => {} }));

afterAll(closeDb);

const root = path.resolve(__dirname, '../../..');
const reason = 'Matrix check: the reason a person would give.';
const png = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mP8z8BQDwAEhQGAhKmMIQAAAABJRU5ErkJggg==', 'base64');
const isoDay = (ms: number) => new Date(ms).toISOString().slice(0, 10);

type Handler = (request: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>;
type ActionFn = (...args: never[]) => Promise<unknown>;

async function route(file: string, method: string): Promise<Handler> {
  const mod = (await import(/* @vite-ignore */ path.join(root, file))) as Record<string, Handler>;
  const handler = mod[method];
  if (!handler) throw new Error(`${file} exports no ${method}`);
  return handler;
}

async function action(file: string, name: string): Promise<ActionFn> {
  const mod = (await import(/* @vite-ignore */ path.join(root, file))) as Record<string, ActionFn>;
  const fn = mod[name];
  if (!fn) throw new Error(`${file} exports no ${name}`);
  return fn;
}

/** What a call needs: the record, and things the body names (a batch, a deviation number, an action). */
interface Ctx {
  id: number;
  version: number;
  built: Built & { batchId?: number; actionId?: number | null };
  cast: Cast;
}

interface RecordEntry {
  /** "app/api/.../route.ts GET" or "app/(app)/.../actions.ts submitX". */
  key: string;
  kind: AnyRecordKind;
  states: readonly string[];
  ability: (state: string, ctx: Ctx) => Ability;
  call: (ctx: Ctx) => Promise<Outcome>;
  /** A success leaves the record as the rules read it (a read, a comment), so the next cell may use it. */
  keepsRecord?: boolean;
  /** The words a missing record is reported in, when the route names something else (a file). */
  notFound?: string;
  /** What to expect instead of the kind's rule, for a person the rule does not decide (another's link). */
  override?: (actor: TestUser, ctx: Ctx) => Expected | null;
}

const routeKey = (file: string, method: string) => `${file} ${method}`;
const actionKey = (file: string, name: string) => `${file} ${name}`;

function viaRoute(file: string, method: string, body: (ctx: Ctx) => { json?: unknown; form?: FormData } = () => ({}), params?: (ctx: Ctx) => Record<string, string>) {
  return async (ctx: Ctx) => callRoute(await route(file, method), params ? params(ctx) : { id: String(ctx.id) }, { method, ...body(ctx) });
}

function viaAction(file: string, name: string, args: (ctx: Ctx) => unknown[]) {
  return async (ctx: Ctx) => {
    const fn = await action(file, name);
    return callAction(() => (fn as (...a: unknown[]) => Promise<unknown>)(...args(ctx)));
  };
}

// ── Bodies ───────────────────────────────────────────────────────────────────────────────────────

const eventBody = (event: string) => (ctx: Ctx) => ({ event, version: ctx.version, reason, password: testPassword });

const draftBody = (ctx: Ctx) => ({
  version: ctx.version,
  title: 'Broken capsule bodies at the outfeed, edited',
  whatHappened: 'Split bodies seen in the outfeed chute during the hourly check.',
  occurredAt: new Date(Date.now() - 3_600_000).toISOString(),
  batchId: ctx.built.batchId,
  heldBatchIds: [ctx.built.batchId],
});

const triageBody = (ctx: Ctx) => ({
  version: ctx.version,
  severity: 7,
  occurrence: 4,
  detection: 5,
  classification: 'major',
  investigatorId: ctx.cast.investigator.id,
});

const investigationBody = (ctx: Ctx) => ({
  version: ctx.version,
  investigationReport: '<p>Bodies broke at the pin plate; the bore on segment 3 was damaged. Checked again.</p>',
  rootCauseCategory: 'machine',
  rootCause: 'Damaged body plate bore.',
  productImpact: 'Broken bodies removed by 100 % inspection; fill weights within limits.',
  capaRequired: 'no',
});

const dispositionBody = (ctx: Ctx) => ({ version: ctx.version, batchId: ctx.built.batchId, disposition: 'reject', note: 'Split bodies throughout (matrix).' });

function uploadForm(): FormData {
  const form = new FormData();
  form.append('file', new File([png], 'matrix photo.png', { type: 'image/png' }));
  return form;
}

const planBody = (ctx: Ctx) => ({
  version: ctx.version,
  title: 'Stop broken bodies on the test filler',
  problemStatement: 'Broken bodies recur on one ring segment of the test filler.',
  effectivenessCriteria: 'No broken-body deviations on the test filler over the next 25 batches.',
});

const actionFields = (ctx: Ctx) => ({
  kind: 'preventive',
  category: 'training',
  description: 'Train the shift on the bore check (matrix).',
  ownerId: ctx.cast.supervisor.id,
  dueAt: isoDay(Date.now() + 10 * 86_400_000),
});

async function actionVersion(actionId: number | null | undefined): Promise<number> {
  if (!actionId) return 1;
  const [a] = await db.select({ version: capaActions.version }).from(capaActions).where(eq(capaActions.id, actionId));
  return a?.version ?? 1;
}

const assessmentBody = (ctx: Ctx) => ({
  version: ctx.version,
  category: 'empty_capsule',
  adverseEvent: 'no',
  reportable: 'no',
  assessmentRationale: 'Empty capsules are a quality defect; nobody was harmed, nothing to report (matrix).',
});

const complaintInvestigationBody = (ctx: Ctx) => ({
  version: ctx.version,
  retainedSamplesChecked: 'yes',
  investigationSummary: 'Retained samples full; the vacuum dropped on the filler (matrix).',
});

let linkableDeviation = '';

/** The newest review link e-mailed to the cast's approver for this CAPA (read from the outbox, as the mail would carry it). */
async function reviewToken(capaId: number): Promise<string> {
  const [mail] = await db
    .select({ text: mailOutbox.textBody })
    .from(mailOutbox)
    .where(and(eq(mailOutbox.recordType, 'capa'), eq(mailOutbox.recordId, capaId), eq(mailOutbox.toUserId, cast.approver.id), eq(mailOutbox.template, 'capa_effectiveness_review')))
    .orderBy(desc(mailOutbox.id))
    .limit(1);
  const token = /\/review\/([A-Za-z0-9_-]{20,})/.exec(mail?.text ?? '')?.[1];
  if (!token) throw new Error(`no review link was mailed for CAPA ${capaId}`);
  return token;
}

const files = new Map<number, number>();

/** A PNG filed on the deviation (a fixture: how files are added is the evidence entries' business). */
async function fileOf(deviationId: number): Promise<number> {
  const known = files.get(deviationId);
  if (known) return known;
  const key = newAttachmentKey('deviation', deviationId);
  const stored = await putAttachmentObject({ key, buffer: png, contentType: 'image/png' });
  const [row] = await db
    .insert(attachments)
    .values({ recordType: 'deviation', recordId: deviationId, objectKey: key, fileName: 'fixture.png', contentType: 'image/png', sizeBytes: stored.sizeBytes, sha256: stored.sha256, uploadedBy: cast.operator.id })
    .$returningId();
  files.set(deviationId, row!.id);
  return row!.id;
}

const ringBody = (event: string) => (ctx: Ctx) =>
  event === 'quarantine'
    ? { event, version: ctx.version, reason, condition: 'dented' }
    : event === 'return_to_service'
      ? { event, version: ctx.version, reason, condition: 'good', password: testPassword }
      : { event, version: ctx.version, reason, password: testPassword };

// ── The table ────────────────────────────────────────────────────────────────────────────────────

const D = 'app/api/deviations/[id]';
const DA = 'app/(app)/deviations/[id]';
const C = 'app/api/capa/[id]';
const CA = 'app/(app)/capa/[id]/actions.ts';
const M = 'app/api/complaints/[id]';
const MA = 'app/(app)/complaints/[id]/actions.ts';
const state0 = {} as never;

const userCells = ['active', 'inactive', 'active:locked'] as const;
const userChanges = [
  { patch: 'change_role', section: 'role', actionName: 'changeRoleAction', fields: { role: 'supervisor', reason } },
  { patch: 'deactivate', section: 'deactivation', actionName: 'deactivateAction', fields: { reason } },
  { patch: 'reactivate', section: 'reactivation', actionName: 'reactivateAction', fields: { reason } },
  { patch: 'reset_password', section: 'password_reset', actionName: 'resetPasswordAction', fields: { password: 'a temporary one 2026!', reason } },
  { patch: 'unlock', section: 'unlock', actionName: 'unlockAction', fields: { reason } },
] as const;
const adminFormState = { status: 'idle', message: null, fieldErrors: {}, values: {}, submissions: 0 } as never;

const dispositionAbility = (state: string): Ability => ({ section: state.startsWith('investigation') ? 'recommendation' : 'disposition' });

/*
 * Besides each state as a record first reaches it, a few records further along within a state, so
 * that each event can also be sent when the record is ready for it (the guards' other side).
 */
const deviationCells = [...deviationStates, 'triage:minor'] as const;
const capaCells = [...capaStates, 'implementation:done'] as const;
const complaintCells = [...complaintStates, 'assessment:recorded', 'assessment:no-defect', 'investigation:recorded', 'investigation:reportable', 'response:sent'] as const;

const entries: RecordEntry[] = [
  // Deviations
  { key: routeKey(`${D}/route.ts`, 'GET'), kind: deviationKind, states: deviationCells, ability: () => ({ read: true }), call: viaRoute(`${D}/route.ts`, 'GET'), keepsRecord: true },
  ...deviationEvents.flatMap((event): RecordEntry[] => [
    { key: routeKey(`${D}/route.ts`, 'POST'), kind: deviationKind, states: deviationCells, ability: () => ({ event }), call: viaRoute(`${D}/route.ts`, 'POST', (c) => ({ json: eventBody(event)(c) })) },
    {
      key: actionKey(`${DA}/actions.ts`, 'submitDeviationEvent'),
      kind: deviationKind,
      states: deviationCells,
      ability: () => ({ event }),
      call: viaAction(`${DA}/actions.ts`, 'submitDeviationEvent', (c) => [state0, formOf({ id: c.id, ...eventBody(event)(c) })]),
    },
  ]),
  {
    key: actionKey('app/(app)/deviations/new/actions.ts', 'submitRaisedDeviation'),
    kind: deviationKind,
    states: deviationCells,
    ability: () => ({ event: 'submit' }),
    call: viaAction('app/(app)/deviations/new/actions.ts', 'submitRaisedDeviation', (c) => [{ id: c.id, version: c.version }]),
  },
  { key: routeKey(`${D}/draft/route.ts`, 'PUT'), kind: deviationKind, states: deviationCells, ability: () => ({ section: 'draft' }), call: viaRoute(`${D}/draft/route.ts`, 'PUT', (c) => ({ json: draftBody(c) })) },
  {
    key: actionKey('app/(app)/deviations/new/actions.ts', 'saveRaiseDraft'),
    kind: deviationKind,
    states: deviationCells,
    ability: () => ({ section: 'draft' }),
    call: viaAction('app/(app)/deviations/new/actions.ts', 'saveRaiseDraft', (c) => [{ id: c.id, ...draftBody(c) }]),
  },
  { key: routeKey(`${D}/triage/route.ts`, 'PUT'), kind: deviationKind, states: deviationCells, ability: () => ({ section: 'triage' }), call: viaRoute(`${D}/triage/route.ts`, 'PUT', (c) => ({ json: triageBody(c) })) },
  {
    key: actionKey(`${DA}/actions.ts`, 'submitTriage'),
    kind: deviationKind,
    states: deviationCells,
    ability: () => ({ section: 'triage' }),
    call: viaAction(`${DA}/actions.ts`, 'submitTriage', (c) => [state0, formOf({ id: c.id, ...triageBody(c) })]),
  },
  { key: routeKey(`${D}/investigation/route.ts`, 'GET'), kind: deviationKind, states: deviationCells, ability: () => ({ read: true }), call: viaRoute(`${D}/investigation/route.ts`, 'GET'), keepsRecord: true },
  {
    key: routeKey(`${D}/investigation/route.ts`, 'PUT'),
    kind: deviationKind,
    states: deviationCells,
    ability: () => ({ section: 'investigation' }),
    call: viaRoute(`${D}/investigation/route.ts`, 'PUT', (c) => ({ json: investigationBody(c) })),
  },
  {
    key: actionKey(`${DA}/investigation-actions.ts`, 'saveInvestigationAction'),
    kind: deviationKind,
    states: deviationCells,
    ability: () => ({ section: 'investigation' }),
    call: viaAction(`${DA}/investigation-actions.ts`, 'saveInvestigationAction', (c) => [state0, formOf({ id: c.id, ...investigationBody(c) })]),
  },
  {
    key: routeKey(`${D}/batches/route.ts`, 'GET'),
    kind: deviationKind,
    states: deviationCells,
    // Suggestions to extend the holds: for those who triage (the holds section's permission), in any state.
    ability: () => ({ read: true }),
    override: (actor) => (actor.role === 'qa_investigator' ? null : { ok: false, status: 403, reason: 'Your role does not allow this (deviation: triage).' }),
    call: viaRoute(`${D}/batches/route.ts`, 'GET'),
    keepsRecord: true,
  },
  {
    key: routeKey(`${D}/batches/route.ts`, 'POST'),
    kind: deviationKind,
    states: deviationCells,
    ability: () => ({ section: 'holds' }),
    call: async (c) => {
      const batch = await makeTestBatch();
      return viaRoute(`${D}/batches/route.ts`, 'POST', () => ({ json: { action: 'hold', version: c.version, batchIds: [batch.id] } }))(c);
    },
  },
  {
    key: actionKey(`${DA}/batch-actions.ts`, 'submitHolds'),
    kind: deviationKind,
    states: deviationCells,
    ability: () => ({ section: 'holds' }),
    call: async (c) => {
      const batch = await makeTestBatch();
      return viaAction(`${DA}/batch-actions.ts`, 'submitHolds', () => [state0, formOf({ id: c.id, version: c.version, batchIds: [batch.id] })])(c);
    },
  },
  {
    key: routeKey(`${D}/batches/route.ts`, 'POST'),
    kind: deviationKind,
    states: deviationCells,
    ability: dispositionAbility,
    call: viaRoute(`${D}/batches/route.ts`, 'POST', (c) => ({ json: { action: 'disposition', ...dispositionBody(c) } })),
  },
  {
    key: actionKey(`${DA}/batch-actions.ts`, 'submitDisposition'),
    kind: deviationKind,
    states: deviationCells,
    ability: dispositionAbility,
    call: viaAction(`${DA}/batch-actions.ts`, 'submitDisposition', (c) => [state0, formOf({ id: c.id, ...dispositionBody(c) })]),
  },
  { key: routeKey(`${D}/attachments/route.ts`, 'GET'), kind: deviationKind, states: deviationCells, ability: () => ({ read: true }), call: viaRoute(`${D}/attachments/route.ts`, 'GET'), keepsRecord: true },
  {
    key: routeKey(`${D}/attachments/route.ts`, 'POST'),
    kind: deviationKind,
    states: deviationCells,
    ability: () => ({ section: 'evidence' }),
    call: viaRoute(`${D}/attachments/route.ts`, 'POST', () => ({ form: uploadForm() })),
  },
  { key: routeKey(`${D}/comments/route.ts`, 'GET'), kind: deviationKind, states: deviationCells, ability: () => ({ read: true }), call: viaRoute(`${D}/comments/route.ts`, 'GET'), keepsRecord: true },
  {
    key: routeKey(`${D}/comments/route.ts`, 'POST'),
    kind: deviationKind,
    states: deviationCells,
    ability: () => ({ section: 'comments' }),
    call: viaRoute(`${D}/comments/route.ts`, 'POST', () => ({ json: { body: 'Seen; checking the ring log (matrix).' } })),
    keepsRecord: true,
  },
  {
    key: actionKey(`${DA}/comment-actions.ts`, 'addDeviationComment'),
    kind: deviationKind,
    states: deviationCells,
    ability: () => ({ section: 'comments' }),
    call: viaAction(`${DA}/comment-actions.ts`, 'addDeviationComment', (c) => [null, formOf({ deviationId: c.id, body: 'Seen; checking the ring log (matrix).' })]),
    keepsRecord: true,
  },

  // CAPA
  { key: routeKey(`${C}/route.ts`, 'GET'), kind: capaKind, states: capaCells, ability: () => ({ read: true }), call: viaRoute(`${C}/route.ts`, 'GET'), keepsRecord: true },
  ...capaEvents.flatMap((event): RecordEntry[] => [
    { key: routeKey(`${C}/route.ts`, 'POST'), kind: capaKind, states: capaCells, ability: () => ({ event }), call: viaRoute(`${C}/route.ts`, 'POST', (c) => ({ json: eventBody(event)(c) })) },
    { key: actionKey(CA, 'submitCapaEvent'), kind: capaKind, states: capaCells, ability: () => ({ event }), call: viaAction(CA, 'submitCapaEvent', (c) => [state0, formOf({ id: c.id, ...eventBody(event)(c) })]) },
  ]),
  { key: routeKey(`${C}/route.ts`, 'PUT'), kind: capaKind, states: capaCells, ability: () => ({ section: 'plan' }), call: viaRoute(`${C}/route.ts`, 'PUT', (c) => ({ json: planBody(c) })) },
  { key: actionKey(CA, 'savePlan'), kind: capaKind, states: capaCells, ability: () => ({ section: 'plan' }), call: viaAction(CA, 'savePlan', (c) => [state0, formOf({ id: c.id, ...planBody(c) })]) },
  {
    key: routeKey(`${C}/actions/route.ts`, 'POST'),
    kind: capaKind,
    states: capaCells,
    ability: () => ({ section: 'actions' }),
    call: viaRoute(`${C}/actions/route.ts`, 'POST', (c) => ({ json: { op: 'add', version: c.version, ...actionFields(c) } })),
  },
  {
    key: routeKey(`${C}/actions/route.ts`, 'POST'),
    kind: capaKind,
    states: capaCells,
    ability: () => ({ section: 'actions' }),
    call: viaRoute(`${C}/actions/route.ts`, 'POST', (c) => ({ json: { op: 'update', version: c.version, actionId: c.built.actionId, ...actionFields(c) } })),
  },
  {
    key: routeKey(`${C}/actions/route.ts`, 'POST'),
    kind: capaKind,
    states: capaCells,
    ability: (_s, c) => ({ section: 'completion', params: { actionId: c.built.actionId } }),
    call: async (c) => {
      const v = await actionVersion(c.built.actionId);
      return viaRoute(`${C}/actions/route.ts`, 'POST', () => ({
        json: { op: 'complete', actionId: c.built.actionId, actionVersion: v, evidence: '<p>Done and logged (matrix).</p>' },
      }))(c);
    },
  },
  { key: actionKey(CA, 'saveAction'), kind: capaKind, states: capaCells, ability: () => ({ section: 'actions' }), call: viaAction(CA, 'saveAction', (c) => [state0, formOf({ id: c.id, version: c.version, ...actionFields(c) })]) },
  {
    key: actionKey(CA, 'saveCompletion'),
    kind: capaKind,
    states: capaCells,
    ability: (_s, c) => ({ section: 'completion', params: { actionId: c.built.actionId } }),
    call: async (c) => {
      const v = await actionVersion(c.built.actionId);
      return viaAction(CA, 'saveCompletion', () => [state0, formOf({ id: c.id, actionId: c.built.actionId, actionVersion: v, evidence: '<p>Done and logged (matrix).</p>' })])(c);
    },
  },
  {
    key: routeKey(`${C}/approval-request/route.ts`, 'POST'),
    kind: capaKind,
    states: capaCells,
    ability: () => ({ section: 'approval_request' }),
    call: viaRoute(`${C}/approval-request/route.ts`, 'POST', (c) => ({ json: { version: c.version } })),
    keepsRecord: true,
  },
  {
    key: actionKey(CA, 'askForPlanApproval'),
    kind: capaKind,
    states: capaCells,
    ability: () => ({ section: 'approval_request' }),
    call: viaAction(CA, 'askForPlanApproval', (c) => [state0, formOf({ id: c.id, version: c.version })]),
    keepsRecord: true,
  },
  {
    key: routeKey(`${C}/owner/route.ts`, 'POST'),
    kind: capaKind,
    states: capaCells,
    ability: () => ({ section: 'owner' }),
    call: viaRoute(`${C}/owner/route.ts`, 'POST', (c) => ({ json: { version: c.version, ownerId: c.cast.investigator2.id, reason } })),
  },
  {
    key: actionKey(CA, 'saveOwner'),
    kind: capaKind,
    states: capaCells,
    ability: () => ({ section: 'owner' }),
    call: viaAction(CA, 'saveOwner', (c) => [state0, formOf({ id: c.id, version: c.version, ownerId: c.cast.investigator2.id, reason })]),
  },
  { key: routeKey(`${C}/attachments/route.ts`, 'GET'), kind: capaKind, states: capaCells, ability: () => ({ read: true }), call: viaRoute(`${C}/attachments/route.ts`, 'GET'), keepsRecord: true },
  { key: routeKey(`${C}/attachments/route.ts`, 'POST'), kind: capaKind, states: capaCells, ability: () => ({ section: 'evidence' }), call: viaRoute(`${C}/attachments/route.ts`, 'POST', () => ({ form: uploadForm() })) },

  // The e-mailed effectiveness-review link: the CAPA's rules for the person it was sent to; for anyone
  // else the link itself says no, and reveals nothing of the CAPA.
  {
    key: routeKey('app/api/review/[token]/route.ts', 'GET'),
    kind: capaKind,
    states: ['effectiveness_check'],
    ability: () => ({ read: true }),
    override: () => ({ ok: true }),
    call: async (c) => callRoute(await route('app/api/review/[token]/route.ts', 'GET'), { token: await reviewToken(c.id) }, { method: 'GET' }),
    keepsRecord: true,
  },
  {
    key: routeKey('app/api/review/[token]/route.ts', 'POST'),
    kind: capaKind,
    states: ['effectiveness_check'],
    ability: () => ({ event: 'record_effective' }),
    override: (actor) => (actor.id === cast.approver.id ? null : { ok: false, status: 409, reason: `${tokenProblemTexts.other_user.title}. Nothing was signed.` }),
    call: async (c) =>
      callRoute(await route('app/api/review/[token]/route.ts', 'POST'), { token: await reviewToken(c.id) }, { method: 'POST', json: { decision: 'effective', password: testPassword } }),
  },
  {
    key: actionKey('app/(app)/review/[token]/actions.ts', 'signReview'),
    kind: capaKind,
    states: ['effectiveness_check'],
    ability: () => ({ event: 'record_effective' }),
    override: (actor) => (actor.id === cast.approver.id ? null : { ok: false, status: 409, reason: `${tokenProblemTexts.other_user.title}. Nothing was signed.` }),
    call: async (c) => {
      const token = await reviewToken(c.id);
      return viaAction('app/(app)/review/[token]/actions.ts', 'signReview', () => [state0, formOf({ token, decision: 'effective', password: testPassword })])(c);
    },
  },
  {
    key: routeKey('app/api/review/[token]/fresh-link/route.ts', 'POST'),
    kind: capaKind,
    states: ['effectiveness_check'],
    ability: () => ({ section: 'review_link' }),
    override: (actor) => (actor.id === cast.approver.id ? null : { ok: false, status: 403, reason: noRecordWhy }),
    call: async (c) => callRoute(await route('app/api/review/[token]/fresh-link/route.ts', 'POST'), { token: await reviewToken(c.id) }, { method: 'POST' }),
  },
  {
    key: actionKey('app/(app)/review/[token]/actions.ts', 'askForFreshLink'),
    kind: capaKind,
    states: ['effectiveness_check'],
    ability: () => ({ section: 'review_link' }),
    override: (actor) => (actor.id === cast.approver.id ? null : { ok: false, status: 403, reason: noRecordWhy }),
    call: async (c) => {
      const token = await reviewToken(c.id);
      return viaAction('app/(app)/review/[token]/actions.ts', 'askForFreshLink', () => [state0, formOf({ token })])(c);
    },
  },

  // Complaints
  { key: routeKey(`${M}/route.ts`, 'GET'), kind: complaintKind, states: complaintCells, ability: () => ({ read: true }), call: viaRoute(`${M}/route.ts`, 'GET'), keepsRecord: true },
  ...complaintEvents.flatMap((event): RecordEntry[] => [
    { key: routeKey(`${M}/route.ts`, 'POST'), kind: complaintKind, states: complaintCells, ability: () => ({ event }), call: viaRoute(`${M}/route.ts`, 'POST', (c) => ({ json: eventBody(event)(c) })) },
    { key: actionKey(MA, 'submitComplaintEvent'), kind: complaintKind, states: complaintCells, ability: () => ({ event }), call: viaAction(MA, 'submitComplaintEvent', (c) => [state0, formOf({ id: c.id, ...eventBody(event)(c) })]) },
  ]),
  { key: routeKey(`${M}/assessment/route.ts`, 'PUT'), kind: complaintKind, states: complaintCells, ability: () => ({ section: 'assessment' }), call: viaRoute(`${M}/assessment/route.ts`, 'PUT', (c) => ({ json: assessmentBody(c) })) },
  { key: actionKey(MA, 'submitAssessment'), kind: complaintKind, states: complaintCells, ability: () => ({ section: 'assessment' }), call: viaAction(MA, 'submitAssessment', (c) => [state0, formOf({ id: c.id, ...assessmentBody(c) })]) },
  {
    key: routeKey(`${M}/investigation/route.ts`, 'PUT'),
    kind: complaintKind,
    states: complaintCells,
    ability: () => ({ section: 'investigation' }),
    call: viaRoute(`${M}/investigation/route.ts`, 'PUT', (c) => ({ json: complaintInvestigationBody(c) })),
  },
  {
    key: actionKey(MA, 'submitInvestigation'),
    kind: complaintKind,
    states: complaintCells,
    ability: () => ({ section: 'investigation' }),
    call: viaAction(MA, 'submitInvestigation', (c) => [state0, formOf({ id: c.id, ...complaintInvestigationBody(c) })]),
  },
  {
    key: routeKey(`${M}/links/route.ts`, 'POST'),
    kind: complaintKind,
    states: complaintCells,
    ability: () => ({ section: 'links' }),
    call: viaRoute(`${M}/links/route.ts`, 'POST', (c) => ({ json: { version: c.version, target: 'deviation', reference: linkableDeviation } })),
  },
  {
    key: actionKey(MA, 'submitLink'),
    kind: complaintKind,
    states: complaintCells,
    ability: () => ({ section: 'links' }),
    call: viaAction(MA, 'submitLink', (c) => [state0, formOf({ id: c.id, version: c.version, target: 'deviation', reference: linkableDeviation })]),
  },
  {
    key: routeKey(`${M}/capa/route.ts`, 'POST'),
    kind: complaintKind,
    states: complaintCells,
    ability: () => ({ section: 'links' }),
    call: viaRoute(`${M}/capa/route.ts`, 'POST', (c) => ({
      json: { version: c.version, title: 'Empty capsules from one lot', problemStatement: 'Empty capsules found by a consumer (matrix).', ownerId: c.cast.investigator.id },
    })),
  },
  {
    key: actionKey(MA, 'submitRaiseCapa'),
    kind: complaintKind,
    states: complaintCells,
    ability: () => ({ section: 'links' }),
    call: viaAction(MA, 'submitRaiseCapa', (c) => [
      state0,
      formOf({ id: c.id, version: c.version, title: 'Empty capsules from one lot', problemStatement: 'Empty capsules found by a consumer (matrix).', ownerId: c.cast.investigator.id }),
    ]),
  },
  {
    key: routeKey(`${M}/report/route.ts`, 'PUT'),
    kind: complaintKind,
    states: complaintCells,
    ability: () => ({ section: 'report' }),
    call: viaRoute(`${M}/report/route.ts`, 'PUT', (c) => ({ json: { version: c.version, submittedOn: isoDay(Date.now() - 86_400_000) } })),
  },
  {
    key: actionKey(MA, 'submitReport'),
    kind: complaintKind,
    states: complaintCells,
    ability: () => ({ section: 'report' }),
    call: viaAction(MA, 'submitReport', (c) => [state0, formOf({ id: c.id, version: c.version, submittedOn: isoDay(Date.now() - 86_400_000) })]),
  },
  {
    key: routeKey(`${M}/response/route.ts`, 'PUT'),
    kind: complaintKind,
    states: complaintCells,
    ability: () => ({ section: 'response' }),
    call: viaRoute(`${M}/response/route.ts`, 'PUT', (c) => ({ json: { version: c.version, letter: '<p>Thank you; we found the cause (matrix).</p>' } })),
  },
  {
    key: actionKey(MA, 'submitLetter'),
    kind: complaintKind,
    states: complaintCells,
    ability: () => ({ section: 'response' }),
    call: viaAction(MA, 'submitLetter', (c) => [state0, formOf({ id: c.id, version: c.version, letter: '<p>Thank you; we found the cause (matrix).</p>' })]),
  },
  {
    key: routeKey(`${M}/response/route.ts`, 'POST'),
    kind: complaintKind,
    states: complaintCells,
    ability: () => ({ section: 'response' }),
    call: viaRoute(`${M}/response/route.ts`, 'POST', (c) => ({ json: { version: c.version, channel: 'post' } })),
  },
  {
    key: actionKey(MA, 'submitSend'),
    kind: complaintKind,
    states: complaintCells,
    ability: () => ({ section: 'response' }),
    call: viaAction(MA, 'submitSend', (c) => [state0, formOf({ id: c.id, version: c.version, channel: 'post' })]),
  },
  { key: routeKey(`${M}/attachments/route.ts`, 'GET'), kind: complaintKind, states: complaintCells, ability: () => ({ read: true }), call: viaRoute(`${M}/attachments/route.ts`, 'GET'), keepsRecord: true },
  {
    key: routeKey(`${M}/attachments/route.ts`, 'POST'),
    kind: complaintKind,
    states: complaintCells,
    ability: () => ({ section: 'evidence' }),
    call: viaRoute(`${M}/attachments/route.ts`, 'POST', () => ({ form: uploadForm() })),
  },

  // Files of a record: downloaded and previewed by whoever may see the record, and nobody else.
  ...(['download', 'preview'] as const).map(
    (what): RecordEntry => ({
      key: routeKey(`app/api/attachments/[id]/${what}/route.ts`, 'GET'),
      kind: deviationKind,
      states: deviationCells,
      ability: () => ({ read: true }),
      // A file of a record this person may not see is itself missing; the answer does not name the record.
      notFound: new NotFoundError('This file').message,
      call: async (c) => callRoute(await route(`app/api/attachments/[id]/${what}/route.ts`, 'GET'), { id: String(await fileOf(c.id)) }, { method: 'GET' }),
      keepsRecord: true,
    }),
  ),

  // User accounts: administrators manage them; a holder sees their own (tests below); to anyone else an account is missing.
  { key: routeKey('app/api/users/[id]/route.ts', 'GET'), kind: userKind, states: userCells, ability: () => ({ read: true }), call: viaRoute('app/api/users/[id]/route.ts', 'GET'), keepsRecord: true },
  ...userChanges.flatMap(({ patch, section, actionName, fields }): RecordEntry[] => [
    {
      key: routeKey('app/api/users/[id]/route.ts', 'PATCH'),
      kind: userKind,
      states: userCells,
      ability: () => ({ section }),
      call: viaRoute('app/api/users/[id]/route.ts', 'PATCH', (c) => ({ json: { action: patch, version: c.version, ...fields } })),
    },
    {
      key: actionKey('app/(app)/admin/users/actions.ts', actionName),
      kind: userKind,
      states: userCells,
      ability: () => ({ section }),
      call: viaAction('app/(app)/admin/users/actions.ts', actionName, (c) => [c.id, adminFormState, formOf({ version: c.version, ...fields })]),
    },
  ]),

  // Filling rings
  { key: routeKey('app/api/rings/[id]/route.ts', 'GET'), kind: ringKind, states: ringStates, ability: () => ({ read: true }), call: viaRoute('app/api/rings/[id]/route.ts', 'GET'), keepsRecord: true },
  ...ringEvents.flatMap((event): RecordEntry[] => [
    { key: routeKey('app/api/rings/[id]/route.ts', 'POST'), kind: ringKind, states: ringStates, ability: () => ({ event }), call: viaRoute('app/api/rings/[id]/route.ts', 'POST', (c) => ({ json: ringBody(event)(c) })) },
    {
      key: actionKey('app/(app)/equipment/rings/[id]/actions.ts', 'submitRingEvent'),
      kind: ringKind,
      states: ringStates,
      ability: () => ({ event }),
      call: viaAction('app/(app)/equipment/rings/[id]/actions.ts', 'submitRingEvent', (c) => [state0, formOf({ id: c.id, ...ringBody(event)(c) })]),
    },
  ]),
];

// ── Routes and actions about no single record: what the role may do ─────────────────────────────

interface GlobalEntry {
  key: string;
  expected: (actor: TestUser) => Expected;
  call: () => Promise<Outcome>;
}

const describePermission = (p: Permission) => p.replace('.', ': ').replace(/_/g, ' ');
const byRole = (p: Permission) => (actor: TestUser): Expected =>
  permissionTable[p][actor.role] ? { ok: true } : { ok: false, status: 403, reason: `Your role does not allow this (${describePermission(p)}).` };

const globalEntries: GlobalEntry[] = [
  { key: routeKey('app/api/deviations/route.ts', 'GET'), expected: byRole('deviation.read'), call: async () => callRoute(await route('app/api/deviations/route.ts', 'GET'), {}, { method: 'GET', query: 'pageSize=10' }) },
  {
    key: routeKey('app/api/deviations/route.ts', 'POST'),
    expected: byRole('deviation.raise'),
    call: async () =>
      callRoute(await route('app/api/deviations/route.ts', 'POST'), {}, {
        method: 'POST',
        json: { title: 'Raised through the API (matrix)', whatHappened: 'Split bodies at the outfeed during the check.', occurredAt: new Date(Date.now() - 60_000).toISOString() },
      }),
  },
  { key: routeKey('app/api/capa/route.ts', 'GET'), expected: byRole('capa.read'), call: async () => callRoute(await route('app/api/capa/route.ts', 'GET'), {}, { method: 'GET' }) },
  {
    key: routeKey('app/api/capa/route.ts', 'POST'),
    expected: byRole('capa.create'),
    call: async () =>
      callRoute(await route('app/api/capa/route.ts', 'POST'), {}, {
        method: 'POST',
        json: { title: 'From a trend (matrix)', sourceType: 'trend', problemStatement: 'A rising trend of split caps on the test filler.', ownerId: cast.investigator.id },
      }),
  },
  {
    key: actionKey('app/(app)/capa/new/actions.ts', 'openCapa'),
    expected: byRole('capa.create'),
    call: async () => {
      const fn = await action('app/(app)/capa/new/actions.ts', 'openCapa');
      return callAction(() =>
        (fn as (...a: unknown[]) => Promise<unknown>)(state0, formOf({ title: 'From a trend (matrix)', sourceType: 'trend', problemStatement: 'A rising trend of split caps on the test filler.', ownerId: cast.investigator.id })),
      );
    },
  },
  { key: routeKey('app/api/complaints/route.ts', 'GET'), expected: byRole('complaint.read'), call: async () => callRoute(await route('app/api/complaints/route.ts', 'GET'), {}, { method: 'GET' }) },
  { key: routeKey('app/api/complaints/route.ts', 'POST'), expected: byRole('complaint.intake'), call: async () => callRoute(await route('app/api/complaints/route.ts', 'POST'), {}, { method: 'POST', json: intakeBody() }) },
  {
    key: actionKey('app/(app)/complaints/new/actions.ts', 'submitIntake'),
    expected: byRole('complaint.intake'),
    call: async () => {
      const fn = await action('app/(app)/complaints/new/actions.ts', 'submitIntake');
      return callAction(() => (fn as (...a: unknown[]) => Promise<unknown>)(state0, formOf(intakeBody())));
    },
  },
  {
    key: routeKey('app/api/complaints/trends/route.ts', 'GET'),
    // Trends count every complaint, so only a role that reads every complaint sees them.
    expected: (actor) =>
      permissionTable['complaint.read'][actor.role] === 'any'
        ? { ok: true }
        : permissionTable['complaint.read'][actor.role]
          ? { ok: false, status: 403, reason: 'Trends count every complaint on site; your role may read only the complaints you entered.' }
          : byRole('complaint.read')(actor),
    call: async () => callRoute(await route('app/api/complaints/trends/route.ts', 'GET'), {}, { method: 'GET' }),
  },
  { key: routeKey('app/api/batches/route.ts', 'GET'), expected: byRole('batch.read'), call: async () => callRoute(await route('app/api/batches/route.ts', 'GET'), {}, { method: 'GET' }) },
  {
    key: routeKey('app/api/weight-checks/route.ts', 'GET'),
    expected: byRole('weight_check.read'),
    call: async () => callRoute(await route('app/api/weight-checks/route.ts', 'GET'), {}, { method: 'GET', query: `lot=${encodeURIComponent(weighedLot.lot)}` }),
  },
  { key: routeKey('app/api/weight-checks/route.ts', 'POST'), expected: byRole('weight_check.record'), call: async () => callRoute(await route('app/api/weight-checks/route.ts', 'POST'), {}, { method: 'POST', json: weightBody() }) },
  {
    key: actionKey('app/(app)/weight-checks/actions.ts', 'submitWeightCheck'),
    expected: byRole('weight_check.record'),
    call: async () => {
      const fn = await action('app/(app)/weight-checks/actions.ts', 'submitWeightCheck');
      return callAction(() => (fn as (...a: unknown[]) => Promise<unknown>)(state0, formOf(weightBody())));
    },
  },
  { key: routeKey('app/api/users/route.ts', 'GET'), expected: byRole('users.manage'), call: async () => callRoute(await route('app/api/users/route.ts', 'GET'), {}, { method: 'GET' }) },
  { key: routeKey('app/api/users/route.ts', 'POST'), expected: byRole('users.manage'), call: async () => callRoute(await route('app/api/users/route.ts', 'POST'), {}, { method: 'POST', json: newAccount() }) },
  {
    key: actionKey('app/(app)/admin/users/actions.ts', 'createUserAction'),
    expected: byRole('users.manage'),
    call: async () => callAction(async () => (await action('app/(app)/admin/users/actions.ts', 'createUserAction') as (...a: unknown[]) => Promise<unknown>)(adminFormState, formOf(newAccount()))),
  },
  {
    key: actionKey('app/(app)/admin/calendar/actions.ts', 'addClosureAction'),
    expected: byRole('calendar.manage'),
    call: async () =>
      callAction(async () => (await action('app/(app)/admin/calendar/actions.ts', 'addClosureAction') as (...a: unknown[]) => Promise<unknown>)(adminFormState, formOf({ day: nextClosureDay(), description: 'Plant shutdown (matrix)' }))),
  },
  {
    key: actionKey('app/(app)/admin/calendar/actions.ts', 'deactivateClosureAction'),
    expected: byRole('calendar.manage'),
    call: async () => {
      const day = nextClosureDay();
      const { addSiteClosure } = await import('@/lib/site-calendar/commands');
      await addSiteClosure(cast.admin, { day, description: 'Plant shutdown (matrix)' });
      return callAction(async () => (await action('app/(app)/admin/calendar/actions.ts', 'deactivateClosureAction') as (...a: unknown[]) => Promise<unknown>)(adminFormState, formOf({ day, reason })));
    },
  },
  {
    key: actionKey('app/(app)/admin/calendar/actions.ts', 'updateDueDaysAction'),
    expected: byRole('settings.manage'),
    call: async () => {
      const { getDueDaySettings } = await import('@/lib/site-calendar/queries');
      const current = await getDueDaySettings();
      const run = await action('app/(app)/admin/calendar/actions.ts', 'updateDueDaysAction') as (...a: unknown[]) => Promise<unknown>;
      const changed = { critical: current.critical.days + 1, major: current.major.days, minor: current.minor.days, reason };
      const outcome = await callAction(() => run(adminFormState, formOf(changed)));
      // Put the site's targets back, so the tests after this one see the demo's.
      if (outcome.ok) await run(adminFormState, formOf({ critical: current.critical.days, major: current.major.days, minor: current.minor.days, reason }));
      return outcome;
    },
  },
  {
    key: actionKey('app/(app)/admin/risk-scales/actions.ts', 'publishRiskScalesAction'),
    expected: byRole('risk.manage_scales'),
    call: async () => {
      const { getCurrentRiskScales } = await import('@/lib/risk-scales/queries');
      const { riskScalesToFields } = await import('@/lib/validation/risk');
      const current = (await getCurrentRiskScales())!;
      const fields = riskScalesToFields(current.scales);
      const first = Object.keys(fields).find((k) => k.endsWith('description'))!;
      const run = await action('app/(app)/admin/risk-scales/actions.ts', 'publishRiskScalesAction') as (...a: unknown[]) => Promise<unknown>;
      return callAction(() =>
        run(adminFormState, formOf({ ...fields, [first]: `${fields[first]} (matrix ${Date.now()})`, basedOnVersion: current.version, note: 'Reworded one step for the route matrix.' })),
      );
    },
  },
  {
    key: actionKey('app/(app)/deviations/new/actions.ts', 'findRaisableLots'),
    expected: byRole('deviation.raise'),
    call: async () => callAction(async () => (await action('app/(app)/deviations/new/actions.ts', 'findRaisableLots') as (t: string) => Promise<unknown>)('IT-')),
  },
  {
    key: actionKey('app/(app)/deviations/new/actions.ts', 'findHoldCandidates'),
    expected: byRole('deviation.raise'),
    call: async () => callAction(async () => (await action('app/(app)/deviations/new/actions.ts', 'findHoldCandidates') as (b: number) => Promise<unknown>)(weighedLot.id)),
  },
];

function intakeBody() {
  return {
    complainantName: 'Wendeline Quarrystone',
    complainantContact: 'w.quarrystone@customers.example',
    complainantKind: 'consumer',
    channel: 'phone',
    receivedOn: isoDay(Date.now() - 5 * 86_400_000),
    lot: weighedLot.lot,
    description: 'Several capsules in the bottle were empty (matrix).',
    personHarmed: 'false',
  };
}

function weightBody() {
  // Twenty net masses around the test product's 500 mg target, within ±5 % (Ph. Eur. 2.9.5 passes).
  const masses = Array.from({ length: 20 }, (_, i) => (498 + (i % 5)).toFixed(1)).join('\n');
  return { batchId: weighedLot.id, method: 'ph_eur_2_9_5', massMode: 'net', masses };
}

let weighedLot: { id: number; lot: string };

function newAccount() {
  return { name: 'Matrix Newcomer', email: `matrix-${Date.now()}-${Math.random().toString(36).slice(2, 8)}@brackwater.example`, title: '', role: 'operator', password: 'a first password 2026!' };
}

let closureDay = Date.UTC(2031, 2, 2) + Math.floor(Math.random() * 200) * 86_400_000;
/** The next business day (5 U.S.C. 6103 holidays and weekends skipped) that this run has not closed yet. */
function nextClosureDay(): string {
  for (;;) {
    closureDay += 86_400_000;
    const day = new Date(closureDay).toISOString().slice(0, 10);
    if (isBusinessDay(day, federalCalendar)) return day;
  }
}

// ── Records in every state, rebuilt after a success changes them ─────────────────────────────────

let cast: Cast;
let actors: { name: string; user: TestUser }[];

const builders: Record<string, (cell: string) => Promise<Ctx['built']>> = {
  deviation: async (cell) => {
    if (cell !== 'triage:minor') return deviationIn(cast, cell as never);
    // Triaged minor with an investigator named and its batch decided: ready to close or to investigate.
    const d = await deviationIn(cast, 'triage');
    let r = (
      await recordTriage(cast.triager, {
        id: d.id,
        version: d.version,
        severity: 2,
        occurrence: 2,
        detection: 3,
        classification: 'minor',
        classificationReason: 'Cosmetic mark only; no effect on fill or shell integrity (matrix).',
        investigatorId: cast.investigator.id,
      })
    ).record;
    const decided = await recordDisposition(cast.approver2, { id: r.id, version: r.version, batchId: d.batchId, disposition: 'release' });
    return { id: d.id, version: decided.version, batchId: d.batchId };
  },
  capa: async (cell) => {
    if (cell !== 'implementation:done') return capaIn(cast, cell as never);
    const c = await capaIn(cast, 'implementation');
    const v = await actionVersion(c.actionId);
    const r = await completeAction(cast.operator, { id: c.id, actionId: c.actionId!, actionVersion: v, evidence: '<p>Done and logged.</p>' });
    return { ...c, version: r.record.version };
  },
  complaint: async (cell) => {
    const [state, variant] = cell.split(':') as [string, string | undefined];
    const built = await complaintIn(cast, state as never);
    let version = built.version;
    if (variant === 'recorded' && state === 'assessment') {
      version = (await saveAssessment(cast.investigator, { ...assessmentBody({ version } as Ctx), id: built.id })).record.version;
    } else if (variant === 'no-defect') {
      version = (await saveAssessment(cast.investigator, { ...assessmentBody({ version } as Ctx), id: built.id, category: 'no_defect_found' })).record.version;
    } else if (variant === 'reportable') {
      // A serious adverse event with a supplement: reportable, so its report's submission can be recorded.
      const a = await complaintIn(cast, 'assessment');
      let r = (
        await saveAssessment(cast.investigator, {
          ...assessmentBody({ version: a.version } as Ctx),
          id: a.id,
          category: 'suspected_adverse_reaction',
          adverseEvent: 'yes',
          seriousAdverseEvent: 'yes',
          reportable: 'yes',
        })
      ).record;
      const { completeAssessment } = await import('@/lib/complaints/commands');
      r = (await completeAssessment(cast.investigator, { id: r.id, version: r.version, password: testPassword })).record;
      return { id: r.id, version: r.version };
    } else if (variant === 'recorded' && state === 'investigation') {
      version = (await saveComplaintInvestigation(cast.investigator, { ...complaintInvestigationBody({ version } as Ctx), id: built.id })).record.version;
    } else if (state === 'response') {
      // The answer is written (by investigator2), so sending it can succeed; or already sent, so closing can.
      version = (await saveResponseDraft(cast.investigator2, { id: built.id, version, letter: '<p>Thank you; we found the cause.</p>' })).record.version;
      if (variant === 'sent') version = (await sendResponse(cast.investigator2, { id: built.id, version, channel: 'post' })).record.version;
    }
    return { id: built.id, version };
  },
  filling_ring: (s) => ringIn(cast, s as never),
  // Another person's operator account, deactivated or locked out as the cell asks (a fixture: how
  // accounts get there is the users tests' business).
  user: async (cell) => {
    const target = await makeUser('operator');
    const { users } = await import('@/db/schema');
    if (cell === 'inactive') await db.update(users).set({ active: false }).where(eq(users.id, target.id));
    if (cell === 'active:locked') await db.update(users).set({ failedSignins: 5, lockedUntil: new Date(Date.now() + 15 * 60_000) }).where(eq(users.id, target.id));
    return { id: target.id, version: 1 };
  },
};

const pool = new Map<string, Ctx['built']>();

async function recordFor(kind: AnyRecordKind, state: string): Promise<Ctx['built']> {
  const key = `${kind.recordType}:${state}`;
  let built = pool.get(key);
  if (!built) {
    built = await builders[kind.recordType]!(state);
    pool.set(key, built);
  }
  const [row] = await db.select({ version: kind.table.version }).from(kind.table as never).where(eq(kind.table.id, built.id));
  return { ...built, version: (row as unknown as { version: number }).version };
}

function signIn(user: TestUser | null) {
  session.user = user ? { id: user.id, email: user.email, name: user.name, title: user.title, role: user.role, mustChangePassword: false } : null;
}

beforeAll(async () => {
  cast = await makeCast();
  const [investigator3, approver3] = await Promise.all([makeUser('qa_investigator'), makeUser('qa_approver')]);
  actors = [...Object.entries(cast).map(([name, user]) => ({ name, user })), { name: 'investigator3', user: investigator3 }, { name: 'approver3', user: approver3 }];
  const reported = await deviationIn(cast, 'reported');
  const { deviations } = await import('@/db/schema');
  const [row] = await db.select({ number: deviations.number }).from(deviations).where(eq(deviations.id, reported.id));
  linkableDeviation = row!.number!;
  weighedLot = await makeTestBatch();
}, 120_000);

describe('route × role × state: what the record kinds say', () => {
  const byKind = new Map<string, RecordEntry[]>();
  for (const e of entries) byKind.set(e.kind.recordType, [...(byKind.get(e.kind.recordType) ?? []), e]);

  for (const [recordType, list] of byKind) {
    it(`${recordType}: ${list.length} routes and actions, every state, every role (own and others), and signed out`, async () => {
      let cells = 0;
      const outcomes = new Map<string, { ok: number; refused: number; ability: string }>();
      for (const [index, entry] of list.entries()) {
        const tallyKey = `${entry.key} #${index}`;
        for (const state of entry.states) {
          for (const { name, user } of [...actors, { name: 'signed out', user: null as TestUser | null }]) {
            const built = await recordFor(entry.kind, state);
            const ctx: Ctx = { id: built.id, version: built.version, built, cast };
            const label = `${entry.key} [${JSON.stringify(entry.ability(state, ctx))}] ${recordType} ${state} as ${name}`;
            const ruled = user ? await expectedFor(entry.kind, user, built.id, entry.ability(state, ctx)) : null;
            // Visibility first, always; an override speaks only about a record the person may see.
            const want: Expected = !user
              ? { ok: false, status: 401 as never, reason: new UnauthenticatedError().message }
              : ruled && !ruled.ok && ruled.status === 404
                ? { ...ruled, reason: entry.notFound ?? ruled.reason }
                : (entry.override?.(user, ctx) ?? ruled!);
            const before = want.ok ? null : await writesSnapshot(entry.kind, built.id);
            signIn(user);
            const got = await entry.call(ctx);
            signIn(null);
            expectOutcome(label, got, want, entry.key.includes('actions.ts'));
            const tally = outcomes.get(tallyKey) ?? { ok: 0, refused: 0, ability: JSON.stringify(entry.ability(state, ctx)) };
            if (want.ok) tally.ok++;
            else tally.refused++;
            outcomes.set(tallyKey, tally);
            if (!want.ok) expect(await writesSnapshot(entry.kind, built.id), `${label}: a refusal wrote something`).toEqual(before);
            else if (!entry.keepsRecord) pool.delete(`${entry.kind.recordType}:${state}`);
            cells++;
          }
        }
      }
      console.log(`[matrix] ${recordType}: ${cells} calls`);
      // A matrix in which a call never succeeds (or is never refused) would prove little about it.
      const oneSided = [...outcomes].filter(([, t]) => t.ok === 0 || t.refused === 0).map(([k, t]) => `${k} ${t.ability}: ${t.ok} done, ${t.refused} refused`);
      expect(oneSided).toEqual([]);
    }, 900_000);
  }
});

describe('routes and actions about no single record: what each role may do', () => {
  it('answers every role as the permission table says, and a signed-out caller 401', async () => {
    let cells = 0;
    for (const entry of globalEntries) {
      for (const { name, user } of [...actors, { name: 'signed out', user: null as TestUser | null }]) {
        const want: Expected = user ? entry.expected(user) : { ok: false, status: 401 as never, reason: new UnauthenticatedError().message };
        signIn(user);
        const got = await entry.call();
        signIn(null);
        expectOutcome(`${entry.key} as ${name}`, got, want, entry.key.includes('actions.ts'));
        cells++;
      }
    }
    console.log(`[matrix] no single record: ${cells} calls`);
  }, 300_000);
});

describe('one\'s own account', () => {
  it('is visible to its holder, whatever their role (the user kind: account.read, own)', async () => {
    for (const { name, user } of actors) {
      signIn(user);
      const got = await callRoute(await route('app/api/users/[id]/route.ts', 'GET'), { id: String(user.id) }, { method: 'GET' });
      signIn(null);
      expect(got, name).toMatchObject({ ok: true });
    }
  });
});

// ── Every route and action has an entry ──────────────────────────────────────────────────────────

function walk(dir: string): string[] {
  return readdirSync(path.join(root, dir), { withFileTypes: true }).flatMap((e) =>
    e.isDirectory() ? walk(path.join(dir, e.name)) : [path.join(dir, e.name)],
  );
}

/** Routes and actions this file does not call, with the test that covers each instead. */
const coveredElsewhere: Record<string, string> = {
  [routeKey('app/api/auth/[...nextauth]/route.ts', 'GET')]: 'Auth.js itself; sign-in and lock-out: tests/integration/auth/sign-in.test.ts',
  [routeKey('app/api/auth/[...nextauth]/route.ts', 'POST')]: 'Auth.js itself; sign-in and lock-out: tests/integration/auth/sign-in.test.ts',
  [actionKey('app/(auth)/sign-in/actions.ts', 'signInAction')]: 'tests/integration/auth/sign-in.test.ts and tests/e2e/shell-by-role.test.ts',
  [actionKey('app/(app)/actions.ts', 'signOutAction')]: 'tests/e2e/shell-by-role.test.ts',
  [actionKey('app/(app)/account/password/actions.ts', 'changeOwnPasswordAction')]: 'one\'s own account only: tests/integration/users/own-password.test.ts',
};

describe('the matrix covers every route handler and server action', () => {
  it('has an entry for each exported method of app/api/**/route.ts and each export of a "use server" file', () => {
    const found: string[] = [];
    for (const file of walk('app').filter((f) => f.endsWith('route.ts'))) {
      const text = readFileSync(path.join(root, file), 'utf8');
      for (const m of text.matchAll(/export\s+(?:async\s+)?function\s+(GET|POST|PUT|PATCH|DELETE)\b/g)) found.push(routeKey(file, m[1]!));
      for (const m of text.matchAll(/export\s+const\s+\{([^}]*)\}/g)) {
        for (const name of m[1]!.split(',').map((n) => n.trim())) if (/^(GET|POST|PUT|PATCH|DELETE)$/.test(name)) found.push(routeKey(file, name));
      }
    }
    for (const file of walk('app').filter((f) => /\.tsx?$/.test(f))) {
      const text = readFileSync(path.join(root, file), 'utf8');
      if (!/^'use server';/m.test(text)) continue;
      for (const m of text.matchAll(/export async function (\w+)/g)) found.push(actionKey(file, m[1]!));
    }
    const known = new Set([...entries.map((e) => e.key), ...globalEntries.map((e) => e.key), ...Object.keys(coveredElsewhere)]);
    const missing = [...new Set(found)].filter((k) => !known.has(k)).sort();
    expect(missing).toEqual([]);
  });
});
