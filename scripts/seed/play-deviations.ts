import { recordDisposition } from '../../lib/deviations/batches';
import {
  approveDeviation,
  assignInvestigation,
  cancelDeviation,
  closeMinor,
  createDraft,
  discardDraft,
  recordTriage,
  returnForRework,
  startTriage,
  submitDeviation,
  submitForApproval,
} from '../../lib/deviations/commands';
import { saveInvestigation } from '../../lib/deviations/investigation';
import { capaStories } from './capa-stories';
import type { PlannedDeviation, PlannedStep } from './deviations';
import type { SeedContext, StoryStep } from './story';

/*
 * The demo deviations told through the deviation commands, step by step as deviations.ts planned
 * them: the operator's draft, its submission (the product gives the number and puts the batches on
 * hold), triage, the investigation saved and signed, the recommendations, approval or return, a
 * minor closure, a cancellation, a draft thrown away. The product checks every step as it would a
 * person's; the seed only says who does what, and when.
 */

const capaOf = new Map(capaStories.map((c) => [c.deviation, c.key]));

const json = (text: string | null | undefined) => (text ? (JSON.parse(text) as unknown) : undefined);

function run(d: PlannedDeviation, s: PlannedStep, ctx: SeedContext): Promise<void> {
  const key = `deviation:${d.key}`;
  const by = ctx.person(s.by);
  const moved = (outcome: { record: { id: number; version: number } }) => ctx.track(key, outcome.record);
  const current = () => {
    const r = ctx.record(key);
    return { id: r.id, version: r.version };
  };
  const c = d.columns;
  switch (s.event) {
    case 'create':
      return createDraft(by, {
        title: c.title,
        whatHappened: c.whatHappened,
        occurredAt: new Date(c.occurredAt),
        batchId: d.lot ? ctx.id(ctx.batchIds, d.lot, 'batch') : undefined,
        machineId: !d.lot && d.machineAssetTag ? ctx.id(ctx.machineIds, d.machineAssetTag, 'machine') : undefined,
        defectId: d.defectCode ? ctx.id(ctx.defectIds, d.defectCode, 'defect') : undefined,
        affectedCount: c.affectedCount ?? undefined,
        sampleDescription: c.sampleDescription ?? undefined,
        immediateActions: c.immediateActions ?? undefined,
        lineStopped: c.lineStopped,
        capsulesSegregated: c.capsulesSegregated,
        heldBatchIds: d.holds.map((h) => ctx.id(ctx.batchIds, h.lot, 'batch')),
      }).then(moved);
    case 'discard':
      return discardDraft(by, { ...current(), reason: s.reason }).then(moved);
    case 'submit':
      return submitDeviation(by, current()).then((outcome) => {
        moved(outcome);
        // deviations.ts numbered the stories in order of reporting, and the texts that name a number rely on it.
        if (outcome.record.number !== s.changes.number) {
          throw new Error(`the product gave ${outcome.record.number} where the plan expects ${s.changes.number}`);
        }
        ctx.numbers.set(key, outcome.record.number!);
      });
    case 'start_triage':
      return startTriage(by, current()).then(moved);
    case 'record_triage': {
      const t = s.changes;
      return recordTriage(by, {
        ...current(),
        classification: t.classification!,
        severity: t.severity!,
        occurrence: t.occurrence!,
        detection: t.detection!,
        classificationReason: t.classificationReason ?? undefined,
        investigatorId: ctx.person(t.investigator!).id,
        dueAt: t.dueAt!,
      }).then(moved);
    }
    case 'assign_investigation':
      return assignInvestigation(by, current()).then(moved);
    case 'save_investigation': {
      const v = s.changes;
      return saveInvestigation(by, {
        ...current(),
        investigationReport: v.investigationReport ?? undefined,
        fiveWhys: json(v.fiveWhys) ?? [],
        causeAnalysis: json(v.causeAnalysis) ?? { catalogue: [], own: [] },
        rootCauseCategory: v.rootCauseCategory ?? undefined,
        rootCause: v.rootCause ?? undefined,
        productImpact: v.productImpact ?? undefined,
        capaRequired: v.capaRequired ?? null,
      } as Parameters<typeof saveInvestigation>[1]).then(({ record, capaCreated }) => {
        ctx.track(key, record);
        if (!capaCreated) return;
        const capaKey = capaOf.get(d.key);
        if (!capaKey) throw new Error(`the product opened ${capaCreated.number}, which no CAPA story tells`);
        ctx.track(`capa:${capaKey}`, { id: capaCreated.id, version: 1 });
        ctx.numbers.set(`capa:${capaKey}`, capaCreated.number);
      });
    }
    case 'record_disposition': {
      const h = s.disposition!;
      return recordDisposition(by, {
        ...current(),
        batchId: ctx.id(ctx.batchIds, h.lot, 'batch'),
        disposition: h.disposition,
        note: h.note ?? undefined,
      }).then(({ deviationId, version }) => ctx.track(key, { id: deviationId, version }));
    }
    case 'submit_for_approval':
      return ctx.signer(s.by).then((signer) => submitForApproval(by, current(), signer)).then(moved);
    case 'return_for_rework':
      return returnForRework(by, { ...current(), reason: s.reason! }).then(moved);
    case 'approve':
      return ctx.signer(s.by).then((signer) => approveDeviation(by, current(), signer)).then(moved);
    case 'close_minor':
      return ctx.signer(s.by).then((signer) => closeMinor(by, { ...current(), reason: s.reason! }, signer)).then(moved);
    case 'cancel':
      return ctx.signer(s.by).then((signer) => cancelDeviation(by, { ...current(), reason: s.reason! }, signer)).then(moved);
    default:
      throw new Error(`no command for the demo step ${s.event}`);
  }
}

export function deviationSteps(planned: readonly PlannedDeviation[]): StoryStep[] {
  return planned.flatMap((d) =>
    d.steps.map((s) => ({
      at: s.at,
      what: `deviation ${d.key}: ${s.event.replace(/_/g, ' ')} by ${s.by}`,
      run: (ctx: SeedContext) => run(d, s, ctx),
    })),
  );
}

/** Lots a demo deviation puts on hold (they were in process until then). */
export function lotsHeldByDeviations(planned: readonly PlannedDeviation[]): Set<string> {
  return new Set(planned.filter((d) => d.steps.some((s) => s.event === 'submit')).flatMap((d) => d.holds.map((h) => h.lot)));
}
