import { and, asc, eq } from 'drizzle-orm';
import { db } from '../../db/client';
import { capaActions, capas } from '../../db/schema';
import {
  addAction,
  approvePlan,
  cancelCapa,
  completeAction,
  openEffectivenessCheck,
  recordEffective,
  recordNotEffective,
  requestPlanApproval,
  startImplementation,
  updatePlan,
} from '../../lib/capa/commands';
import { type CapaStory, type PlannedAction, capaStories } from './capa-stories';
import type { PlannedDeviation } from './deviations';
import { type SeedContext, type StoryStep, iso } from './story';

/*
 * The demo CAPAs' steps after the product opened each one: the investigator's save of a finished
 * investigation that says a CAPA is needed opens it (play-deviations.ts), then its owner plans it
 * (title, due date, criteria, actions), a QA approver signs the plan, the owner starts the work,
 * each action's owner records it done with the evidence, the check opens and a QA approver who took
 * no part signs effective or not effective, or cancels it. Each step goes through the CAPA command a
 * person would use, at the time the story gives.
 */

type CapaStepKind =
  | { kind: 'update_plan'; title: string | null; dueOn: string; story: CapaStory }
  | { kind: 'add_action'; round: number; index: number; action: PlannedAction }
  | { kind: 'request_plan_approval' }
  | { kind: 'approve_plan' }
  | { kind: 'start_implementation' }
  | { kind: 'complete_action'; round: number; index: number; evidence: string }
  | { kind: 'open_effectiveness_check'; reason: string | null }
  | { kind: 'record_effective' }
  | { kind: 'record_not_effective'; reason: string }
  | { kind: 'cancel'; reason: string };

export type PlannedCapaStep = CapaStepKind & { at: string; by: string };

export interface PlannedCapa {
  key: string;
  deviation: string;
  owner: string;
  /** When the investigation opened it (its deviation's save). */
  openedAt: string;
  steps: PlannedCapaStep[];
}

const approver = 'approver@brackwater.example';
const dayMs = 86_400_000;
const lastMoment = iso('2026-11-27T23:00');

/** When the product opens each demo CAPA: the first save of its deviation's investigation that asks for one. */
function openedAt(d: PlannedDeviation): string {
  const save = d.steps.find((s) => s.event === 'save_investigation' && s.changes.capaRequired === true);
  if (!save) throw new Error(`demo deviation ${d.key} never says a CAPA is needed`);
  return save.at;
}

/** The CAPA stories as dated steps, each after the one before it and inside the scenario. Pure. */
export function planDemoCapas(deviations: readonly PlannedDeviation[]): PlannedCapa[] {
  const byKey = new Map(deviations.map((d) => [d.key, d]));
  return capaStories.map((story) => {
    const deviation = byKey.get(story.deviation);
    if (!deviation) throw new Error(`demo CAPA ${story.key}: no demo deviation ${story.deviation}`);
    if (deviation.steps.find((s) => s.event === 'save_investigation' && s.changes.capaRequired === true)?.by !== deviation.columns.investigator) {
      throw new Error(`demo CAPA ${story.key}: its deviation's investigator does not open it`);
    }
    if (deviation.columns.investigator !== story.owner) {
      throw new Error(`demo CAPA ${story.key}: the product makes the deviation's investigator its owner, not ${story.owner}`);
    }
    const opened = openedAt(deviation);
    const steps: PlannedCapaStep[] = [];
    let last = opened;
    const at = (moment: string, what: string) => {
      const t = iso(moment);
      if (t < last) throw new Error(`demo CAPA ${story.key}: ${what} at ${moment} comes before the step before it`);
      if (t > lastMoment) throw new Error(`demo CAPA ${story.key}: ${what} falls after the scenario`);
      last = t;
      return t;
    };
    const after = (t: string, minutes: number) => new Date(Date.parse(t) + minutes * 60_000).toISOString();
    const dueOn = new Date(Date.parse(opened.slice(0, 10)) + story.dueDays * dayMs).toISOString().slice(0, 10);
    const add = (step: CapaStepKind, t: string, by: string) => steps.push({ ...step, at: t, by });

    if (story.rounds.length === 0) {
      // Just raised: the owner has only given it its due date.
      add({ kind: 'update_plan', title: null, dueOn, story }, at(after(opened, 10), 'due date'), story.owner);
    }
    for (const [round, r] of story.rounds.entries()) {
      const plannedAt = at(r.plannedAt, 'planning');
      r.actions.forEach((action, index) => add({ kind: 'add_action', round, index, action }, after(plannedAt, index * 4), story.owner));
      if (round === 0) add({ kind: 'update_plan', title: story.title, dueOn, story }, at(after(plannedAt, 20), 'the plan'), story.owner);
      else last = after(plannedAt, r.actions.length * 4);
      if (story.approvalRequestedAt && round === story.rounds.length - 1) {
        add({ kind: 'request_plan_approval' }, at(story.approvalRequestedAt, 'approval request'), story.owner);
      }
      if (!r.approvedAt) continue;
      add({ kind: 'approve_plan' }, at(r.approvedAt, 'plan approval'), approver);
      if (!r.startedAt) continue;
      add({ kind: 'start_implementation' }, at(r.startedAt, 'start'), story.owner);
      const completions = r.actions
        .map((action, index) => ({ action, index }))
        .filter((x) => x.action.done)
        .sort((x, y) => x.action.done!.at.localeCompare(y.action.done!.at));
      for (const { action, index } of completions) {
        add({ kind: 'complete_action', round, index, evidence: action.done!.evidence }, at(action.done!.at, 'action completion'), action.owner);
      }
      if (!r.checkOpened) continue;
      add({ kind: 'open_effectiveness_check', reason: r.checkOpened.reason ?? null }, at(r.checkOpened.at, 'effectiveness check'), r.checkOpened.by);
      if (!r.outcome) continue;
      const decided = at(r.outcome.at, 'effectiveness decision');
      if (r.outcome.effective) add({ kind: 'record_effective' }, decided, approver);
      else add({ kind: 'record_not_effective', reason: r.outcome.reason }, decided, approver);
    }
    if (story.cancel) add({ kind: 'cancel', reason: story.cancel.reason }, at(story.cancel.at, 'cancellation'), story.cancel.by);
    return { key: story.key, deviation: story.deviation, owner: story.owner, openedAt: opened, steps };
  });
}

/** "{capa:key}" and "{dev:key}" as the numbers the product gave those records. */
function withNumbers(ctx: SeedContext, text: string): string {
  return text
    .replace(/\{capa:([\w-]+)\}/g, (_m, key: string) => ctx.number(`capa:${key}`))
    .replace(/\{dev:([\w-]+)\}/g, (_m, key: string) => ctx.number(`deviation:${key}`));
}

async function actionOf(capaId: number, round: number, index: number) {
  const rows = await db
    .select({ id: capaActions.id, version: capaActions.version })
    .from(capaActions)
    .where(and(eq(capaActions.capaId, capaId), eq(capaActions.round, round + 1)))
    .orderBy(asc(capaActions.id));
  const action = rows[index];
  if (!action) throw new Error(`action ${index + 1} of round ${round + 1} is missing`);
  return action;
}

function runStep(key: string, step: PlannedCapaStep, ctx: SeedContext): Promise<unknown> {
  const recordKey = `capa:${key}`;
  const capa = ctx.record(recordKey);
  const by = ctx.person(step.by);
  const versioned = { id: capa.id, version: capa.version };
  const moved = (outcome: { record: { id: number; version: number } }) => ctx.track(recordKey, outcome.record);
  switch (step.kind) {
    case 'update_plan':
      return (async () => {
        // The problem statement and root cause stay as the product wrote them from the deviation.
        const [row] = await db.select().from(capas).where(eq(capas.id, capa.id));
        const c = step.story.criterion;
        moved(
          await updatePlan(by, {
            ...versioned,
            title: step.title || row!.title,
            problemStatement: row!.problemStatement,
            rootCause: row!.rootCause ?? undefined,
            effectivenessCriteria: step.story.criteria,
            dueAt: step.dueOn,
            ...(c
              ? {
                  criterionDefectId: ctx.id(ctx.defectIds, c.defect, 'defect'),
                  criterionMachineId: c.machine ? ctx.id(ctx.machineIds, c.machine, 'machine') : undefined,
                  criterionRingId: c.ring ? ctx.id(ctx.ringIds, c.ring, 'ring') : undefined,
                  criterionBatches: c.batches,
                  criterionDays: c.days,
                }
              : {}),
          }),
        );
      })();
    case 'add_action':
      return addAction(by, {
        ...versioned,
        kind: step.action.kind,
        category: step.action.category,
        description: step.action.description,
        ownerId: ctx.person(step.action.owner).id,
        dueAt: step.action.due,
      }).then(moved);
    case 'request_plan_approval':
      return requestPlanApproval(by, versioned).then(moved);
    case 'approve_plan':
      return ctx.signer(step.by).then((signer) => approvePlan(by, versioned, signer)).then(moved);
    case 'start_implementation':
      return startImplementation(by, versioned).then(moved);
    case 'complete_action':
      return (async () => {
        const action = await actionOf(capa.id, step.round, step.index);
        moved(await completeAction(by, { id: capa.id, actionId: action.id, actionVersion: action.version, evidence: step.evidence }));
      })();
    case 'open_effectiveness_check':
      return openEffectivenessCheck(by, { ...versioned, reason: step.reason && withNumbers(ctx, step.reason) }).then(moved);
    case 'record_effective':
      return ctx.signer(step.by).then((signer) => recordEffective(by, versioned, signer)).then(moved);
    case 'record_not_effective':
      return ctx.signer(step.by).then((signer) => recordNotEffective(by, { ...versioned, reason: withNumbers(ctx, step.reason) }, signer)).then(moved);
    case 'cancel':
      return ctx.signer(step.by).then((signer) => cancelCapa(by, { ...versioned, reason: withNumbers(ctx, step.reason) }, signer)).then(moved);
  }
}

export function capaSteps(planned: readonly PlannedCapa[]): StoryStep[] {
  return planned.flatMap((capa) =>
    capa.steps.map((step) => ({
      at: step.at,
      what: `CAPA ${capa.key}: ${step.kind.replace(/_/g, ' ')} by ${step.by}`,
      run: async (ctx: SeedContext) => {
        await runStep(capa.key, step, ctx);
      },
    })),
  );
}
