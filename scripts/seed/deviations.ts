import { defaultDueDays, dueDateFor } from '../../lib/clocks/due-dates';
import { formatRecordNumber } from '../../lib/records/number-format';
import { numberPrefixes } from '../../lib/records/types';
import { planEvent, resolveSnapshot } from '../../lib/records/workflow';
import { type Classification, classify } from '../../lib/risk/classify';
import { rpn } from '../../lib/risk/rpn';
import type { SignatureMeaning } from '../../lib/signatures/meanings';
import { deviationMachine } from '../../workflows/deviation';
import type { DeviationState } from '../../workflows/states';
import type { dispositions } from '../../db/schema';
import { capaSaveLeadMinutes } from './capa-stories';
import { completeInvestigation, firstSubmission, investigationInProgress } from './deviation-investigations';
import { mulberry32, randomInt, type Prng } from './prng';
import { scenarioEnd, type DemoScenario } from './scenario';

/*
 * Demo deviations: about forty over the five months of the scenario, in every state, each told the
 * way it would have happened on Brackwater's capsule lines (broken bodies on the dented ring
 * BWR-0302, light fills after a powder lot change, unseparated capsules at low vacuum, a metal
 * particle that cost a batch, drafts thrown away by their authors). This module plans them, purely:
 * every step dated, given to the demo user who takes it, checked against the deviation machine and
 * the record kind's segregation of duties, with the columns it is expected to leave. play-deviations.ts
 * then sends each step through the command a person would use, at its time, and the product gives
 * the numbers (DEV-2026-0001... in order of reporting), history, audit entries and signatures.
 *
 * The holds agree with the scenario's batch statuses: a batch on hold is held by an open deviation,
 * a released batch only by a closed deviation that released it, and the rejected batch by the closed
 * deviation that rejected it. The assigned investigator recommends each held batch's disposition
 * before signing the investigation; an independent QA approver decides it at a minor closure.
 */

const operator = 'operator@brackwater.example';
const operator2 = 'operator2@brackwater.example';
const supervisor = 'supervisor@brackwater.example';
const investigator = 'investigator@brackwater.example';
const investigator2 = 'investigator2@brackwater.example';
const approver = 'approver@brackwater.example';

type Disposition = (typeof dispositions)[number];

export interface PlannedHold {
  lot: string;
  recommendedDisposition: Disposition | null;
  disposition: Disposition | null;
  dispositionNote: string | null;
  samplingPlan: string | null;
}

/** Column values of a deviation, with times as ISO strings and people as demo e-mails. */
export interface PlannedColumns {
  number: string | null;
  title: string;
  whatHappened: string;
  immediateActions: string | null;
  lineStopped: boolean;
  capsulesSegregated: boolean;
  affectedCount: number | null;
  sampleDescription: string | null;
  classification: Classification | null;
  classificationReason: string | null;
  severity: number | null;
  occurrence: number | null;
  detection: number | null;
  rpn: number | null;
  investigationReport: string | null;
  fiveWhys: string | null;
  causeAnalysis: string | null;
  rootCauseCategory: string | null;
  rootCause: string | null;
  productImpact: string | null;
  capaRequired: boolean | null;
  closureJustification: string | null;
  cancelReason: string | null;
  investigator: string | null;
  owner: string | null;
  occurredAt: string;
  reportedAt: string | null;
  dueAt: string | null;
  closedAt: string | null;
}

export interface PlannedStep {
  /**
   * A machine event, 'create', or a section edit that changes no state: 'record_triage',
   * 'save_investigation', 'record_disposition'.
   */
  event: string;
  by: string;
  at: string;
  fromState: DeviationState | null;
  toState: DeviationState;
  reason: string | null;
  changes: Partial<PlannedColumns>;
  /** What the machine asks this step to be signed as, if anything. */
  signature: SignatureMeaning | null;
  /** For 'record_disposition': the held batch and what is recorded for it. */
  disposition?: { lot: string; disposition: Disposition; note: string | null };
}

export interface PlannedDeviation {
  key: string;
  status: DeviationState;
  raisedBy: string;
  defectCode: string | null;
  /** The batch the deviation is about; product, machine and ring follow from it. */
  lot: string | null;
  machineAssetTag: string | null;
  ringSerial: string | null;
  holds: PlannedHold[];
  columns: PlannedColumns;
  steps: PlannedStep[];
}

interface Triage {
  s: number;
  o: number;
  d: number;
  /** A class other than the computed one, with why. */
  chosen?: { classification: Classification; why: string };
  investigator: string;
}

interface Investigation {
  report: string;
  category: 'method' | 'machine' | 'material' | 'measurement' | 'people' | 'environment';
  rootCause: string;
  productImpact: string;
  capaRequired: boolean;
}

type Path = 'draft' | 'discarded' | 'reported' | 'triage_open' | 'triage_classified' | 'investigation' | 'approval' | 'closed' | 'closed_minor' | 'cancelled';

interface Story {
  key: string;
  path: Path;
  raisedBy: string;
  /** UTC, minutes precision: 'YYYY-MM-DDTHH:MM'. */
  occurredAt: string;
  defect: string | null;
  lot: string | null;
  /** Only when there is no lot (equipment found before a batch ran). */
  machine?: string;
  title: string;
  whatHappened: string;
  immediateActions?: string;
  lineStopped?: boolean;
  segregated?: boolean;
  affected?: number;
  sample?: string;
  holds?: PlannedHold[];
  triage?: Triage;
  investigation?: Investigation;
  /** Returned once for rework before the outcome. */
  rework?: string;
  /** The minor closure's written justification. */
  justification?: string;
  /** Cancelled: why, at which state, by whom. `{dup:key}` is replaced by that deviation's number. */
  cancel?: { reason: string; from: 'reported' | 'triage'; by: string };
  /** Calendar days the investigation took, when the story says. */
  investigationDays?: number;
  /** Discarded: why its author threw the draft away. */
  discard?: string;
}

const hold = (lot: string, disposition: Disposition | null, note: string | null, samplingPlan: string | null = null): PlannedHold => ({
  lot,
  recommendedDisposition: disposition,
  disposition: null,
  dispositionNote: note,
  samplingPlan,
});

/** A held batch whose disposition was decided at closure. */
const decided = (lot: string, disposition: Disposition, note: string, samplingPlan: string | null = null): PlannedHold => ({
  lot,
  recommendedDisposition: disposition,
  disposition,
  dispositionNote: note,
  samplingPlan,
});

const aqlGeneral = 'ISO 2859-1, general level II, normal inspection, AQL 0.65 (major)';

export const deviationStories: readonly Story[] = [
  {
    key: 'powder-shell-0703',
    path: 'closed_minor',
    raisedBy: operator2,
    occurredAt: '2026-07-03T15:20',
    defect: 'powder_outside',
    lot: 'BW-2026-0703-B',
    title: 'Powder on outer shell after capsule polisher',
    whatHappened:
      'At the hourly visual check about one capsule in twenty leaving the polisher carried a film of ascorbic acid on the cap. The polisher brush looked flattened on the inlet side.',
    immediateActions: 'Brush section turned and vacuum extraction on the polisher checked; polished capsules since the last check re-polished.',
    affected: 400,
    sample: '100 capsules from the polisher outlet, 5 with visible powder',
    triage: { s: 3, o: 3, d: 2, investigator: investigator },
    justification:
      'Cosmetic only: shells intact, fill weight unaffected (in-process checks in limits). Re-polished capsules passed visual inspection. Brush replacement added to the weekly polisher check.',
  },
  {
    key: 'light-fill-0709',
    path: 'closed',
    raisedBy: operator,
    occurredAt: '2026-07-09T13:05',
    defect: 'light_fill',
    lot: 'BW-2026-0709-A',
    title: 'Light fills on Filler 1 after magnesium glycinate lot change',
    whatHappened:
      'First weight check after loading the new powder lot: 6 of 20 capsules below 576 mg (lowest 551 mg). The new lot looked fluffier and bridged in the hopper.',
    immediateActions: 'Line stopped, capsules filled since the lot change segregated, dosing disc height reset and tamping re-set by the supervisor before restart.',
    lineStopped: true,
    segregated: true,
    affected: 9_000,
    sample: '20 capsules, weighed individually',
    triage: { s: 7, o: 4, d: 3, investigator: investigator },
    investigation: {
      report:
        'Supplier certificate shows tapped density 0.71 g/mL for the new lot against 0.80 g/mL for the previous one. The fill settings were not re-validated at the lot change. The segregated capsules were 100 % weight-sorted; 412 were rejected. Ph. Eur. 2.9.5 on three samples of 20 after restart: all within limits.',
      category: 'material',
      rootCause: 'Lower bulk density of the new powder lot; no fill-setting check at a lot change of the same material.',
      productImpact: 'Light capsules removed by weight sorting; remaining batch meets uniformity of mass.',
      capaRequired: true,
    },
    holds: [decided('BW-2026-0709-A', 'release', 'Released after 100 % weight sort of the segregated portion and passing uniformity of mass.', aqlGeneral)],
  },
  {
    key: 'unseparated-0716',
    path: 'closed',
    raisedBy: operator2,
    occurredAt: '2026-07-16T16:40',
    defect: 'unseparated',
    lot: 'BW-2026-0716-B',
    title: 'Unseparated capsules at low vacuum on Filler 3',
    whatHappened:
      'Closed empty capsules found in the reject bin and three in the finished container. The vacuum gauge read 6 inHg against 9-12 inHg.',
    immediateActions: 'Line stopped, vacuum filter found clogged with powder and replaced; vacuum back to 10.5 inHg. Capsules since the last good check segregated.',
    lineStopped: true,
    segregated: true,
    affected: 2_500,
    sample: 'Finished container 4: 3 unseparated of 500 inspected',
    triage: { s: 5, o: 4, d: 4, investigator: investigator2 },
    investigation: {
      report:
        'Vacuum filter had been changed at the scheduled interval but the ascorbic acid fines loaded it faster than usual. Segregated capsules inspected 100 % by light table; 31 unseparated removed. Containers 1-3 inspected by AQL with none found.',
      category: 'machine',
      rootCause: 'Vacuum filter loaded by fine powder before its scheduled change; no low-vacuum alarm on this model.',
      productImpact: 'No unseparated capsules remain after 100 % inspection of the segregated part.',
      capaRequired: true,
    },
    holds: [decided('BW-2026-0716-B', 'release', 'Released after 100 % inspection of the segregated capsules and AQL inspection of the rest.', aqlGeneral)],
  },
  {
    key: 'print-0722',
    path: 'closed_minor',
    raisedBy: operator,
    occurredAt: '2026-07-22T18:10',
    defect: 'print_colour',
    lot: 'BW-2026-0722-B',
    title: 'Faint band print on supplier shells',
    whatHappened: 'Capsules from one shell carton show faint, partly broken band print. Shells are bought printed.',
    immediateActions: 'Carton set aside, remaining shells taken from a different carton of the same lot.',
    affected: 1_200,
    sample: '50 capsules from the carton, 18 with faint print',
    triage: { s: 2, o: 3, d: 2, investigator: investigator },
    justification:
      'Cosmetic defect from the shell supplier, confined to one carton; print legible. Supplier informed with photographs. No effect on fill, closure or identity.',
  },
  {
    key: 'dented-0728',
    path: 'closed',
    raisedBy: supervisor,
    occurredAt: '2026-07-28T14:30',
    defect: 'dented_shell',
    lot: 'BW-2026-0728-A',
    title: 'Dented caps at the closing station',
    whatHappened: 'Dents in the cap dome on about 2 % of capsules, seen at the hourly check. Closing pins looked worn.',
    affected: 600,
    sample: '200 capsules, 4 dented',
    triage: { s: 3, o: 5, d: 3, investigator: investigator2 },
    investigation: {
      report: 'Closing pin set measured: two pins 0.3 mm short from wear. Pins replaced. Dented capsules removed by the sorter; dents do not breach the wall.',
      category: 'machine',
      rootCause: 'Worn closing pins beyond the wear limit; pin length not on the preventive maintenance list.',
      productImpact: 'None: no breach of the shell; dented capsules removed.',
      capaRequired: false,
    },
  },
  {
    key: 'broken-0804',
    path: 'closed',
    raisedBy: operator,
    occurredAt: '2026-08-04T12:15',
    defect: 'broken_body',
    lot: 'BW-2026-0804-A',
    title: 'Broken bodies on ring BWR-0104',
    whatHappened: 'Crushed bodies in one ring segment, repeating every revolution. Probiotic powder on the turntable.',
    immediateActions: 'Line stopped, ring BWR-0104 taken off and quarantined, capsules since start-up segregated.',
    lineStopped: true,
    segregated: true,
    affected: 15_000,
    sample: 'Ring segment 7: 11 of 12 bores with broken bodies',
    triage: { s: 7, o: 3, d: 3, investigator: investigator },
    investigation: {
      report:
        'Changeover inspection found a hairline crack in the body plate of BWR-0104 at segment 7; the ring was retired. Segregated capsules 100 % inspected; 1,140 rejected. Remaining batch inspected by AQL, none found.',
      category: 'machine',
      rootCause: 'Fatigue crack in the body plate of ring BWR-0104.',
      productImpact: 'Broken bodies removed by inspection; remaining capsules meet the AQL.',
      capaRequired: true,
    },
    holds: [decided('BW-2026-0804-A', 'release', 'Released after 100 % inspection of the segregated capsules.', aqlGeneral)],
  },
  {
    key: 'cracked-0812',
    path: 'closed',
    raisedBy: operator2,
    occurredAt: '2026-08-12T17:45',
    defect: 'cracked_shell',
    lot: 'BW-2026-0812-A',
    title: 'Cracked bodies on Filler 3, ring BWR-0302',
    whatHappened: 'Cracked body walls at the hourly check, all from the same ring segment of BWR-0302.',
    immediateActions: 'Ring removed and inspected: a dent on the outer edge of segment 3. Capsules since the last good check segregated.',
    lineStopped: true,
    segregated: true,
    affected: 4_000,
    sample: '100 capsules, 6 cracked',
    triage: { s: 6, o: 4, d: 4, investigator: investigator2 },
    investigation: {
      report:
        'Dent on segment 3 of BWR-0302, probably from a drop at the previous changeover. Engineering dressed the edge; bore alignment checked in tolerance. Ring kept in service, condition recorded as dented, to be watched at every changeover. Segregated capsules 100 % inspected.',
      category: 'machine',
      rootCause: 'Dented ring segment from handling at changeover.',
      productImpact: 'Cracked capsules removed; remaining batch meets the AQL.',
      capaRequired: true,
    },
    holds: [decided('BW-2026-0812-A', 'release', 'Released after 100 % inspection of the segregated capsules.', aqlGeneral)],
  },
  {
    key: 'heavy-0825',
    path: 'closed',
    raisedBy: operator,
    occurredAt: '2026-08-25T15:00',
    defect: 'heavy_fill',
    lot: 'BW-2026-0825-B',
    title: 'Heavy fills after tamping adjustment',
    whatHappened: 'Weight check mean 391 mg against a 350 mg target after the tamping depth was changed at shift handover; 4 of 20 above 385 mg.',
    immediateActions: 'Tamping depth returned to the validated setting, capsules since handover segregated.',
    segregated: true,
    affected: 6_000,
    sample: '20 capsules, weighed individually',
    triage: { s: 6, o: 3, d: 3, investigator: investigator },
    investigation: {
      report: 'The handover note recorded a tamping change but not the validated setting. Segregated capsules weight-sorted, 388 rejected.',
      category: 'method',
      rootCause: 'Setting changed at handover without the validated value on the batch record.',
      productImpact: 'Heavy capsules removed; uniformity of mass met after sorting.',
      capaRequired: true,
    },
    holds: [decided('BW-2026-0825-B', 'release', 'Released after weight sorting of the segregated capsules.')],
  },
  {
    key: 'telescoped-0903',
    path: 'closed',
    raisedBy: supervisor,
    occurredAt: '2026-09-03T13:35',
    defect: 'telescoped',
    lot: 'BW-2026-0903-A',
    title: 'Telescoped capsules on Filler 4 with worn ring BWR-0401',
    whatHappened: 'Caps pushed down over the body on about 1 in 200 capsules. Closing pressure at the top of its range.',
    immediateActions: 'Closing pressure reduced to the middle of the validated range; telescoped capsules removed at the sorter.',
    affected: 1_500,
    sample: '400 capsules, 2 telescoped',
    triage: { s: 6, o: 4, d: 3, investigator: investigator2 },
    investigation: {
      report: 'Worn ring BWR-0401 lets bodies sit slightly low; combined with high closing pressure the caps telescoped. Pressure band narrowed for this ring until it is replaced.',
      category: 'machine',
      rootCause: 'Worn ring and closing pressure at the top of the range together.',
      productImpact: 'Telescoped capsules removed by sorting; AQL inspection passed.',
      capaRequired: true,
    },
    holds: [decided('BW-2026-0903-A', 'release', 'Released after AQL inspection found no telescoped capsules.', aqlGeneral)],
  },
  {
    key: 'foreign-0916',
    path: 'closed',
    raisedBy: operator2,
    occurredAt: '2026-09-16T14:50',
    defect: 'foreign_matter',
    lot: 'BW-2026-0916-A',
    title: 'Dark metallic particles inside capsules, Filler 1',
    whatHappened: 'Two capsules at the light table showed a dark particle through the shell. Opened: grey metallic flakes about 0.5 mm in the powder.',
    immediateActions: 'Line stopped, batch and all finished containers quarantined, powder hopper and auger sealed for engineering, QA called to the line.',
    lineStopped: true,
    segregated: true,
    affected: 215_000,
    sample: '2 capsules with particles kept in the QA retain cabinet',
    triage: { s: 9, o: 3, d: 5, investigator: investigator },
    investigation: {
      report:
        'Auger flight found scoring the feed tube after a bearing wore; the flakes match the auger steel. Metal detection is not installed on this line. The whole batch may contain particles; no inspection can show their absence.',
      category: 'machine',
      rootCause: 'Worn auger bearing let the auger touch the feed tube and shed metal.',
      productImpact: 'Whole batch affected; not fit for release.',
      capaRequired: true,
    },
    investigationDays: 11,
    holds: [decided('BW-2026-0916-A', 'reject', 'Rejected: metal particles possible anywhere in the batch. Destroyed under QA supervision.')],
  },
  {
    key: 'foreign-0916-dup',
    path: 'cancelled',
    raisedBy: operator,
    occurredAt: '2026-09-16T15:10',
    defect: 'foreign_matter',
    lot: 'BW-2026-0916-A',
    title: 'Metal in capsules Filler 1',
    whatHappened: 'Particles in capsules at the light table, line stopped by Ruben.',
    cancel: { reason: 'Duplicate of {dup:foreign-0916}, raised for the same event by a second operator.', from: 'reported', by: investigator },
  },
  {
    key: 'pinhole-0924',
    path: 'closed_minor',
    raisedBy: operator,
    occurredAt: '2026-09-24T16:25',
    defect: 'shell_bubble_pinhole',
    lot: 'BW-2026-0924-B',
    title: 'Pinholes in HPMC shells from one shell carton',
    whatHappened: 'Pinholes in the cap of some capsules, seen against the light. All from the carton opened at 10:00.',
    immediateActions: 'Carton withdrawn, capsules filled from it segregated and held.',
    segregated: true,
    affected: 3_000,
    sample: '315 capsules inspected, 2 with pinholes',
    triage: { s: 4, o: 2, d: 3, investigator: investigator2 },
    holds: [decided('BW-2026-0924-B', 'release', 'Released: pinhole rate in the segregated capsules within the minor AQL; no leakage.', 'ISO 2859-1, general level II, normal, AQL 2.5 (minor)')],
    justification:
      'Rate within the AQL for a minor defect, no powder leakage, confined to one supplier carton. Supplier complaint raised; incoming shell inspection tightened for the next lots.',
  },
  {
    key: 'balance-1002',
    path: 'cancelled',
    raisedBy: operator2,
    occurredAt: '2026-10-02T13:10',
    defect: 'light_fill',
    lot: 'BW-2026-1002-A',
    title: 'Light fills at weight check, Filler 2',
    whatHappened: 'Weight check showed a mean 40 mg below target.',
    cancel: {
      reason: 'Not a deviation: the balance had not been tared after changing the weighing boat. Re-check with a tared balance was in limits.',
      from: 'triage',
      by: approver,
    },
  },
  {
    key: 'double-cap-1008',
    path: 'closed',
    raisedBy: operator,
    occurredAt: '2026-10-08T12:40',
    defect: 'double_cap',
    lot: 'BW-2026-1008-A',
    title: 'Double caps on Filler 1 after rectifier jam',
    whatHappened: 'Capsules with two caps after the rectifier jammed and was cleared by hand.',
    immediateActions: 'Capsules from the 10 minutes after the jam segregated.',
    segregated: true,
    affected: 2_000,
    sample: '500 capsules, 7 double caps',
    triage: { s: 5, o: 3, d: 3, investigator: investigator2 },
    investigation: {
      report: 'Loose caps left in the rectifier after the jam were fed again. Segregated capsules 100 % inspected.',
      category: 'method',
      rootCause: 'Jam clearance instruction does not say to empty the rectifier.',
      productImpact: 'Double caps removed by inspection.',
      capaRequired: true,
    },
    holds: [decided('BW-2026-1008-A', 'release', 'Released after 100 % inspection of the segregated capsules.')],
  },
  {
    key: 'unjoined-1013',
    path: 'closed',
    raisedBy: supervisor,
    occurredAt: '2026-10-13T18:00',
    defect: 'unjoined_open',
    lot: 'BW-2026-1013-B',
    title: 'Open capsules in humid afternoon, Filling Room B',
    whatHappened: 'Caps not locked on about 1 % of capsules; room humidity logger read 62 % RH against a 45 % limit.',
    immediateActions: 'Dehumidifier restarted (tripped breaker), capsules from the afternoon segregated.',
    segregated: true,
    affected: 8_000,
    sample: '200 capsules, 2 open',
    triage: { s: 6, o: 3, d: 4, investigator: investigator },
    investigation: {
      report: 'Dehumidifier breaker tripped at 13:20; no alarm reached the floor. Soft shells did not lock. Segregated capsules 100 % inspected.',
      category: 'environment',
      rootCause: 'Room humidity out of range after an unnoticed dehumidifier trip.',
      productImpact: 'Open capsules removed; moisture content of the fill checked in limits.',
      capaRequired: true,
    },
    holds: [decided('BW-2026-1013-B', 'release', 'Released after 100 % inspection and a loss-on-drying check in limits.')],
  },
  {
    key: 'broken-1015',
    path: 'closed',
    raisedBy: operator2,
    occurredAt: '2026-10-15T16:05',
    defect: 'broken_body',
    lot: 'BW-2026-1015-B',
    title: 'Broken bodies on ring BWR-0302 again',
    whatHappened: 'Broken bodies from segment 3 of the dented ring BWR-0302, the segment dressed in August.',
    immediateActions: 'Capsules since the last good check segregated; ring inspected and run on after cleaning.',
    segregated: true,
    affected: 3_000,
    sample: '100 capsules, 3 broken',
    triage: { s: 7, o: 4, d: 4, investigator: investigator2 },
    investigation: {
      report: 'Powder build-up in the dressed bores of segment 3 caught bodies. Segregated capsules 100 % inspected. Ring replacement ordered; until it arrives the ring is cleaned every two hours.',
      category: 'machine',
      rootCause: 'Dented and dressed segment collects powder and catches bodies.',
      productImpact: 'Broken bodies removed; AQL passed.',
      capaRequired: true,
    },
    holds: [decided('BW-2026-1015-B', 'release', 'Released after 100 % inspection of the segregated capsules.', aqlGeneral)],
  },
  {
    key: 'light-fill-1021',
    path: 'closed',
    raisedBy: operator,
    occurredAt: '2026-10-21T14:20',
    defect: 'light_fill',
    lot: 'BW-2026-1021-B',
    title: 'Light fills when hopper ran low, Filler 2',
    whatHappened: 'Weight check at 13:50 low (mean 402 mg against 450 mg) with the hopper nearly empty during a powder delay.',
    immediateActions: 'Hopper refilled, capsules since the last good check segregated.',
    segregated: true,
    affected: 4_500,
    sample: '20 capsules, weighed individually',
    triage: { s: 7, o: 4, d: 3, investigator: investigator },
    rework: 'The report does not say how many segregated capsules were rejected at weight sorting, or give the hopper level limit. Add both.',
    investigation: {
      report: 'Powder delivery from the blending room was 40 minutes late. The hopper ran below the minimum level marking. Segregated capsules weight-sorted: 655 rejected. Minimum level now checked at each weight check.',
      category: 'method',
      rootCause: 'Running below the hopper minimum level during a powder delay.',
      productImpact: 'Light capsules removed by weight sorting.',
      capaRequired: false,
    },
    holds: [decided('BW-2026-1021-B', 'release', 'Released after weight sorting; 655 capsules rejected.')],
  },
  {
    key: 'broken-1027',
    path: 'investigation',
    raisedBy: operator2,
    occurredAt: '2026-10-27T15:30',
    defect: 'broken_body',
    lot: 'BW-2026-1027-B',
    title: 'Broken bodies in naltrexone batch on ring BWR-0302',
    whatHappened:
      'Broken and crushed bodies from segment 3 of ring BWR-0302 during the compounded naltrexone run. Third event on this ring.',
    immediateActions: 'Line stopped, whole batch held, ring BWR-0302 tagged out pending decision.',
    lineStopped: true,
    segregated: true,
    affected: 75_000,
    sample: '100 capsules, 5 broken',
    triage: { s: 7, o: 6, d: 4, investigator: investigator },
    holds: [hold('BW-2026-1027-B', 're_inspect', 'Recommend 100 % inspection and a content uniformity check before any release.')],
  },
  {
    key: 'heavy-1103',
    path: 'approval',
    raisedBy: operator,
    occurredAt: '2026-11-03T13:15',
    defect: 'heavy_fill',
    lot: 'BW-2026-1103-A',
    title: 'Heavy fills on Filler 4 after auger speed change',
    whatHappened: 'Mean 328 mg against 300 mg target on two checks after the auger speed was raised to keep up with the schedule.',
    immediateActions: 'Auger speed returned to the validated setting; heavy capsules removed by the weight sorter.',
    affected: 3_000,
    sample: '2 × 20 capsules',
    triage: { s: 6, o: 3, d: 3, investigator: investigator2 },
    investigation: {
      report: 'Auger speed was changed outside the validated range. Weight sorter removed capsules above 330 mg; uniformity of mass on the sorted capsules passed.',
      category: 'people',
      rootCause: 'Operator raised auger speed outside the validated range to make up time.',
      productImpact: 'None after weight sorting.',
      capaRequired: true,
    },
  },
  {
    key: 'unseparated-1105',
    path: 'approval',
    raisedBy: operator2,
    occurredAt: '2026-11-05T17:00',
    defect: 'unseparated',
    lot: 'BW-2026-1105-A',
    title: 'Unseparated capsules, vacuum pump running hot',
    whatHappened: 'Unseparated capsules in the reject chute; vacuum 7.5 inHg and the pump housing hot.',
    immediateActions: 'Pump swapped for the spare; vacuum 10 inHg. Rejects kept apart.',
    affected: 900,
    sample: 'Reject chute contents, 64 unseparated',
    triage: { s: 5, o: 4, d: 3, investigator: investigator },
    investigation: {
      report: 'Pump vanes worn. Rejects were caught in the chute and none reached the finished containers (AQL on containers: none found).',
      category: 'machine',
      rootCause: 'Worn vacuum pump vanes.',
      productImpact: 'None: unseparated capsules caught by the reject chute.',
      capaRequired: false,
    },
  },
  {
    key: 'light-fill-1110',
    path: 'approval',
    raisedBy: operator,
    occurredAt: '2026-11-10T14:45',
    defect: 'light_fill',
    lot: 'BW-2026-1110-A',
    title: 'Light fills after turmeric extract lot change',
    whatHappened: 'After loading the new extract lot, 5 of 20 capsules below 450 mg (lowest 431 mg). The new lot flows poorly and rat-holes in the hopper.',
    immediateActions: 'Line stopped, batch held, agitator speed raised within its range, fill re-set.',
    lineStopped: true,
    segregated: true,
    affected: 120_000,
    sample: '20 capsules, weighed individually',
    triage: { s: 7, o: 5, d: 3, investigator: investigator2 },
    investigation: {
      report: 'New extract lot has tapped density 0.52 g/mL against 0.60 g/mL, and poorer flow. Whole batch weight-sorted; 2,950 rejected. Uniformity of mass on 3 × 20 after sorting passed.',
      category: 'material',
      rootCause: 'Lower density and poorer flow of the new extract lot; fill settings not checked at the lot change.',
      productImpact: 'Light capsules removed by weight sorting.',
      capaRequired: true,
    },
    holds: [hold('BW-2026-1110-A', 'release', 'Recommend release after the weight sort.')],
  },
  {
    key: 'light-fill-1110-dup',
    path: 'cancelled',
    raisedBy: operator2,
    occurredAt: '2026-11-10T15:05',
    defect: 'light_fill',
    lot: 'BW-2026-1110-A',
    title: 'Low weights turmeric Filler 1',
    whatHappened: 'Low weights at the 14:30 check.',
    cancel: { reason: 'Duplicate of {dup:light-fill-1110}: same check, raised again after the handover.', from: 'reported', by: investigator },
  },
  {
    key: 'telescoped-1112',
    path: 'approval',
    raisedBy: supervisor,
    occurredAt: '2026-11-12T16:30',
    defect: 'telescoped',
    lot: 'BW-2026-1112-B',
    title: 'Telescoped capsules on BWR-0401 again',
    whatHappened: 'Telescoped capsules on the worn ring BWR-0401 within the narrowed pressure band.',
    immediateActions: 'Sorter reject rate watched; ring replacement requested.',
    affected: 700,
    sample: '400 capsules, 1 telescoped',
    triage: { s: 6, o: 5, d: 3, investigator: investigator },
    investigation: {
      report: 'The narrowed pressure band is not enough with the ring as worn as it is now. Ring replacement is the action.',
      category: 'machine',
      rootCause: 'Ring BWR-0401 worn beyond what a pressure setting can compensate.',
      productImpact: 'Telescoped capsules removed by sorting; AQL passed.',
      capaRequired: true,
    },
  },
  {
    key: 'heavy-1109',
    path: 'investigation',
    raisedBy: operator,
    occurredAt: '2026-11-09T12:50',
    defect: 'heavy_fill',
    lot: 'BW-2026-1109-A',
    title: 'Heavy fills, probiotic blend, Filler 3',
    whatHappened: 'Mean 372 mg against 350 mg target; powder looked denser after the blend sat over the weekend.',
    affected: 1_500,
    sample: '20 capsules, weighed individually',
    triage: { s: 6, o: 3, d: 3, investigator: investigator2 },
  },
  {
    key: 'unseparated-1113',
    path: 'investigation',
    raisedBy: operator2,
    occurredAt: '2026-11-13T14:10',
    defect: 'unseparated',
    lot: 'BW-2026-1113-A',
    title: 'Unseparated capsules on Filler 3, low vacuum',
    whatHappened: 'Unseparated capsules in finished container 2. Vacuum 6.5 inHg.',
    immediateActions: 'Vacuum filter replaced; containers 1-2 held aside for inspection.',
    segregated: true,
    affected: 1_000,
    sample: 'Container 2: 4 unseparated of 500',
    triage: { s: 5, o: 5, d: 4, investigator: investigator },
    rework: 'The vacuum log for the shift and the pump service record are missing; attach them and say when the filter was last changed.',
    investigation: {
      report:
        'Filter loaded again before its scheduled change, as in July. Containers 1-2 inspected 100 %. The corrective action belongs to the open CAPA on the Filler 3 vacuum raised in July, whose effectiveness check this recurrence answers; no new CAPA.',
      category: 'machine',
      rootCause: 'Filter change interval too long for fine powders.',
      productImpact: 'Unseparated capsules removed from containers 1-2.',
      capaRequired: false,
    },
  },
  {
    key: 'cracked-1116',
    path: 'investigation',
    raisedBy: supervisor,
    occurredAt: '2026-11-16T15:40',
    defect: 'cracked_shell',
    lot: 'BW-2026-1116-A',
    title: 'Brittle shells cracking, Filling Room A at 24 % RH',
    whatHappened: 'Cracked caps at closing; room humidity 24 % RH, below the 35 % lower limit, after the heating came on.',
    immediateActions: 'Humidifier set up; shells stored in the room moved to sealed bins.',
    affected: 2_000,
    sample: '200 capsules, 5 cracked',
    triage: { s: 6, o: 4, d: 4, investigator: investigator2 },
  },
  {
    key: 'light-fill-1117',
    path: 'investigation',
    raisedBy: operator,
    occurredAt: '2026-11-17T13:25',
    defect: 'light_fill',
    lot: 'BW-2026-1117-A',
    title: 'Light fills after magnesium glycinate lot change',
    whatHappened: 'Second lot change of magnesium glycinate this year with light fills at the first check (3 of 20 below 576 mg).',
    immediateActions: 'Fill re-set before continuing; capsules since the lot change weight-sorted.',
    segregated: true,
    affected: 3_500,
    sample: '20 capsules, weighed individually',
    triage: { s: 7, o: 5, d: 3, investigator: investigator },
  },
  {
    key: 'double-cap-1119',
    path: 'investigation',
    raisedBy: operator2,
    occurredAt: '2026-11-19T16:15',
    defect: 'double_cap',
    lot: 'BW-2026-1119-A',
    title: 'Double caps on Filler 2 after jam',
    whatHappened: 'Double caps after a rectifier jam, although the rectifier was emptied as the new instruction says.',
    affected: 500,
    sample: '500 capsules, 2 double caps',
    triage: { s: 5, o: 3, d: 4, investigator: investigator2 },
  },
  {
    key: 'powder-shell-1120',
    path: 'triage_classified',
    raisedBy: operator,
    occurredAt: '2026-11-20T14:00',
    defect: 'powder_outside',
    lot: 'BW-2026-1120-A',
    title: 'Powder on shells, probiotic blend',
    whatHappened: 'Light dusting of powder on caps after the polisher.',
    affected: 300,
    triage: { s: 3, o: 4, d: 2, investigator: investigator },
  },
  {
    key: 'cracked-1120',
    path: 'triage_classified',
    raisedBy: operator2,
    occurredAt: '2026-11-20T17:20',
    defect: 'cracked_shell',
    lot: 'BW-2026-1120-B',
    title: 'Cracked bodies on Filler 2, ring BWR-0203',
    whatHappened: 'Cracked bodies, random segments; room at 28 % RH.',
    affected: 800,
    sample: '100 capsules, 3 cracked',
    triage: { s: 6, o: 4, d: 4, investigator: investigator2 },
  },
  {
    key: 'dented-1111',
    path: 'triage_open',
    raisedBy: supervisor,
    occurredAt: '2026-11-11T18:30',
    defect: 'dented_shell',
    lot: 'BW-2026-1111-B',
    title: 'Dented caps found at packing',
    whatHappened: 'Packing found dented caps in two containers.',
    affected: 40,
  },
  {
    key: 'unjoined-1124',
    path: 'triage_classified',
    raisedBy: operator,
    occurredAt: '2026-11-24T13:40',
    defect: 'unjoined_open',
    lot: 'BW-2026-1124-A',
    title: 'Caps not locked on Filler 1',
    whatHappened: 'Some capsules not locked after closing; closing station height checked and found in setting.',
    affected: 250,
    sample: '200 capsules, 2 open',
    triage: { s: 6, o: 3, d: 4, investigator: investigator },
  },
  {
    key: 'heavy-1119',
    path: 'triage_open',
    raisedBy: operator2,
    occurredAt: '2026-11-23T15:15',
    defect: 'heavy_fill',
    lot: 'BW-2026-1119-A',
    title: 'Heavy fill on Filler 2, magnesium glycinate',
    whatHappened: 'One weight check with mean 7 % above target; next check normal.',
    sample: '20 capsules, weighed individually',
  },
  {
    key: 'dented-1120',
    path: 'reported',
    raisedBy: operator,
    occurredAt: '2026-11-25T14:05',
    defect: 'dented_shell',
    lot: 'BW-2026-1120-A',
    title: 'Dented bodies in probiotic batch',
    whatHappened: 'Dented bodies on a few capsules in the last container.',
    affected: 20,
  },
  {
    key: 'light-fill-1126',
    path: 'reported',
    raisedBy: operator2,
    occurredAt: '2026-11-26T13:30',
    defect: 'light_fill',
    lot: 'BW-2026-1126-A',
    title: 'Light fill at start-up, Filler 3',
    whatHappened: 'First check after start-up: 2 of 20 below the lower limit.',
    immediateActions: 'Start-up capsules segregated; fill re-set.',
    segregated: true,
    affected: 600,
    sample: '20 capsules, weighed individually',
  },
  {
    key: 'unseparated-1125',
    path: 'reported',
    raisedBy: supervisor,
    occurredAt: '2026-11-25T16:50',
    defect: 'unseparated',
    lot: 'BW-2026-1119-A',
    title: 'Unseparated capsules, Filler 2',
    whatHappened: 'Unseparated capsules in the reject chute; vacuum 8 inHg.',
    affected: 120,
  },
  {
    key: 'print-1126',
    path: 'reported',
    raisedBy: operator,
    occurredAt: '2026-11-26T17:10',
    defect: 'print_colour',
    lot: 'BW-2026-1120-B',
    title: 'Off-colour print band on a shell carton',
    whatHappened: 'Print band lighter than the standard on capsules from one carton.',
    affected: 150,
  },
  {
    key: 'broken-1124-draft',
    path: 'draft',
    raisedBy: operator,
    occurredAt: '2026-11-24T17:55',
    defect: 'broken_body',
    lot: 'BW-2026-1124-B',
    title: 'Broken bodies on BWR-0302, elderberry',
    whatHappened: 'Broken bodies from segment 3 again. Still writing this up.',
    segregated: true,
    holds: [hold('BW-2026-1124-B', null, null)],
  },
  {
    key: 'powder-shell-1126-draft',
    path: 'draft',
    raisedBy: operator2,
    occurredAt: '2026-11-26T15:45',
    defect: 'powder_outside',
    lot: 'BW-2026-1126-A',
    title: 'Powder on shells',
    whatHappened: 'Powder on the caps of capsules after the polisher, Filler 3.',
  },
  {
    key: 'light-fill-1127-draft',
    path: 'draft',
    raisedBy: supervisor,
    occurredAt: '2026-11-27T14:20',
    defect: 'light_fill',
    lot: 'BW-2026-1127-A',
    title: 'Light fills after ashwagandha lot change',
    whatHappened: 'After the hopper was refilled from the new powder lot, the first check was light (mean 421 mg against 450 mg).',
    immediateActions: 'Fill re-set; capsules since the refill segregated.',
    segregated: true,
    affected: 1_800,
  },
  {
    key: 'vacuum-fil04-draft',
    path: 'draft',
    raisedBy: operator,
    occurredAt: '2026-11-25T12:10',
    defect: null,
    lot: null,
    machine: 'BW-FIL-04',
    title: 'Vacuum gauge low at start-up on Filler 4',
    whatHappened: 'Vacuum read 7 inHg at start-up before any batch was run.',
  },
  // Drafts their authors threw away. Last in the list, so the stories above keep their times.
  {
    key: 'spill-0818-discarded',
    path: 'discarded',
    raisedBy: operator2,
    occurredAt: '2026-08-18T14:35',
    defect: null,
    lot: 'BW-2026-0818-B',
    title: 'Capsules on the floor beside Filler 3',
    whatHappened: 'About two hundred filled capsules on the floor by the outfeed chute after the collection bin was changed.',
    discard: 'Not a deviation: spillage at a bin change, swept up as waste under the line clearance procedure and recorded in the batch record.',
  },
  {
    key: 'print-1007-discarded',
    path: 'discarded',
    raisedBy: operator,
    occurredAt: '2026-10-07T16:20',
    defect: 'print_colour',
    lot: 'BW-2026-1007-B',
    title: 'Faint print band on turmeric capsules',
    whatHappened: 'The print band looked faint under the bench lamp at the hourly check.',
    discard: 'Compared with the shell supplier’s reference card in daylight: the print matches. Nothing to report.',
  },
  {
    key: 'dented-1111-discarded',
    path: 'discarded',
    raisedBy: supervisor,
    occurredAt: '2026-11-11T18:30',
    defect: 'dented_shell',
    lot: 'BW-2026-1111-B',
    title: 'Dented caps at packing',
    whatHappened: 'Packing found dented caps in two containers.',
    discard: 'Started twice, on the packing-room tablet and on the line tablet; the report went in from the line tablet.',
  },
];

const minuteMs = 60_000;
const hourMs = 60 * minuteMs;
const dayMs = 24 * hourMs;
/** Nothing in the demo happens after the scenario's last day. */
const lastMoment = Date.parse(`${scenarioEnd}T23:00:00.000Z`);
/** How long before signing it the investigator saves the finished investigation, when no CAPA story says. */
const defaultSaveLeadMinutes = 30;
/** The recommendations go in just before the signature that covers them. */
const recommendationLeadMinutes = 5;

const toIso = (ms: number) => new Date(ms).toISOString();

/** The next weekday at a UTC hour in the site's day shift (America/Chicago, 06:00-14:30). */
function nextWorkday(fromMs: number, rand: Prng, days = 1): number {
  let ms = Math.floor(fromMs / dayMs) * dayMs + days * dayMs;
  while ([0, 6].includes(new Date(ms).getUTCDay())) ms += dayMs;
  return ms + randomInt(rand, 13 * 60, 19 * 60) * minuteMs;
}

const emptyColumns = (story: Story): PlannedColumns => ({
  number: null,
  title: story.title,
  whatHappened: story.whatHappened,
  immediateActions: story.immediateActions ?? null,
  lineStopped: story.lineStopped ?? false,
  capsulesSegregated: story.segregated ?? false,
  affectedCount: story.affected ?? null,
  sampleDescription: story.sample ?? null,
  classification: null,
  classificationReason: null,
  severity: null,
  occurrence: null,
  detection: null,
  rpn: null,
  investigationReport: null,
  fiveWhys: null,
  causeAnalysis: null,
  rootCauseCategory: null,
  rootCause: null,
  productImpact: null,
  capaRequired: null,
  closureJustification: null,
  cancelReason: null,
  investigator: null,
  owner: story.raisedBy,
  occurredAt: `${story.occurredAt}:00.000Z`,
  reportedAt: null,
  dueAt: null,
  closedAt: null,
});

/*
 * A disposition recorded through the product carries an ISO 2859-1 plan only for a re-inspection,
 * which the product works out from the lot size; the plan a story names for another disposition goes
 * into its note instead.
 */
function dispositionNote(h: PlannedHold): string | null {
  if (!h.samplingPlan || h.recommendedDisposition === 're_inspect') return h.dispositionNote;
  const plan = `Inspected to ${h.samplingPlan}.`;
  return h.dispositionNote ? `${h.dispositionNote} ${plan}` : plan;
}

/**
 * Builds the demo deviations from the stories: each step dated, checked against the machine and the
 * kind's segregation of duties with the demo user who takes it, and numbered in order of reporting.
 * Pure and deterministic. `saveLeads` are the minutes between the investigator saving the finished
 * investigation (which opens the CAPA it asks for) and signing it, per deviation that raises a CAPA.
 */
export function buildDemoDeviations(
  scenario: DemoScenario,
  saveLeads: ReadonlyMap<string, number> = capaSaveLeadMinutes(),
): PlannedDeviation[] {
  const rand = mulberry32(0xdec0_2026);
  const people = new Map(scenario.users.map((u, i) => [u.email, { id: i + 1, role: u.role }]));
  const defects = new Map(scenario.defects.map((d) => [d.code, d]));
  const lots = new Map(scenario.batches.map((b) => [b.lotNumber, b]));
  for (const key of saveLeads.keys()) {
    const story = deviationStories.find((s) => s.key === key);
    if (!story?.investigation?.capaRequired) throw new Error(`demo CAPA raised from ${key}, whose investigation does not ask for one`);
  }

  const planned = deviationStories.map((story) => {
    const batch = story.lot === null ? null : lots.get(story.lot);
    if (batch === undefined) throw new Error(`demo deviation ${story.key}: no batch ${story.lot}`);
    if (story.investigation?.capaRequired && !saveLeads.has(story.key) && story.path !== 'investigation') {
      throw new Error(`demo deviation ${story.key}: its investigation asks for a CAPA, which no CAPA story tells`);
    }
    const steps: PlannedStep[] = [];
    const holds = story.holds ?? [];
    let columns = emptyColumns(story);
    let state: DeviationState = 'draft';
    let at = Date.parse(columns.occurredAt) + randomInt(rand, 15, 50) * minuteMs;
    steps.push({ event: 'create', by: story.raisedBy, at: toIso(at), fromState: null, toState: 'draft', reason: null, changes: {}, signature: null });

    const personOf = (email: string) => {
      const person = people.get(email);
      if (!person) throw new Error(`demo deviation ${story.key}: no demo user ${email}`);
      return person;
    };
    const notAfterTheEnd = (event: string, ms: number) => {
      if (ms > lastMoment) throw new Error(`demo deviation ${story.key}: ${event} falls after ${scenarioEnd}`);
    };
    const take = (event: string, by: string, reason: string | null, changes: Partial<PlannedColumns> = {}) => {
      const person = personOf(by);
      const snapshot = resolveSnapshot(deviationMachine, state, {
        raisedBy: personOf(story.raisedBy).id,
        investigatorId: columns.investigator === null ? null : personOf(columns.investigator).id,
        classification: columns.classification,
        // Dispositions are recorded before closing; the stories give every held batch one by then.
        heldBatchesWithoutDisposition: 0,
      });
      const plan = planEvent(deviationMachine, snapshot, { type: event, actor: person });
      if (!plan.ok) throw new Error(`demo deviation ${story.key}: ${by} cannot ${event} in ${state} (${plan.problem})`);
      // lib/deviations/kind.ts: nobody approves, closes, returns or cancels what they raised or investigated.
      if (['approve', 'close_minor', 'return_for_rework', 'cancel'].includes(event) && (by === story.raisedBy || by === columns.investigator)) {
        throw new Error(`demo deviation ${story.key}: ${by} may not ${event} a deviation they raised or investigated`);
      }
      if (plan.rules.reasonRequired && !reason) throw new Error(`demo deviation ${story.key}: ${event} needs a reason`);
      notAfterTheEnd(event, at);
      const next = plan.nextState as DeviationState;
      steps.push({ event, by, at: toIso(at), fromState: state, toState: next, reason, changes, signature: plan.rules.signature });
      columns = { ...columns, ...changes };
      state = next;
    };
    const edit = (event: string, by: string, when: number, changes: Partial<PlannedColumns>, disposition?: PlannedStep['disposition']) => {
      notAfterTheEnd(event, when);
      steps.push({ event, by, at: toIso(when), fromState: state, toState: state, reason: null, changes, signature: null, ...(disposition ? { disposition } : {}) });
      columns = { ...columns, ...changes };
    };
    /** Each held batch's disposition as recorded for it (the recommendation, or the decision it became). */
    const recordDispositions = (by: string, when: number, which: 'recommended' | 'decided') => {
      for (const h of holds) {
        const disposition = which === 'decided' ? (h.disposition ?? h.recommendedDisposition) : (h.recommendedDisposition ?? h.disposition);
        if (disposition === null) continue;
        edit('record_disposition', by, when, {}, { lot: h.lot, disposition, note: dispositionNote(h) });
      }
    };

    if (story.path === 'draft') return finish(story, batch, columns, state, steps);
    if (story.path === 'discarded') {
      at += randomInt(rand, 20, 90) * minuteMs;
      take('discard', story.raisedBy, story.discard ?? null);
      return finish(story, batch, columns, state, steps);
    }

    at += randomInt(rand, 10, 40) * minuteMs;
    take('submit', story.raisedBy, null, { reportedAt: toIso(at) });
    const reportedOn = toIso(at).slice(0, 10);

    if (story.cancel?.from === 'reported') {
      at += randomInt(rand, 2, 5) * hourMs;
      take('cancel', story.cancel.by, story.cancel.reason, { cancelReason: story.cancel.reason, closedAt: toIso(at) });
      return finish(story, batch, columns, state, steps);
    }
    if (story.path === 'reported') return finish(story, batch, columns, state, steps);

    const triager = story.triage?.investigator === investigator ? investigator2 : investigator;
    at = Math.min(nextWorkday(at, rand), lastMoment - 2 * hourMs);
    take('start_triage', story.cancel ? investigator2 : triager, null);
    if (story.cancel) {
      at += randomInt(rand, 1, 3) * hourMs;
      take('cancel', story.cancel.by, story.cancel.reason, { cancelReason: story.cancel.reason, closedAt: toIso(at) });
      return finish(story, batch, columns, state, steps);
    }
    if (story.path === 'triage_open') return finish(story, batch, columns, state, steps);

    const t = story.triage;
    if (!t) throw new Error(`demo deviation ${story.key}: the ${story.path} path needs a triage`);
    const defect = story.defect === null ? undefined : defects.get(story.defect);
    if (!defect) throw new Error(`demo deviation ${story.key}: a triaged deviation needs a known defect`);
    const result = classify({
      defaultClassification: defect.defaultClassification,
      severity: t.s,
      occurrence: t.o,
      detection: t.d,
      chosen: t.chosen?.classification ?? null,
    });
    at += randomInt(rand, 20, 70) * minuteMs;
    edit('record_triage', triager, at, {
      classification: result.classification,
      classificationReason: t.chosen ? `${result.reason} ${t.chosen.why}` : result.reason,
      severity: t.s,
      occurrence: t.o,
      detection: t.d,
      rpn: rpn(t.s, t.o, t.d),
      investigator: t.investigator,
      owner: t.investigator,
      dueAt: `${dueDateFor(reportedOn, result.classification, defaultDueDays)}T00:00:00.000Z`,
    });
    if (story.path === 'triage_classified') return finish(story, batch, columns, state, steps);

    if (story.path === 'closed_minor') {
      if (!story.justification) throw new Error(`demo deviation ${story.key}: a minor closure needs a justification`);
      at = nextWorkday(at, rand);
      // At a minor closure the QA approver decides each held batch's disposition, just before signing.
      recordDispositions(approver, at - minuteMs, 'decided');
      take('close_minor', approver, story.justification, { closureJustification: story.justification, closedAt: toIso(at) });
      return finish(story, batch, columns, state, steps);
    }

    at += randomInt(rand, 5, 25) * minuteMs;
    take('assign_investigation', triager, null);
    if (story.path === 'investigation' && !story.rework) {
      // Under way: the investigator has saved notes, the first whys and a few causes ruled out, and
      // recommended a disposition for a held batch the day after the investigation opened.
      const opened = at;
      at = Math.min(at + 3 * hourMs, lastMoment);
      edit('save_investigation', t.investigator, at, investigationInProgress(story.defect));
      recordDispositions(t.investigator, Math.min(opened + dayMs, lastMoment), 'recommended');
      return finish(story, batch, columns, state, steps);
    }

    const inv = story.investigation;
    if (!inv) throw new Error(`demo deviation ${story.key}: the ${story.path} path needs an investigation`);
    const findings: Partial<PlannedColumns> = {
      ...completeInvestigation(story.defect, inv),
      rootCauseCategory: inv.category,
      rootCause: inv.rootCause,
      productImpact: inv.productImpact,
      capaRequired: inv.capaRequired,
    };
    /** The investigator saves the investigation, recommends the dispositions, then signs it. */
    const signInvestigation = (contents: Partial<PlannedColumns>, lead: number) => {
      edit('save_investigation', t.investigator, at - lead * minuteMs, contents);
      recordDispositions(t.investigator, at - recommendationLeadMinutes * minuteMs, 'recommended');
      take('submit_for_approval', t.investigator, null);
    };
    const recent = Date.parse(columns.occurredAt) > Date.parse('2026-11-01T00:00:00.000Z');
    at = nextWorkday(at, rand, story.investigationDays ?? (recent ? randomInt(rand, 2, 4) : randomInt(rand, 6, 16)));
    if (story.rework) {
      // The first submission lacked what the approver asks for; the findings were completed after.
      signInvestigation({ ...findings, ...firstSubmission(story.defect, inv) }, saveLeads.get(story.key) ?? defaultSaveLeadMinutes);
      at = nextWorkday(at, rand);
      take('return_for_rework', approver, story.rework);
      if (story.path === 'investigation') return finish(story, batch, columns, state, steps);
      at = nextWorkday(at, rand, recent ? 1 : randomInt(rand, 2, 4));
      edit('save_investigation', t.investigator, at - defaultSaveLeadMinutes * minuteMs, findings);
      take('submit_for_approval', t.investigator, null);
    } else {
      signInvestigation(findings, saveLeads.get(story.key) ?? defaultSaveLeadMinutes);
    }
    if (story.path === 'approval') return finish(story, batch, columns, state, steps);

    at = nextWorkday(at, rand, randomInt(rand, 1, 4));
    take('approve', approver, null, { closedAt: toIso(at) });
    return finish(story, batch, columns, state, steps);
  });

  // Numbers are given at submission, so in the order of reporting.
  const byReporting = planned
    .filter((d) => d.columns.reportedAt !== null)
    .sort((a, b) => a.columns.reportedAt!.localeCompare(b.columns.reportedAt!));
  const numbers = new Map<string, string>();
  byReporting.forEach((d, i) => numbers.set(d.key, formatRecordNumber(numberPrefixes.deviation, 2026, i + 1)));
  const withNumber = (text: string | null) => text?.replace(/\{dup:([\w-]+)\}/g, (_m, key: string) => numbers.get(key) ?? key) ?? null;

  return planned
    .map((d) => {
      const number = numbers.get(d.key) ?? null;
      const steps = d.steps.map((s) => {
        const changes = { ...s.changes, ...(s.event === 'submit' ? { number } : {}) };
        if (changes.cancelReason) changes.cancelReason = withNumber(changes.cancelReason);
        return { ...s, reason: withNumber(s.reason), changes };
      });
      return { ...d, columns: { ...d.columns, number, cancelReason: withNumber(d.columns.cancelReason) }, steps };
    })
    .sort((a, b) => a.columns.occurredAt.localeCompare(b.columns.occurredAt));
}

function finish(
  story: Story,
  batch: DemoScenario['batches'][number] | null,
  columns: PlannedColumns,
  status: DeviationState,
  steps: PlannedStep[],
): PlannedDeviation {
  return {
    key: story.key,
    status,
    raisedBy: story.raisedBy,
    defectCode: story.defect,
    lot: story.lot,
    machineAssetTag: batch?.machineAssetTag ?? story.machine ?? null,
    ringSerial: batch?.ringSerial ?? null,
    holds: story.holds ?? [],
    columns,
    steps,
  };
}
