import type { CapaActionCategory, CapaActionKind } from '../../lib/capa/labels';
import { mulberry32, randomInt } from './prng';

/*
 * The demo CAPAs as stories: one for each demo deviation whose investigation said a CAPA is needed,
 * told the way it would have gone at Brackwater, in every state: closed as effective (light fills
 * after a powder lot change, the cracked ring BWR-0104), back in planning after a "not effective"
 * check and now in its second round (unseparated capsules at low vacuum recurred in November), in
 * the effectiveness check (heavy fills on Filler 3, where a new heavy-fill deviation shows as a
 * recurrence; double caps on Filler 1 with none), in implementation, plan approved, being planned,
 * just raised from an investigation, and one cancelled as superseded. Times are UTC; "{capa:key}"
 * and "{dev:key}" in a text are replaced by that record's number when the step runs.
 */

const approver = 'approver@brackwater.example';
const investigator = 'investigator@brackwater.example';
const investigator2 = 'investigator2@brackwater.example';
const supervisor = 'supervisor@brackwater.example';
const operator = 'operator@brackwater.example';
const operator2 = 'operator2@brackwater.example';

export interface PlannedAction {
  kind: CapaActionKind;
  category: CapaActionCategory;
  description: string;
  owner: string;
  due: string;
  /** Completed: when, and the evidence. */
  done?: { at: string; evidence: string };
}

export interface Round {
  actions: PlannedAction[];
  /** When the owner added the actions and wrote the plan. */
  plannedAt: string;
  approvedAt?: string;
  startedAt?: string;
  /** The effectiveness check opened, by whom. */
  checkOpened?: { at: string; by: string; reason?: string };
  outcome?: { effective: true; at: string } | { effective: false; at: string; reason: string };
}

export interface CapaStory {
  key: string;
  /** The demo deviation it was raised from (its story key in deviations.ts). */
  deviation: string;
  owner: string;
  title: string;
  /** The owner's summary; the CAPA keeps the problem statement the product writes from its deviation, which names the deviation. */
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

export const capaStories: readonly CapaStory[] = [
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
        checkOpened: { at: '2026-11-16T14:20', by: investigator2, reason: 'Opened early: unseparated capsules on Filler 3 again ({dev:unseparated-1113}).' },
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
    // Cancelled by a QA approver: the owner may not cancel their own CAPA (lib/capa/kind.ts).
    cancel: {
      at: '2026-11-06T14:30',
      by: approver,
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

/*
 * Minutes between the investigator saving the finished investigation, which opens the CAPA, and
 * signing it, per deviation story: drawn once per CAPA story, in their order, from a fixed seed.
 */
export function capaSaveLeadMinutes(): Map<string, number> {
  const rand = mulberry32(0xca9a_2026);
  return new Map(capaStories.map((story) => [story.deviation, randomInt(rand, 15, 40)]));
}
