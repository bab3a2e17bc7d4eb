import 'server-only';
import { eq } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { capsuleDefects, users } from '../../db/schema';
import { type CauseBranch, type Fishbone, fishboneFor } from '../causes';
import { type LinkedCapa, ensureCapaForDeviation, listCapasRaisedBy } from '../capa/create-from-deviation';
import { ValidationError, fieldError } from '../errors';
import type { RecordActor } from '../records/kind';
import { abilitiesFor, editRecord, getVisibleRow } from '../records/write-path';
import { cleanRichTextForSaving } from '../rich-text/sanitize';
import { parseInput } from '../validation/parse';
import {
  type CauseAnalysis,
  type CauseState,
  type RootCauseCategory,
  type SaveInvestigationInput,
  type WhyStep,
  parseStoredCauseAnalysis,
  parseStoredFiveWhys,
  rootCauseCategories,
  saveInvestigationSchema,
} from './investigation-schema';
import { type DeviationDto, deviationKind } from './kind';

/*
 * The investigation section of a deviation: the report, five whys, the cause-and-effect marks,
 * root cause, product impact and whether a CAPA is needed. It is edited only by the assigned
 * investigator while the deviation is under investigation, saved as often as they like (drafts may
 * be partial), and every save audits each changed field old → new, the whole report included, so
 * every saved version stays in the trail (21 CFR 11.10(e)). Completeness is checked when the
 * investigator signs it off (submitForApproval in ./commands.ts).
 */

export const investigationConflictMessage =
  'This investigation was changed by someone else since you opened it. Nothing was saved; your text is below to copy. Reload the page to see their version.';

/** One probable cause on the diagram, with what the investigator concluded. */
export interface InvestigationCauseDto {
  /** Catalogue id, or null for a cause the investigator added. */
  causeId: string | null;
  cause: string;
  check: string | null;
  state: CauseState;
  note: string;
}

export interface InvestigationBranchDto {
  branch: CauseBranch;
  label: string;
  question: string;
  causes: InvestigationCauseDto[];
}

export interface InvestigationViewDto {
  deviationId: number;
  version: number;
  status: DeviationDto['status'];
  defectCode: string | null;
  defectName: string | null;
  investigatorId: number | null;
  investigatorName: string | null;
  /** Whether this viewer may save the section now (the assigned investigator, under investigation). */
  canEdit: boolean;
  /** Why not, for the viewer who might expect to (null when they can, or when it is plainly not theirs). */
  editRefusal: string | null;
  /** Cleaned HTML, or null when nothing was written. */
  report: string | null;
  fiveWhys: WhyStep[];
  causeAnalysis: CauseAnalysis;
  /** The catalogue's causes for this defect, with the marks merged in, plus the investigator's own. */
  branches: InvestigationBranchDto[];
  cautions: Fishbone['cautions'];
  rootCauseCategory: RootCauseCategory | null;
  rootCause: string | null;
  productImpact: string | null;
  capaRequired: boolean | null;
  capas: LinkedCapa[];
}

function mergeBranches(fishbone: Fishbone, analysis: CauseAnalysis): InvestigationBranchDto[] {
  const marks = new Map(analysis.catalogue.map((m) => [m.causeId, m]));
  return fishbone.branches.map((b) => ({
    branch: b.branch,
    label: b.label,
    question: b.question,
    causes: [
      ...b.causes.map((c) => {
        const mark = marks.get(c.id);
        return { causeId: c.id, cause: c.cause, check: c.check, state: mark?.state ?? 'not_assessed', note: mark?.note ?? '' };
      }),
      ...analysis.own
        .filter((o) => o.branch === b.branch)
        .map((o) => ({ causeId: null, cause: o.cause, check: null, state: o.state, note: o.note })),
    ],
  }));
}

const isRootCauseCategory = (v: string | null): v is RootCauseCategory => v !== null && (rootCauseCategories as readonly string[]).includes(v);

/** The section as the page and GET /api/deviations/[id]/investigation show it. Drafts stay their author's. */
export async function getInvestigationView(deviationId: number, viewer: RecordActor, dbOrTx: DbOrTx = db): Promise<InvestigationViewDto> {
  const row = await getVisibleRow(dbOrTx, deviationKind, deviationId, viewer);

  const [defect, investigator, linked] = await Promise.all([
    row.defectId === null
      ? null
      : dbOrTx
          .select({ code: capsuleDefects.code, name: capsuleDefects.name, defaultClassification: capsuleDefects.defaultClassification })
          .from(capsuleDefects)
          .where(eq(capsuleDefects.id, row.defectId))
          .then((r) => r[0] ?? null),
    row.investigatorId === null
      ? null
      : dbOrTx
          .select({ name: users.name })
          .from(users)
          .where(eq(users.id, row.investigatorId))
          .then((r) => r[0]?.name ?? null),
    listCapasRaisedBy(dbOrTx, row.id),
  ]);
  const critical = row.classification === 'critical' || (row.classification === null && defect?.defaultClassification === 'critical');
  const fishbone = fishboneFor(defect?.code ?? '', { critical });
  const analysis = parseStoredCauseAnalysis(row.causeAnalysis);
  const { sections } = await abilitiesFor(deviationKind, viewer, row, dbOrTx);
  return {
    deviationId: row.id,
    version: row.version,
    status: row.status,
    defectCode: defect?.code ?? null,
    defectName: defect?.name ?? null,
    investigatorId: row.investigatorId,
    investigatorName: investigator,
    canEdit: sections.investigation.editable,
    editRefusal: sections.investigation.reason,
    report: row.investigationReport,
    fiveWhys: parseStoredFiveWhys(row.fiveWhys),
    causeAnalysis: analysis,
    branches: mergeBranches(fishbone, analysis),
    cautions: fishbone.cautions,
    rootCauseCategory: isRootCauseCategory(row.rootCauseCategory) ? row.rootCauseCategory : null,
    rootCause: row.rootCause,
    productImpact: row.productImpact,
    capaRequired: row.capaRequired,
    capas: linked,
  };
}

export interface SaveInvestigationOutcome {
  record: DeviationDto;
  /** The CAPA opened by this save, if it opened one. */
  capaCreated: LinkedCapa | null;
}

/**
 * Saves the whole section. Checks, in the order a person wants to hear them: the deviation exists
 * and they may read it; they investigate (role) and are the assigned investigator (record); it is
 * under investigation; nobody saved since they opened it. Then cleans the report, writes the row
 * and its audit entry and, the first time a CAPA is said to be needed, opens it — one transaction.
 */
export async function saveInvestigation(actor: RecordActor, raw: SaveInvestigationInput): Promise<SaveInvestigationOutcome> {
  const input = parseInput(saveInvestigationSchema, raw);
  const report = input.investigationReport === undefined ? null : cleanRichTextForSaving(input.investigationReport);
  if (report && !report.ok) throw new ValidationError(report.message, { investigationReport: [report.message] });

  const outcome = await editRecord(deviationKind, {
    id: input.id,
    section: 'investigation',
    actor,
    expectedVersion: input.version,
    action: 'save_investigation',
    conflictMessage: investigationConflictMessage,
    async apply(before, { tx }) {
      const [defect] =
        before.defectId === null
          ? []
          : await tx.select({ code: capsuleDefects.code }).from(capsuleDefects).where(eq(capsuleDefects.id, before.defectId));
      const known = new Set(fishboneFor(defect?.code ?? '').branches.flatMap((b) => b.causes.map((c) => c.id)));
      const unknown = input.causeAnalysis.catalogue.filter((m) => !known.has(m.causeId));
      if (unknown.length > 0) {
        throw fieldError('causeAnalysis', 'Some marked causes are not probable causes of this defect; reload the page.');
      }
      const changes = {
        investigationReport: report && !report.empty ? report.html : null,
        fiveWhys: input.fiveWhys.length > 0 ? JSON.stringify(input.fiveWhys) : null,
        causeAnalysis:
          input.causeAnalysis.catalogue.length + input.causeAnalysis.own.length > 0 ? JSON.stringify(input.causeAnalysis) : null,
        rootCauseCategory: input.rootCauseCategory ?? null,
        rootCause: input.rootCause ?? null,
        productImpact: input.productImpact ?? null,
        capaRequired: input.capaRequired,
      };
      // The first "CAPA needed" opens one through the CAPA's own insert path, in this transaction
      // (ICH Q10 3.2.2), from the deviation as it is being saved.
      const capa = changes.capaRequired ? await ensureCapaForDeviation(tx, actor, { ...before, ...changes }) : null;
      const capaCreated = capa?.created ? capa.capa : null;
      return {
        changes,
        audit: capaCreated ? [{ field: 'raisedCapa', from: null, to: capaCreated.number }] : [],
        result: capaCreated,
        afterCommit: capa?.afterCommit,
      };
    },
  });
  return { record: outcome.record, capaCreated: outcome.result ?? null };
}
