import { eq, inArray, sql } from 'drizzle-orm';
import { type FieldChange, diffFields, writeDemoAuditAt } from '../../lib/audit';
import { sqlUtc } from '../../lib/audit/hash';
import { roleLabels } from '../../lib/auth/roles';
import { type CapaRow, capaAuditFields, capaKind } from '../../lib/capa/kind';
import type { CapaActionCategory, CapaActionKind } from '../../lib/capa/labels';
import { type RecurrenceCriterion, serializeRecurrenceCriterion } from '../../lib/capa/schemas';
import { formatRecordNumber } from '../../lib/records/number-format';
import { numberPrefixes } from '../../lib/records/types';
import { planEvent, resolveSnapshot } from '../../lib/records/workflow';
import { loadRelated, signedContentOf } from '../../lib/records/write-path';
import { signatureContentHash, signatureManifestHash } from '../../lib/signatures/hash';
import type { SignatureMeaning } from '../../lib/signatures/meanings';
import { type CapaEventType, capaMachine } from '../../workflows/capa';
import type { Tx } from '../../db/client';
import { capaActions, capas, capsuleDefects, deviations, fillingRings, machines, recordLinks, signatures, stateHistory, users } from '../../db/schema';
import { buildDemoDeviations } from './deviations';
import { mulberry32, randomInt } from './prng';
import type { DemoScenario } from './scenario';

/*
 * Demo CAPAs: one for each demo deviation whose investigation said a CAPA is needed, told the way it
 * would have gone at Brackwater, in every state: closed as effective (light fills after a powder lot
 * change, the cracked ring BWR-0104), back in planning after a "not effective" check and now in its
 * second round (unseparated capsules at low vacuum recurred in November), in the effectiveness check
 * (heavy fills on Filler 3, where a new heavy-fill deviation shows as a recurrence; double caps on
 * Filler 1 with none), in implementation, plan approved, being planned, just raised from an
 * investigation, and one cancelled as superseded. Each step is checked against the CAPA machine with
 * the demo user who took it and written as the write path writes it (state history, audit entries
 * with their old → new values, signatures), dated when it happened. Numbers CAPA-2026-0001... are
 * given in order of creation through the record counter, so the next live CAPA continues the sequence.
 */

const investigator = 'investigator@brackwater.example';
const investigator2 = 'investigator2@brackwater.example';
const approver = 'approver@brackwater.example';
const supervisor = 'supervisor@brackwater.example';
const operator = 'operator@brackwater.example';
const operator2 = 'operator2@brackwater.example';

interface PlannedAction {
  kind: CapaActionKind;
  category: CapaActionCategory;
  description: string;
  owner: string;
  due: string;
  /** Completed: when, and the evidence. */
  done?: { at: string; evidence: string };
}

interface Round {
  actions: PlannedAction[];
  /** When the owner added the actions and wrote the plan. */
  plannedAt: string;
  approvedAt?: string;
  startedAt?: string;
  /** The effectiveness check opened, by whom. */
  checkOpened?: { at: string; by: string; reason?: string };
  outcome?: { effective: true; at: string } | { effective: false; at: string; reason: string };
}

interface CapaStory {
  key: string;
  /** The demo deviation it was raised from (lib's deviation story key). */
  deviation: string;
  owner: string;
  title: string;
  problem: string;
  rootCause?: string;
  criteria?: string;
  criterion?: { defect: string; machine?: string; ring?: string; batches?: number; days?: number };
  /** Days after creation the CAPA is due. */
  dueDays: number;
  rounds: Round[];
  cancel?: { at: string; by: string; reason: string };
  approvalRequestedAt?: string;
}

const stories: readonly CapaStory[] = [
  {
    key: 'light-fill-0709',
    deviation: 'light-fill-0709',
    owner: investigator,
    title: 'Check fill settings at every powder lot change',
    problem: 'Light fills on Filler 1 after a change to a magnesium glycinate lot of lower density; the fill settings were not checked at the lot change.',
    criteria: 'No light-fill deviations on Filler 1 over the next 10 batches after the new lot-change check is in use.',
    criterion: { defect: 'light_fill', machine: 'BW-FIL-01', batches: 10 },
    dueDays: 60,
    rounds: [
      {
        plannedAt: '2026-07-24T14:10',
        actions: [
          {
            kind: 'corrective',
            category: 'procedure',
            description: 'Add a fill-weight check and tapped-density comparison to the lot-change step of the filling procedure.',
            owner: investigator,
            due: '2026-08-07',
            done: { at: '2026-08-05T15:20', evidence: 'Filling procedure revised (revision 7, effective 2026-08-05): lot change now requires 20-capsule weight check and density comparison before restart.' },
          },
          {
            kind: 'preventive',
            category: 'training',
            description: 'Train all filler operators on the revised lot-change step.',
            owner: supervisor,
            due: '2026-08-14',
            done: { at: '2026-08-12T19:00', evidence: 'Training records for 9 operators signed 2026-08-10 to 2026-08-12; attendance sheet in the training file.' },
          },
        ],
        approvedAt: '2026-07-27T15:05',
        startedAt: '2026-07-28T13:30',
        checkOpened: { at: '2026-10-06T14:00', by: investigator },
        outcome: { effective: true, at: '2026-10-07T16:10' },
      },
    ],
  },
  {
    key: 'unseparated-0716',
    deviation: 'unseparated-0716',
    owner: investigator2,
    title: 'Keep Filler 3 vacuum in range with fine powders',
    problem: 'Unseparated capsules reached finished containers when the vacuum filter on Filler 3 loaded with ascorbic acid fines before its scheduled change.',
    criteria: 'No unseparated-capsule deviations on Filler 3 for 60 days after the actions are completed.',
    criterion: { defect: 'unseparated', machine: 'BW-FIL-03', days: 60 },
    dueDays: 75,
    rounds: [
      {
        plannedAt: '2026-08-03T14:30',
        actions: [
          {
            kind: 'corrective',
            category: 'machine_setting',
            description: 'Change the Filler 3 vacuum filter every 4 hours when running fine powders (was every shift).',
            owner: supervisor,
            due: '2026-08-10',
            done: { at: '2026-08-07T14:45', evidence: 'Maintenance plan for BW-FIL-03 updated; 4-hour filter change logged on the line checklist from 2026-08-07.' },
          },
        ],
        approvedAt: '2026-08-04T15:00',
        startedAt: '2026-08-05T13:15',
        checkOpened: { at: '2026-11-16T14:20', by: investigator2, reason: 'Opened early: unseparated capsules on Filler 3 again (DEV-2026-0026).' },
        outcome: {
          effective: false,
          at: '2026-11-17T15:40',
          reason: 'Unseparated capsules recurred on Filler 3 on 2026-11-13 with the 4-hour filter change in place: the filter interval alone does not hold the vacuum. A low-vacuum alarm is needed.',
        },
      },
      {
        plannedAt: '2026-11-18T15:10',
        actions: [
          {
            kind: 'corrective',
            category: 'machine_setting',
            description: 'Fit a low-vacuum alarm (below 8 inHg) to Filler 3 that stops the turret.',
            owner: supervisor,
            due: '2026-12-15',
          },
          {
            kind: 'preventive',
            category: 'procedure',
            description: 'Add a vacuum reading to every hourly in-process check on all fillers.',
            owner: investigator2,
            due: '2026-11-30',
            done: { at: '2026-11-25T16:30', evidence: 'In-process check form revised (revision 4): vacuum reading recorded hourly, action limit 9 inHg.' },
          },
        ],
        approvedAt: '2026-11-20T14:50',
        startedAt: '2026-11-23T13:20',
      },
    ],
  },
  {
    key: 'broken-0804',
    deviation: 'broken-0804',
    owner: investigator,
    title: 'Retire cracked ring BWR-0104 and inspect body plates at changeover',
    problem: 'A fatigue crack in the body plate of ring BWR-0104 crushed capsule bodies in one segment on Filler 1.',
    criteria: 'No broken-body deviations on Filler 1 for 30 days after the ring is retired and the changeover inspection is in use.',
    criterion: { defect: 'broken_body', machine: 'BW-FIL-01', days: 30 },
    dueDays: 45,
    rounds: [
      {
        plannedAt: '2026-08-13T14:00',
        actions: [
          {
            kind: 'corrective',
            category: 'ring_retirement',
            description: 'Retire ring BWR-0104 and fit a spare body plate set.',
            owner: supervisor,
            due: '2026-08-20',
            done: { at: '2026-08-17T13:40', evidence: 'BWR-0104 retired in the equipment register; spare set BWR-0102 fitted and checked for bore alignment.' },
          },
          {
            kind: 'preventive',
            category: 'procedure',
            description: 'Add a visual crack check of body and cap plates under the lamp to every changeover.',
            owner: investigator,
            due: '2026-08-21',
            done: { at: '2026-08-20T15:10', evidence: 'Changeover checklist revision 3 in use from 2026-08-20 with the plate crack check.' },
          },
        ],
        approvedAt: '2026-08-14T14:30',
        startedAt: '2026-08-14T16:00',
        checkOpened: { at: '2026-09-21T14:00', by: investigator },
        outcome: { effective: true, at: '2026-09-22T15:30' },
      },
    ],
  },
  {
    key: 'cracked-0812',
    deviation: 'cracked-0812',
    owner: investigator2,
    title: 'Protect filling rings from handling damage at changeover',
    problem: 'Ring BWR-0302 was dented at a changeover and cracked capsule bodies in the dented segment on Filler 3.',
    criteria: 'No cracked or broken bodies from BWR-0302 over the next 20 batches.',
    criterion: { defect: 'cracked_shell', ring: 'BWR-0302', batches: 20 },
    dueDays: 60,
    rounds: [
      {
        plannedAt: '2026-08-26T14:20',
        actions: [
          {
            kind: 'preventive',
            category: 'procedure',
            description: 'Use padded ring trolleys for every ring move and record ring condition at each changeover.',
            owner: supervisor,
            due: '2026-09-30',
          },
        ],
        approvedAt: '2026-08-27T15:00',
      },
    ],
    cancel: {
      at: '2026-11-06T14:30',
      by: investigator2,
      reason: 'Superseded by {capa:broken-1015}: broken bodies on BWR-0302 again, and that CAPA replaces the ring and changes ring handling for all fillers.',
    },
  },
  {
    key: 'heavy-0825',
    deviation: 'heavy-0825',
    owner: investigator,
    title: 'Validated settings on the batch record at every handover',
    problem: 'Heavy fills on Filler 3 after the tamping depth was changed at a shift handover without the validated value on the batch record.',
    criteria: 'No heavy-fill deviations on Filler 3 over the next 20 batches.',
    criterion: { defect: 'heavy_fill', machine: 'BW-FIL-03', batches: 20 },
    dueDays: 60,
    rounds: [
      {
        plannedAt: '2026-09-14T14:00',
        actions: [
          {
            kind: 'corrective',
            category: 'procedure',
            description: 'Print the validated tamping depth, dosing disc and auger settings on the batch record for each product.',
            owner: investigator,
            due: '2026-09-30',
            done: { at: '2026-09-28T15:00', evidence: 'Batch record templates for all seven products reissued with the validated settings block (change control CC-2026-031).' },
          },
          {
            kind: 'preventive',
            category: 'training',
            description: 'Brief every shift on setting changes at handover: only to validated values, recorded with the time.',
            owner: supervisor,
            due: '2026-10-05',
            done: { at: '2026-10-02T19:30', evidence: 'Shift briefings held 2026-09-30 to 2026-10-02, attendance recorded for all three shifts.' },
          },
        ],
        approvedAt: '2026-09-15T15:20',
        startedAt: '2026-09-16T13:10',
        checkOpened: { at: '2026-11-24T14:00', by: investigator, reason: 'Opened on demand for the quarterly review; 20 batches not yet reached.' },
      },
    ],
  },
  {
    key: 'telescoped-0903',
    deviation: 'telescoped-0903',
    owner: investigator2,
    title: 'Replace worn ring BWR-0401 on Filler 4',
    problem: 'Telescoped capsules on Filler 4: the worn ring BWR-0401 lets bodies sit low, and closing pressure at the top of its range pushes caps over them.',
    criteria: 'No telescoped-capsule deviations on Filler 4 over 20 batches after the new ring is fitted.',
    criterion: { defect: 'telescoped', machine: 'BW-FIL-04', batches: 20 },
    dueDays: 100,
    rounds: [
      {
        plannedAt: '2026-09-18T14:40',
        actions: [
          {
            kind: 'corrective',
            category: 'machine_setting',
            description: 'Narrow the closing pressure band for BWR-0401 to the middle third of the validated range until the ring is replaced.',
            owner: supervisor,
            due: '2026-09-25',
            done: { at: '2026-09-24T14:10', evidence: 'Pressure band for BWR-0401 set and locked; setting sheet signed by engineering 2026-09-24.' },
          },
          {
            kind: 'corrective',
            category: 'supplier_change',
            description: 'Order a replacement ring set from the second qualified ring maker (shorter lead time) and retire BWR-0401 on arrival.',
            owner: investigator2,
            due: '2026-11-20',
          },
        ],
        approvedAt: '2026-09-21T16:30',
        startedAt: '2026-09-22T13:30',
      },
    ],
  },
  {
    key: 'foreign-0916',
    deviation: 'foreign-0916',
    owner: investigator,
    title: 'Keep metal out of the capsules on Filler 1',
    problem: 'A worn auger bearing let the auger score the feed tube and shed metal flakes into a batch, which was rejected. The line has no metal detection.',
    criteria: 'No foreign-matter deviations on Filler 1 for 90 days after the actions are completed; metal detector challenge test passed at every start-up.',
    criterion: { defect: 'foreign_matter', machine: 'BW-FIL-01', days: 90 },
    dueDays: 120,
    rounds: [
      {
        plannedAt: '2026-11-20T14:30',
        actions: [
          {
            kind: 'preventive',
            category: 'procedure',
            description: 'Add auger bearing play and feed tube scoring to the monthly preventive maintenance of every filler.',
            owner: supervisor,
            due: '2026-12-18',
          },
          {
            kind: 'preventive',
            category: 'other',
            description: 'Install a capsule metal detector after the Filler 1 polisher, with a start-up challenge test.',
            owner: investigator,
            due: '2027-01-29',
          },
        ],
        approvedAt: '2026-11-26T15:10',
      },
    ],
  },
  {
    key: 'double-cap-1008',
    deviation: 'double-cap-1008',
    owner: investigator2,
    title: 'Empty the rectifier after every jam',
    problem: 'Double caps on Filler 1 after a rectifier jam was cleared by hand and loose caps left in the rectifier were fed again.',
    criteria: 'No double-cap deviations on Filler 1 over the next 10 batches.',
    criterion: { defect: 'double_cap', machine: 'BW-FIL-01', batches: 10 },
    dueDays: 45,
    rounds: [
      {
        plannedAt: '2026-10-22T14:00',
        actions: [
          {
            kind: 'corrective',
            category: 'procedure',
            description: 'Revise the jam clearance instruction: stop, empty the rectifier and the cap hopper outlet, then restart.',
            owner: investigator2,
            due: '2026-10-30',
            done: { at: '2026-10-28T15:30', evidence: 'Jam clearance instruction revision 2 posted at every filler from 2026-10-28.' },
          },
          {
            kind: 'preventive',
            category: 'training',
            description: 'Walk every operator through the revised jam clearance at their filler.',
            owner: operator,
            due: '2026-11-06',
            done: { at: '2026-11-04T18:45', evidence: 'All operators walked through at the line, 2026-11-02 to 2026-11-04; sign-off sheet filed.' },
          },
        ],
        approvedAt: '2026-10-23T14:40',
        startedAt: '2026-10-26T13:10',
        checkOpened: { at: '2026-11-25T14:30', by: investigator2 },
      },
    ],
  },
  {
    key: 'unjoined-1013',
    deviation: 'unjoined-1013',
    owner: investigator,
    title: 'Alarm on room humidity in Filling Room B',
    problem: 'Capsules did not lock in Filling Room B after the dehumidifier breaker tripped unnoticed and humidity rose to 62 % RH.',
    criteria: 'No unjoined-capsule deviations on Filler 4 for 30 days after the alarm is in use, and no humidity excursion longer than 15 minutes in the room log.',
    criterion: { defect: 'unjoined_open', machine: 'BW-FIL-04', days: 30 },
    dueDays: 60,
    rounds: [
      {
        plannedAt: '2026-11-03T14:20',
        actions: [
          {
            kind: 'corrective',
            category: 'machine_setting',
            description: 'Connect the Filling Room B humidity logger to the floor alarm panel at 50 % RH.',
            owner: supervisor,
            due: '2026-12-04',
          },
          {
            kind: 'preventive',
            category: 'procedure',
            description: 'Record room humidity at every hourly in-process check in both filling rooms.',
            owner: operator2,
            due: '2026-12-11',
          },
        ],
      },
    ],
    approvalRequestedAt: '2026-11-03T15:00',
  },
  {
    key: 'broken-1015',
    deviation: 'broken-1015',
    owner: investigator2,
    title: 'Replace ring BWR-0302 and change ring handling on every filler',
    problem: 'Broken bodies from the dressed segment of ring BWR-0302 on Filler 3, the third event on this ring.',
    dueDays: 60,
    rounds: [
      {
        plannedAt: '2026-11-05T14:30',
        actions: [
          {
            kind: 'corrective',
            category: 'ring_retirement',
            description: 'Retire ring BWR-0302 when the replacement set arrives; clean the dressed segment every two hours until then.',
            owner: supervisor,
            due: '2026-12-01',
          },
        ],
      },
    ],
  },
  { key: 'heavy-1103', deviation: 'heavy-1103', owner: investigator2, title: '', problem: '', dueDays: 60, rounds: [] },
  { key: 'light-fill-1110', deviation: 'light-fill-1110', owner: investigator2, title: '', problem: '', dueDays: 60, rounds: [] },
  { key: 'telescoped-1112', deviation: 'telescoped-1112', owner: investigator, title: '', problem: '', dueDays: 60, rounds: [] },
];

interface Person {
  id: number;
  name: string;
  title: string;
  role: keyof typeof roleLabels;
}

const dayMs = 86_400_000;
const at = (iso: string) => new Date(iso.length === 16 ? `${iso}:00.000Z` : iso);

/** Writes the demo CAPAs with their actions, history, audit entries, signatures and links. */
export async function seedCapas(tx: Tx, scenario: DemoScenario): Promise<void> {
  const rand = mulberry32(0xca9a_2026);
  const planned = new Map(buildDemoDeviations(scenario).map((d) => [d.key, d]));
  const people = new Map<string, Person>(
    (await tx.select({ id: users.id, email: users.email, name: users.name, title: users.title, role: users.role }).from(users)).map((u) => [u.email, u]),
  );
  const person = (email: string) => {
    const p = people.get(email);
    if (!p) throw new Error(`demo user ${email} missing`);
    return p;
  };
  const numbers = [...planned.values()].map((d) => d.columns.number).filter((n): n is string => n !== null);
  const deviationRows = new Map(
    (await tx.select({ id: deviations.id, number: deviations.number, title: deviations.title, whatHappened: deviations.whatHappened, rootCause: deviations.rootCause }).from(deviations).where(inArray(deviations.number, numbers))).map(
      (d) => [d.number!, d],
    ),
  );
  const defectIds = new Map((await tx.select({ id: capsuleDefects.id, code: capsuleDefects.code }).from(capsuleDefects)).map((d) => [d.code, d.id]));
  const machineIds = new Map((await tx.select({ id: machines.id, tag: machines.assetTag }).from(machines)).map((m) => [m.tag, m.id]));
  const ringIds = new Map((await tx.select({ id: fillingRings.id, serial: fillingRings.serial }).from(fillingRings)).map((r) => [r.serial, r.id]));

  // Each CAPA opens when its deviation's investigation said a CAPA is needed: just before it was submitted.
  const opened = stories.map((story) => {
    const d = planned.get(story.deviation);
    if (!d) throw new Error(`demo CAPA ${story.key}: no demo deviation ${story.deviation}`);
    const submit = [...d.steps].reverse().find((s) => s.event === 'submit_for_approval');
    if (!submit || d.columns.capaRequired !== true || !d.columns.number) {
      throw new Error(`demo CAPA ${story.key}: deviation ${story.deviation} did not conclude that a CAPA is needed`);
    }
    const row = deviationRows.get(d.columns.number);
    if (!row) throw new Error(`demo CAPA ${story.key}: deviation ${d.columns.number} not seeded`);
    return { story, deviation: row, createdAt: new Date(Date.parse(submit.at) - randomInt(rand, 15, 40) * 60_000) };
  });
  opened.sort((a, b) => a.createdAt.getTime() - b.createdAt.getTime());
  const capaNumbers = new Map(opened.map((o, i) => [o.story.key, formatRecordNumber(numberPrefixes.capa, 2026, i + 1)]));

  for (const { story, deviation, createdAt } of opened) {
    const number = capaNumbers.get(story.key)!;
    await tx.execute(
      sql`INSERT INTO record_counters (prefix, year, last_value) VALUES (${numberPrefixes.capa}, ${2026}, LAST_INSERT_ID(1))
          ON DUPLICATE KEY UPDATE last_value = LAST_INSERT_ID(last_value + 1)`,
    );
    const [counter] = (await tx.execute(sql`SELECT LAST_INSERT_ID() AS value`)) as unknown as [{ value: number | string }[]];
    const given = formatRecordNumber(numberPrefixes.capa, 2026, Number(counter[0]?.value));
    if (given !== number) throw new Error(`the CAPA counter gave ${given} where the demo expects ${number}`);

    const owner = person(story.owner);
    const creator = person(story.owner);
    const problemFromDeviation = [
      `Raised from deviation ${deviation.number}: ${deviation.title}.`,
      `What happened: ${deviation.whatHappened}`,
      ...(deviation.rootCause ? [`Root cause found by the investigation: ${deviation.rootCause}`] : []),
    ].join('\n\n');
    let row: CapaRow = {
      id: 0,
      number,
      status: 'proposed',
      version: 1,
      title: story.title || deviation.title,
      sourceType: 'deviation',
      sourceId: deviation.id,
      problemStatement: problemFromDeviation,
      rootCause: deviation.rootCause,
      effectivenessCriteria: null,
      recurrenceCriterion: null,
      effectivenessResult: null,
      effectivenessNote: null,
      cancelReason: null,
      ownerId: owner.id,
      createdBy: creator.id,
      dueAt: new Date(Date.parse(createdAt.toISOString().slice(0, 10)) + story.dueDays * dayMs),
      effectivenessDueAt: null,
      closedAt: null,
      planRound: 1,
      actionsPlanned: 0,
      actionsOpen: 0,
      actionsCompletedAt: null,
      planApprovedAt: null,
      effectivenessOpenedAt: null,
      createdAt,
      updatedAt: createdAt,
    };
    const { id: _id, ...insertValues } = row;
    const [inserted] = await tx.insert(capas).values(insertValues).$returningId();
    row = { ...row, id: inserted!.id };
    const capaId = row.id;
    await tx.insert(recordLinks).values({
      fromType: 'deviation',
      fromId: deviation.id,
      toType: 'capa',
      toId: capaId,
      relation: 'raised_capa',
      createdBy: creator.id,
      createdAt,
    });
    const createReason = `The investigation of deviation ${deviation.number} says a CAPA is needed.`;
    await tx.insert(stateHistory).values({ recordType: 'capa', recordId: capaId, event: 'create', fromState: null, toState: 'proposed', userId: creator.id, comment: createReason, at: createdAt });
    await writeDemoAuditAt(
      tx,
      { actor: creator, recordType: 'capa', recordId: capaId, action: 'create', changes: diffFields(null, row, ['number', 'status', ...capaAuditFields]), reason: createReason },
      createdAt,
    );

    let last = createdAt;
    const when = (iso: string, what: string) => {
      const t = at(iso);
      if (t < last) throw new Error(`demo CAPA ${story.key}: ${what} at ${iso} comes before the step before it`);
      if (t > at('2026-11-27T23:00')) throw new Error(`demo CAPA ${story.key}: ${what} falls after the scenario`);
      last = t;
      return t;
    };
    const edit = async (action: string, by: string, t: Date, changes: Partial<CapaRow>, extra: FieldChange[] = []) => {
      const before = row;
      row = { ...row, ...changes, version: row.version + 1, updatedAt: t };
      const actor = person(by);
      await writeDemoAuditAt(tx, { actor, recordType: 'capa', recordId: capaId, action, changes: [...diffFields(before, row, capaAuditFields), ...extra] }, t);
    };
    const event = async (type: CapaEventType, by: string, t: Date, reason: string | null, changes: Partial<CapaRow> = {}) => {
      const actor = person(by);
      const snapshot = resolveSnapshot(capaMachine, row.status, {
        ownerId: row.ownerId,
        actionsPlanned: row.actionsPlanned,
        actionsOpen: row.actionsOpen,
        criteriaWritten: Boolean(row.effectivenessCriteria?.trim()),
      });
      const plan = planEvent(capaMachine, snapshot, { type, actor });
      if (!plan.ok) throw new Error(`demo CAPA ${story.key}: ${by} cannot ${type} in ${row.status} (${plan.problem})`);
      if (plan.rules.reasonRequired && !reason) throw new Error(`demo CAPA ${story.key}: ${type} needs a reason`);
      const before = row;
      row = { ...row, ...changes, status: plan.nextState as CapaRow['status'], version: row.version + 1, updatedAt: t };
      await tx.insert(stateHistory).values({ recordType: 'capa', recordId: capaId, event: type, fromState: before.status, toState: row.status, userId: actor.id, comment: reason, at: t });
      await writeDemoAuditAt(
        tx,
        { actor, recordType: 'capa', recordId: capaId, action: type, changes: diffFields(before, row, ['status', ...capaAuditFields]), reason },
        t,
      );
      if (plan.rules.signature) await insertSignature(tx, actor, row, plan.rules.signature, reason, t);
    };

    if (story.rounds.length === 0) {
      await tx.update(capas).set({ ...finalColumns(row) }).where(eq(capas.id, capaId));
      continue;
    }

    for (const [index, round] of story.rounds.entries()) {
      const plannedAt = when(round.plannedAt, 'planning');
      const actionIds: number[] = [];
      for (const [i, a] of round.actions.entries()) {
        const t = new Date(plannedAt.getTime() + i * 4 * 60_000);
        const values = {
          capaId,
          kind: a.kind,
          category: a.category,
          description: a.description,
          ownerId: person(a.owner).id,
          dueAt: at(`${a.due}T00:00`),
          round: row.planRound,
          createdBy: owner.id,
          createdAt: t,
          updatedAt: t,
        };
        const [actionRow] = await tx.insert(capaActions).values(values).$returningId();
        actionIds.push(actionRow!.id);
        const changes = diffFields(null, { ...values, completedAt: null, completedBy: null, evidence: null }, ['kind', 'category', 'description', 'ownerId', 'dueAt', 'round']).map(
          (c) => ({ ...c, field: `action ${actionRow!.id} · ${c.field}` }),
        );
        await edit('add_action', story.owner, t, { actionsPlanned: row.actionsPlanned + 1, actionsOpen: row.actionsOpen + 1, actionsCompletedAt: null }, changes);
      }
      if (index === 0 && (story.criteria || story.criterion)) {
        const c = story.criterion;
        const criterion: RecurrenceCriterion | null = c
          ? {
              defectId: defectIds.get(c.defect)!,
              ...(c.machine ? { machineId: machineIds.get(c.machine)! } : {}),
              ...(c.ring ? { ringId: ringIds.get(c.ring)! } : {}),
              ...(c.batches ? { batches: c.batches } : {}),
              ...(c.days ? { days: c.days } : {}),
            }
          : null;
        if (criterion && Object.values(criterion).some((v) => v === undefined)) throw new Error(`demo CAPA ${story.key}: criterion names an unknown record`);
        await edit('update_plan', story.owner, new Date(plannedAt.getTime() + 20 * 60_000), {
          effectivenessCriteria: story.criteria ?? null,
          recurrenceCriterion: serializeRecurrenceCriterion(criterion),
        });
        last = new Date(plannedAt.getTime() + 20 * 60_000);
      } else {
        last = new Date(plannedAt.getTime() + round.actions.length * 4 * 60_000);
      }
      if (story.approvalRequestedAt && index === story.rounds.length - 1) {
        const t = when(story.approvalRequestedAt, 'approval request');
        await writeDemoAuditAt(tx, { actor: person(story.owner), recordType: 'capa', recordId: capaId, action: 'request_plan_approval', changes: [] }, t);
      }
      if (!round.approvedAt) continue;
      await event('approve_plan', approver, when(round.approvedAt, 'plan approval'), null, { planApprovedAt: at(round.approvedAt) });
      if (!round.startedAt) continue;
      await event('start_implementation', story.owner, when(round.startedAt, 'start'), null);

      const completions = round.actions
        .map((a, i) => ({ a, id: actionIds[i]! }))
        .filter((x) => x.a.done)
        .sort((x, y) => x.a.done!.at.localeCompare(y.a.done!.at));
      for (const { a, id } of completions) {
        const t = when(a.done!.at, 'action completion');
        const by = person(a.owner);
        await tx.update(capaActions).set({ completedAt: t, completedBy: by.id, evidence: a.done!.evidence, version: 2, updatedAt: t }).where(eq(capaActions.id, id));
        const open = row.actionsOpen - 1;
        const days = story.criterion?.days;
        await edit(
          'complete_action',
          a.owner,
          t,
          { actionsOpen: open, ...(open === 0 ? { actionsCompletedAt: t, effectivenessDueAt: days ? new Date(t.getTime() + days * dayMs) : null } : {}) },
          [
            { field: `action ${id} · completedAt`, from: null, to: t.toISOString() },
            { field: `action ${id} · completedBy`, from: null, to: by.id },
            { field: `action ${id} · evidence`, from: null, to: a.done!.evidence },
          ],
        );
      }
      if (!round.checkOpened) continue;
      const opened = when(round.checkOpened.at, 'effectiveness check');
      await event('open_effectiveness_check', round.checkOpened.by, opened, round.checkOpened.reason ?? null, { effectivenessOpenedAt: opened });
      if (!round.outcome) continue;
      const decided = when(round.outcome.at, 'effectiveness decision');
      if (round.outcome.effective) {
        await event('record_effective', approver, decided, null, { effectivenessResult: 'effective', effectivenessNote: null, closedAt: decided });
      } else {
        await event('record_not_effective', approver, decided, round.outcome.reason, {
          effectivenessResult: 'not_effective',
          effectivenessNote: round.outcome.reason,
          planRound: row.planRound + 1,
          actionsPlanned: 0,
          actionsOpen: 0,
          actionsCompletedAt: null,
          planApprovedAt: null,
          effectivenessOpenedAt: null,
          effectivenessDueAt: null,
        });
      }
    }
    if (story.cancel) {
      const reason = story.cancel.reason.replace(/\{capa:([\w-]+)\}/g, (_m, key: string) => capaNumbers.get(key) ?? key);
      const t = when(story.cancel.at, 'cancellation');
      await event('cancel', story.cancel.by, t, reason, { cancelReason: reason, closedAt: t });
    }
    await tx.update(capas).set({ ...finalColumns(row) }).where(eq(capas.id, capaId));
  }
}

function finalColumns(row: CapaRow) {
  const { id: _id, number: _number, createdAt: _createdAt, ...rest } = row;
  return rest;
}

async function insertSignature(tx: Tx, signer: Person, row: CapaRow, meaning: SignatureMeaning, reason: string | null, t: Date): Promise<void> {
  const contentHash = signatureContentHash('capa', row.id, row.version, signedContentOf(capaKind, meaning, row, await loadRelated(capaKind, tx, row))!);
  const manifest = {
    recordType: 'capa',
    recordId: row.id,
    recordVersion: row.version,
    userId: signer.id,
    printedName: signer.name,
    printedTitle: signer.title || roleLabels[signer.role],
    meaning,
    signedAt: sqlUtc(t),
    contentHash,
  };
  const [inserted] = await tx
    .insert(signatures)
    .values({ ...manifest, signatureHash: signatureManifestHash(manifest) })
    .$returningId();
  await writeDemoAuditAt(
    tx,
    {
      actor: { id: signer.id, name: signer.name },
      recordType: 'capa',
      recordId: row.id,
      action: 'signed',
      changes: [{ field: 'signature', from: null, to: { id: inserted!.id, meaning, recordVersion: row.version, contentHash } }],
      reason,
    },
    t,
  );
}

