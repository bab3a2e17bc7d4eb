import { roleLabels } from '../../lib/auth/roles';
import { addDays } from '../../lib/clocks/dates';
import {
  closeComplaint,
  completeAssessment,
  completeInvestigation,
  createComplaint,
  linkRecord,
  recordReportSubmitted,
  saveAssessment,
  saveInvestigation,
  saveResponseDraft,
  sendResponse,
  skipInvestigation,
  startAssessment,
} from '../../lib/complaints/commands';
import type { ComplainantKind, IntakeChannel } from '../../lib/complaints/labels';
import { draftLetterHtml } from '../../lib/complaints/letter';
import { formatRecordNumber } from '../../lib/records/number-format';
import { numberPrefixes } from '../../lib/records/types';
import type { ComplaintState } from '../../workflows/states';
import type { PlannedDeviation } from './deviations';
import { mulberry32, randomInt } from './prng';
import { type DemoScenario, companyName } from './scenario';
import { type SeedContext, type StoryStep, iso } from './story';

/*
 * Demo complaints, July to November 2026, as Brackwater would have received them: pharmacies,
 * distributors and consumers (invented people, addresses on example domains), about cracked, empty,
 * light, stuck-together and discoloured capsules, an odour, foreign matter and suspected reactions.
 * The trend a reviewer should find: Magnesium Glycinate draws the most complaints; one Ashwagandha lot
 * drew three complaints of empty capsules in September; one suspected reaction to Turmeric was serious
 * (a hospital stay) and was reported to FDA within the 15 business days of 21 U.S.C. 379aa-1; a piece
 * of foreign matter in the compounded naltrexone led to a field alert within 3 working days
 * (21 CFR 314.81(b)(1)); and the last weeks hold complaints in every state, one serious reaction
 * with its report still due.
 *
 * Each step goes through the complaint command a person would use, at the time it happened, by the
 * demo user who took it: the intake, the assessment and its signed reportability decision, the
 * report's date, the investigation with the batch's deviation linked, the letter written and sent,
 * and the closing signature of a QA approver who had no other part in it. Numbers CMP-2026-0001...
 * follow the order of receipt. Lots are picked from the scenario's batches by rule (the newest
 * shipped lot of the product made at least a week before receipt), so the data follows the scenario.
 */

const operator = 'operator@brackwater.example';
const supervisor = 'supervisor@brackwater.example';
const investigator = 'investigator@brackwater.example';
const investigator2 = 'investigator2@brackwater.example';
const approver = 'approver@brackwater.example';

type Stage = ComplaintState;

interface Story {
  key: string;
  receivedOn: string;
  product: string;
  /** Another story's key: the same lot (a lot with more than one complaint). */
  sameLotAs?: string;
  /** The lot as the customer read it when it is not in the batch records. */
  unknownLot?: string;
  takenBy: string;
  kind: ComplainantKind;
  channel: IntakeChannel;
  name: string;
  contact: string;
  description: string;
  units?: number;
  harm?: string;
  samples?: boolean;
  stage: Stage;
  owner?: string;
  category?: string;
  adverse?: boolean;
  serious?: boolean;
  reportable?: boolean;
  rationale?: string;
  /** Days after receipt the report went to FDA. */
  reportedAfterDays?: number;
  skip?: string;
  retained?: { checked: boolean; note: string };
  summary?: string;
  /** Link the newest deviation with this defect on the lot's filler. */
  linkDeviation?: boolean;
  answer?: { channel: 'email' | 'post'; text: string };
}

const stories: readonly Story[] = [
  {
    key: 'mgg-cracked-0713',
    receivedOn: '2026-07-13',
    product: 'BW-MGG-00',
    takenBy: supervisor,
    kind: 'pharmacy',
    channel: 'email',
    name: 'Jorund Pellworth (Harrowgate Lane Pharmacy)',
    contact: 'dispensary@harrowgate-pharmacy.example',
    description: 'Two bottles returned by patients: several capsules split along the cap, powder loose in the bottle.',
    units: 9,
    samples: true,
    stage: 'closed',
    owner: investigator,
    category: 'cracked_shell',
    adverse: false,
    reportable: false,
    rationale: 'Cracked shells are a quality defect; no one took a damaged capsule and no one was harmed. Not reportable.',
    retained: { checked: true, note: '300 retained capsules inspected: 1 hairline crack at the cap shoulder.' },
    summary: 'Shells from one gelatin lot were brittle below 35 % RH in the filling room; the room humidity alarm limit was raised and the shell lot used up under 100 % inspection.',
    linkDeviation: true,
    answer: { channel: 'email', text: 'We found that a few shells from one supply were brittle in dry air. We adjusted our filling room and inspected the rest of that supply. A replacement for both bottles is on its way to you.' },
  },
  {
    key: 'asc-count-0715',
    receivedOn: '2026-07-15',
    product: 'BW-ASC-0',
    takenBy: operator,
    kind: 'consumer',
    channel: 'phone',
    name: 'Marisol Quenby',
    contact: '+1 555 0142',
    description: 'Says the bottle held fewer capsules than the label states; counted 54 instead of 60.',
    units: 6,
    samples: true,
    stage: 'closed',
    owner: investigator2,
    category: 'no_defect_found',
    adverse: false,
    reportable: false,
    rationale: 'The returned bottle held 60 capsules when counted twice in QA; six had been taken out by another member of the household.',
    skip: 'The returned bottle was counted twice by QA: 60 capsules, as labelled. No quality defect is possible; no investigation needed.',
    answer: { channel: 'post', text: 'We counted the capsules in the bottle you sent back: there were 60, as the label says. We are sorry for the worry and enclose a voucher.' },
  },
  {
    key: 'tur-odour-0723',
    receivedOn: '2026-07-23',
    product: 'BW-TUR-00V',
    takenBy: operator,
    kind: 'consumer',
    channel: 'web_form',
    name: 'Oswin Tarrendale',
    contact: 'oswin.tarrendale@customers.example',
    description: 'Strong musty smell when opening the bottle, different from the previous bottle.',
    samples: false,
    stage: 'closed',
    owner: investigator,
    category: 'taste_or_odour',
    adverse: false,
    reportable: false,
    rationale: 'An odour may point to moisture or a raw material change; investigate. No one was harmed.',
    retained: { checked: true, note: 'Retained samples smell of turmeric as usual; water activity 0.31, within specification.' },
    summary: 'No defect found in retained samples; the bottle had been stored in a bathroom cabinet. Storage advice added to the label text review.',
    answer: { channel: 'email', text: 'Our retained samples of your lot smell as they should and are dry. Turmeric takes up smells and moisture when kept in a warm, damp place; please keep the bottle somewhere cool and dry. A replacement is on its way.' },
  },
  {
    key: 'prb-stuck-0805',
    receivedOn: '2026-08-05',
    product: 'BW-PRB-0V',
    takenBy: supervisor,
    kind: 'distributor',
    channel: 'email',
    name: 'Quality desk, Fenmore Wholesale Supply',
    contact: 'quality@fenmore-wholesale.example',
    description: 'Customers report capsules stuck together in clumps of two or three in several bottles from one shipment.',
    units: 40,
    samples: true,
    stage: 'closed',
    owner: investigator2,
    category: 'stuck_together',
    adverse: false,
    reportable: false,
    rationale: 'Capsules sticking together point to moisture in the shells (HPMC) or a missing desiccant; investigate.',
    retained: { checked: true, note: 'Retained samples free-flowing; the returned bottles had no desiccant sachet.' },
    summary: 'The desiccant feeder on packaging line 2 jammed for one shift; bottles without a sachet took up moisture in a hot warehouse. Feeder sensor added.',
    answer: { channel: 'email', text: 'The bottles you returned had no drying sachet: a feeder on our packaging line jammed for one shift. We have added a sensor that stops the line when a sachet is missing. We will credit the affected stock.' },
  },
  {
    key: 'mgg-light-0812',
    receivedOn: '2026-08-12',
    product: 'BW-MGG-00',
    takenBy: investigator,
    kind: 'pharmacy',
    channel: 'phone',
    name: 'Beatrix Holloway-Senn (Millbrook Apothecary)',
    contact: 'orders@millbrook-apothecary.example',
    description: 'Capsules feel lighter than usual; weighed ten on the pharmacy balance, several well under the others.',
    units: 10,
    samples: true,
    stage: 'closed',
    owner: investigator,
    category: 'light_fill',
    adverse: false,
    reportable: false,
    rationale: 'Light fills are a quality defect (dose below label claim); no one reported ill effects. Not reportable.',
    retained: { checked: true, note: '20 retained capsules weighed: 2 below the lower fill limit.' },
    summary: 'Light fills trace to the powder lot change recorded in the light-fill deviation of July; the CAPA on powder flow covers this lot.',
    linkDeviation: true,
    answer: { channel: 'email', text: 'We weighed capsules kept back from your lot and found a few under weight, as you did. The cause, a change of powder supply, was already being corrected. Please return the remaining stock for credit.' },
  },
  {
    key: 'eld-colour-0819',
    receivedOn: '2026-08-19',
    product: 'BW-ELD-1',
    takenBy: operator,
    kind: 'consumer',
    channel: 'phone',
    name: 'Linnea Craithwell',
    contact: 'linnea.craithwell@customers.example',
    description: 'Some capsules are blotchy and darker purple than others in the same bottle.',
    units: 12,
    samples: true,
    stage: 'closed',
    owner: investigator2,
    category: 'print_colour',
    adverse: false,
    reportable: false,
    rationale: 'Discoloured shells are a visual quality defect; no health effect expected from the shell colourant. Not reportable.',
    retained: { checked: true, note: 'Retained samples show mottling on 4 of 200 capsules.' },
    summary: 'Elderberry extract with high moisture stained the inside of the shells; extract drying specification tightened with the supplier.',
    answer: { channel: 'email', text: 'The darker patches come from the elderberry extract staining the inside of the shell. They are safe, but they should not be there: we have tightened our specification with the extract supplier.' },
  },
  {
    key: 'ntx-foreign-0827',
    receivedOn: '2026-08-27',
    product: 'BW-NTX-1',
    takenBy: supervisor,
    kind: 'pharmacy',
    channel: 'phone',
    name: 'Dr Anselm Vorbeck (Kestrel Row Pharmacy)',
    contact: 'pharmacist@kestrel-row.example',
    description: 'A dark fleck, about 1 mm, embedded in the fill of one capsule seen through the shell.',
    units: 1,
    samples: true,
    stage: 'closed',
    owner: investigator,
    category: 'foreign_matter',
    adverse: false,
    reportable: true,
    reportedAfterDays: 1,
    rationale: 'Possible contamination of a distributed drug product: a field alert is due within 3 working days of receipt (21 CFR 314.81(b)(1)).',
    retained: { checked: true, note: '1,000 retained capsules inspected: no particles.' },
    summary: 'The particle was a fragment of a worn tamping pin seal; seals on the filler replaced and inspection of the remaining stock found none.',
    linkDeviation: true,
    answer: { channel: 'email', text: 'The particle you found was a fragment of a machine seal. We reported the finding to FDA, replaced the seals and inspected the remaining stock of your lot without finding another. Please quarantine the bottle; we will collect it.' },
  },
  {
    key: 'ash-empty-0903',
    receivedOn: '2026-09-03',
    product: 'BW-ASH-0',
    takenBy: operator,
    kind: 'consumer',
    channel: 'phone',
    name: 'Tobiah Ferncastle',
    contact: 'tobiah.ferncastle@customers.example',
    description: 'Three capsules in the bottle were empty: just the shell, no powder.',
    units: 3,
    samples: true,
    stage: 'closed',
    owner: investigator,
    category: 'empty_capsule',
    adverse: false,
    reportable: false,
    rationale: 'Empty capsules are a critical quality defect (a missing dose); nobody was harmed. Not reportable.',
    retained: { checked: true, note: '500 retained capsules weighed: 1 empty.' },
    summary: 'A blocked dosing bore let empty bodies pass; the check-weigher reject limit was too wide to catch them. Bore cleaning added to the change-over check list.',
    linkDeviation: true,
    answer: { channel: 'email', text: 'We found that a blocked part on our filling machine let a few empty capsules through. It has been cleaned and our checks tightened. A replacement bottle is on its way.' },
  },
  {
    key: 'ash-empty-0910',
    receivedOn: '2026-09-10',
    product: 'BW-ASH-0',
    sameLotAs: 'ash-empty-0903',
    takenBy: supervisor,
    kind: 'pharmacy',
    channel: 'email',
    name: 'Cordelia Ashdown (Saltmarsh Road Pharmacy)',
    contact: 'team@saltmarsh-pharmacy.example',
    description: 'A patient brought back a bottle with two empty capsules.',
    units: 2,
    samples: true,
    stage: 'closed',
    owner: investigator,
    category: 'empty_capsule',
    adverse: false,
    reportable: false,
    rationale: 'Second complaint of empty capsules on this lot; same defect. Not reportable.',
    retained: { checked: true, note: 'See the first complaint on this lot; 500 more retained capsules weighed: none empty.' },
    summary: 'Same cause as the first complaint on this lot (blocked dosing bore); the lot was 100 % check-weighed in the warehouse and 14 empty capsules removed.',
    linkDeviation: true,
    answer: { channel: 'email', text: 'Thank you for returning the bottle. The cause is known and corrected, and we have check-weighed every capsule of that lot still in our warehouse.' },
  },
  {
    key: 'ash-empty-0917',
    receivedOn: '2026-09-17',
    product: 'BW-ASH-0',
    sameLotAs: 'ash-empty-0903',
    takenBy: operator,
    kind: 'distributor',
    channel: 'email',
    name: 'Returns desk, Pellow & Marsh Distribution',
    contact: 'returns@pellowmarsh.example',
    description: 'Retail partner found empty capsules in four bottles of the same lot during a shelf check.',
    units: 5,
    samples: true,
    stage: 'closed',
    owner: investigator2,
    category: 'empty_capsule',
    adverse: false,
    reportable: false,
    rationale: 'Third complaint on this lot: the lot in the market is affected. Not reportable for a supplement without an adverse event; recall assessment done in the investigation.',
    retained: { checked: true, note: 'No further empty capsules in retained samples.' },
    summary: 'Third complaint on the lot: market withdrawal of the lot decided with the distributor; CAPA on dosing bore cleaning in place.',
    linkDeviation: true,
    answer: { channel: 'post', text: 'We are withdrawing this lot from the market and have sent you the return instructions. The cause, a blocked filling part, is corrected.' },
  },
  {
    key: 'tur-reaction-0924',
    receivedOn: '2026-09-24',
    product: 'BW-TUR-00V',
    takenBy: investigator2,
    kind: 'consumer',
    channel: 'phone',
    name: 'Hesper Laughton-Vale',
    contact: 'hesper.lv@customers.example',
    description: 'Took two capsules with breakfast; within an hour severe stomach pain and vomiting.',
    harm: 'Taken to the emergency department by her daughter and kept in hospital overnight for observation; discharged the next day.',
    samples: true,
    stage: 'closed',
    owner: investigator2,
    category: 'suspected_adverse_reaction',
    adverse: true,
    serious: true,
    reportable: true,
    reportedAfterDays: 8,
    rationale: 'A hospital stay after use of a dietary supplement: a serious adverse event, reported to FDA within 15 business days (21 U.S.C. 379aa-1).',
    retained: { checked: true, note: 'Retained samples tested: assay, microbiology and heavy metals within specification.' },
    summary: 'No quality defect found in the lot; the customer also takes a prescribed anticoagulant. Report submitted with the label; no product action.',
    answer: { channel: 'email', text: 'We are sorry you were unwell. Our tests of the capsules kept back from your lot found nothing wrong, and we have reported your experience to FDA as the law requires. Please speak to your doctor before taking turmeric with other medicines.' },
  },
  {
    key: 'mgg-cracked-1006',
    receivedOn: '2026-10-06',
    product: 'BW-MGG-00',
    takenBy: operator,
    kind: 'consumer',
    channel: 'phone',
    name: 'Ignatius Broome',
    contact: '+1 555 0178',
    description: 'Capsules crack when pressed out of the bottle neck; powder on the fingers.',
    units: 4,
    samples: false,
    stage: 'closed',
    owner: investigator,
    category: 'cracked_shell',
    adverse: false,
    reportable: false,
    rationale: 'Cracked shells again on Magnesium Glycinate; investigate against the July complaint.',
    retained: { checked: true, note: '300 retained capsules: none cracked.' },
    summary: 'Retained samples sound; bottle neck narrower on the new bottle supplier. Bottle specification reviewed with packaging.',
    answer: { channel: 'post', text: 'Our capsules kept from your lot are intact; the new bottles have a narrower neck, which we are changing. A replacement is on its way.' },
  },
  {
    key: 'prb-odour-1014',
    receivedOn: '2026-10-14',
    product: 'BW-PRB-0V',
    takenBy: operator,
    kind: 'consumer',
    channel: 'web_form',
    name: 'Wilhelmina Strand-Okoro',
    contact: 'w.strandokoro@customers.example',
    description: 'Sour smell from the capsules; worried they have gone off.',
    samples: true,
    stage: 'response',
    owner: investigator2,
    category: 'taste_or_odour',
    adverse: false,
    reportable: false,
    rationale: 'Probiotic blends smell slightly sour; check viable count and water activity of the retained samples.',
    retained: { checked: true, note: 'Retained samples: viable count and water activity within specification; typical odour.' },
    summary: 'No defect; the odour is typical of the culture. Label wording on odour proposed to marketing.',
  },
  {
    key: 'eld-foreign-1022',
    receivedOn: '2026-10-22',
    product: 'BW-ELD-1',
    takenBy: supervisor,
    kind: 'pharmacy',
    channel: 'email',
    name: 'Rafferty Coombe (Lanternfield Pharmacy)',
    contact: 'rx@lanternfield.example',
    description: 'A hair-like fibre inside one capsule.',
    units: 1,
    samples: true,
    stage: 'investigation',
    owner: investigator,
    category: 'foreign_matter',
    adverse: false,
    reportable: false,
    rationale: 'Foreign matter in a supplement: a quality defect, not an adverse event. Not reportable; investigate the source.',
    retained: { checked: true, note: '600 retained capsules inspected against a light box: none with fibres.' },
    linkDeviation: true,
  },
  {
    key: 'asc-packaging-1029',
    receivedOn: '2026-10-29',
    product: 'BW-ASC-0',
    takenBy: supervisor,
    kind: 'distributor',
    channel: 'email',
    name: 'Quality desk, Fenmore Wholesale Supply',
    contact: 'quality@fenmore-wholesale.example',
    description: 'Induction seals not bonded on about one bottle in twenty of a pallet.',
    units: 36,
    samples: true,
    stage: 'closed',
    owner: investigator2,
    category: 'packaging',
    adverse: false,
    reportable: false,
    rationale: 'Unbonded seals expose the capsules to moisture and tampering; investigate the sealer.',
    retained: { checked: false, note: 'Not relevant to a packaging fault; the returned bottles were examined instead.' },
    summary: 'Induction sealer power drifted after a coil change; sealer verification added at start of shift.',
    answer: { channel: 'email', text: 'Our sealing machine lost power after a repair; it is checked at every shift start now. Please return the affected bottles for credit.' },
  },
  {
    key: 'mgg-label-1104',
    receivedOn: '2026-11-04',
    product: 'BW-MGG-00',
    takenBy: operator,
    kind: 'pharmacy',
    channel: 'phone',
    name: 'Jorund Pellworth (Harrowgate Lane Pharmacy)',
    contact: '14 Harrowgate Lane, Brackwater',
    description: 'Expiry date on the label is smudged and unreadable on several bottles.',
    units: 0,
    samples: true,
    stage: 'response',
    owner: investigator,
    category: 'labelling',
    adverse: false,
    reportable: false,
    rationale: 'An unreadable expiry date is a labelling defect; investigate the printer.',
    retained: { checked: false, note: 'Labelling fault: the returned bottles and the label reels were examined instead.' },
    summary: 'Thermal printer ribbon changed for a cheaper grade that smudges; original ribbon reinstated.',
    answer: { channel: 'post', text: 'A change of printer ribbon made our expiry dates smudge. The original ribbon is back in use. Please return the bottles; we will replace them.' },
  },
  {
    key: 'tur-reaction-1110',
    receivedOn: '2026-11-10',
    product: 'BW-TUR-00V',
    takenBy: investigator,
    kind: 'consumer',
    channel: 'phone',
    name: 'Caspian Wetherby',
    contact: 'caspian.wetherby@customers.example',
    description: 'Mild itchy rash on the arms after a week of taking the capsules; stopped taking them and it went away.',
    harm: 'Mild rash, no treatment needed, gone two days after stopping.',
    samples: false,
    stage: 'investigation',
    owner: investigator,
    category: 'suspected_adverse_reaction',
    adverse: true,
    serious: false,
    reportable: false,
    rationale: 'An adverse event, not serious: no hospital stay, no treatment, resolved on stopping. Not reportable under 21 U.S.C. 379aa-1; recorded and trended.',
  },
  {
    key: 'ash-empty-1116',
    receivedOn: '2026-11-16',
    product: 'BW-ASH-0',
    unknownLot: 'BW-2026-0912-C',
    takenBy: operator,
    kind: 'consumer',
    channel: 'phone',
    name: 'Morwenna Tallis',
    contact: 'morwenna.tallis@customers.example',
    description: 'One empty capsule found; reads the lot as BW-2026-0912-C, which we have not made.',
    units: 1,
    samples: true,
    stage: 'assessment',
    owner: investigator2,
  },
  {
    key: 'prb-stuck-1120',
    receivedOn: '2026-11-20',
    product: 'BW-PRB-0V',
    takenBy: supervisor,
    kind: 'consumer',
    channel: 'email',
    name: 'Ptolemy Ashgrove',
    contact: 'ptolemy.ashgrove@customers.example',
    description: 'Capsules stuck to each other and to the bottle wall.',
    units: 15,
    samples: true,
    stage: 'assessment',
    owner: investigator,
  },
  {
    key: 'eld-reaction-1124',
    receivedOn: '2026-11-24',
    product: 'BW-ELD-1',
    takenBy: investigator2,
    kind: 'consumer',
    channel: 'phone',
    name: 'Ysolde Marchbank',
    contact: 'ysolde.marchbank@customers.example',
    description: 'Swelling of lips and throat about an hour after the first capsule.',
    harm: 'Treated with adrenaline by paramedics and taken to hospital; discharged after six hours.',
    samples: true,
    stage: 'investigation',
    owner: investigator2,
    category: 'suspected_adverse_reaction',
    adverse: true,
    serious: true,
    reportable: true,
    rationale: 'Emergency treatment to prevent a life-threatening outcome after use of a dietary supplement: a serious adverse event, reportable to FDA within 15 business days of receipt.',
  },
  {
    key: 'ntx-light-1126',
    receivedOn: '2026-11-26',
    product: 'BW-NTX-1',
    takenBy: supervisor,
    kind: 'pharmacy',
    channel: 'phone',
    name: 'Dr Anselm Vorbeck (Kestrel Row Pharmacy)',
    contact: 'pharmacist@kestrel-row.example',
    description: 'Capsules of one bottle look less full than usual; not weighed yet.',
    samples: true,
    stage: 'received',
  },
  {
    key: 'mgg-cracked-1127',
    receivedOn: '2026-11-27',
    product: 'BW-MGG-00',
    takenBy: operator,
    kind: 'consumer',
    channel: 'phone',
    name: 'Anwen Drysdale',
    contact: '+1 555 0163',
    description: 'Cracked capsules in a new bottle, opened today.',
    units: 3,
    samples: false,
    stage: 'received',
  },
];

type ComplaintStepKind =
  | { kind: 'create' }
  | { kind: 'start_assessment' }
  | { kind: 'record_assessment' }
  | { kind: 'skip_investigation'; reason: string }
  | { kind: 'complete_assessment' }
  | { kind: 'record_report_submitted'; submittedOn: string }
  | { kind: 'record_investigation' }
  | { kind: 'link_deviation'; deviation: string }
  | { kind: 'complete_investigation' }
  | { kind: 'write_response'; letter: string }
  | { kind: 'send_response'; channel: 'email' | 'post' }
  | { kind: 'close' };

export type PlannedComplaintStep = ComplaintStepKind & { at: string; by: string };

export interface PlannedComplaint {
  key: string;
  number: string;
  stage: Stage;
  /** The lot in the batch records the complaint names, or null (none, or one the site never made). */
  lot: string | null;
  steps: PlannedComplaintStep[];
}

const at = (day: string, time: string) => iso(`${day}T${time}`);
const scenarioLast = iso('2026-11-27T23:00');

/** The newest shipped lot of the product made at least a week before the complaint came in. */
function lotFor(scenario: DemoScenario, story: Story): string {
  const candidates = scenario.batches.filter(
    (b) => b.productCode === story.product && b.status === 'released' && b.unitsShipped > 0 && b.manufacturedOn <= addDays(story.receivedOn, -7),
  );
  // The scenario lists batches in the order they were made, which is also the order they are entered.
  const newest = candidates.reduce<(typeof candidates)[number] | null>((best, b) => (best === null || b.manufacturedOn > best.manufacturedOn ? b : best), null);
  if (!newest) throw new Error(`demo complaint ${story.key}: no shipped lot of ${story.product} before ${story.receivedOn}`);
  return newest.lotNumber;
}

/** The newest deviation on the lot's filler raised before `since` and reported by `by`, to link. */
function deviationToLink(scenario: DemoScenario, deviations: readonly PlannedDeviation[], lot: string, since: string, by: string): string | null {
  const machineOf = new Map(scenario.batches.map((b) => [b.lotNumber, b.machineAssetTag]));
  const machine = machineOf.get(lot);
  const reportedAt = (d: PlannedDeviation) => d.steps.find((s) => s.event === 'submit')?.at ?? null;
  const candidates = deviations.filter(
    (d) => d.lot !== null && machineOf.get(d.lot) === machine && d.steps[0]!.at <= since && (reportedAt(d) ?? '9999') <= by,
  );
  candidates.sort((a, b) => b.steps[0]!.at.localeCompare(a.steps[0]!.at));
  return candidates[0]?.key ?? null;
}

/** The complaint stories as dated steps by the demo users who took them. Pure and deterministic. */
export function planDemoComplaints(scenario: DemoScenario, deviations: readonly PlannedDeviation[]): PlannedComplaint[] {
  const rand = mulberry32(0xc0_2026);
  const lots = new Map<string, string | null>();
  const ordered = [...stories].sort((a, b) => a.receivedOn.localeCompare(b.receivedOn));
  return ordered.map((story, index) => {
    let lot: string | null = null;
    if (story.sameLotAs) {
      lot = lots.get(story.sameLotAs) ?? null;
      if (!lot) throw new Error(`demo complaint ${story.key}: ${story.sameLotAs} comes later or has no lot`);
    } else if (!story.unknownLot) {
      lot = lotFor(scenario, story);
    }
    lots.set(story.key, lot);
    const number = formatRecordNumber(numberPrefixes.complaint, 2026, index + 1);
    const steps: PlannedComplaintStep[] = [];
    const createdAt = at(story.receivedOn, `${String(13 + randomInt(rand, 0, 3)).padStart(2, '0')}:${String(randomInt(rand, 0, 5) * 10).padStart(2, '0')}`);
    let last = createdAt;
    const step = (daysAfter: number, time: string) => {
      const t = at(addDays(story.receivedOn, daysAfter), time);
      const when = t < last ? new Date(Date.parse(last) + 10 * 60_000).toISOString() : t;
      if (when > scenarioLast) throw new Error(`demo complaint ${story.key}: a step falls after the scenario`);
      last = when;
      return when;
    };
    const add = (s: ComplaintStepKind, t: string, by: string) => steps.push({ ...s, at: t, by });
    const done = () => ({ key: story.key, number, stage: story.stage, lot, steps });

    add({ kind: 'create' }, createdAt, story.takenBy);
    if (story.stage === 'received') return done();
    const owner = story.owner ?? investigator;
    add({ kind: 'start_assessment' }, step(1, '08:40'), owner);
    if (story.category) add({ kind: 'record_assessment' }, step(1, '10:15'), owner);
    if (story.stage === 'assessment') return done();
    if (story.skip) {
      add({ kind: 'skip_investigation', reason: story.skip }, step(1, '11:30'), owner);
    } else {
      add({ kind: 'complete_assessment' }, step(1, '11:30'), owner);
      if (story.reportable && story.reportedAfterDays !== undefined) {
        add({ kind: 'record_report_submitted', submittedOn: addDays(story.receivedOn, story.reportedAfterDays) }, step(story.reportedAfterDays, '16:00'), owner);
      }
      if (story.retained) add({ kind: 'record_investigation' }, step(4, '14:20'), owner);
      if (story.linkDeviation && lot) {
        const since = last;
        const t = step(4, '15:00');
        const deviation = deviationToLink(scenario, deviations, lot, since, t);
        if (deviation) add({ kind: 'link_deviation', deviation }, t, owner);
      }
      if (story.stage === 'investigation') return done();
      add({ kind: 'complete_investigation' }, step(5, '11:00'), owner);
    }
    if (story.answer) {
      const person = scenario.users.find((u) => u.email === owner)!;
      const product = scenario.products.find((p) => p.code === story.product)!;
      const letter = draftLetterHtml({
        siteName: companyName,
        number,
        complainantName: story.name,
        receivedOn: story.receivedOn,
        product: `${product.name} ${product.strength}`,
        lot: lot ?? story.unknownLot ?? null,
        reported: story.description,
        found: story.answer.text,
        signerName: person.name,
        signerTitle: person.title || roleLabels[person.role],
      }).replace(/<p>\[Say[^<]*\]<\/p>\n?/, '');
      add({ kind: 'write_response', letter }, step(6, '10:00'), owner);
      add({ kind: 'send_response', channel: story.answer.channel }, step(6, '15:30'), owner);
      if (story.stage === 'closed') add({ kind: 'close' }, step(7, '09:30'), approver);
    }
    return done();
  });
}

function storyOf(key: string): Story {
  const story = stories.find((s) => s.key === key);
  if (!story) throw new Error(`no demo complaint ${key}`);
  return story;
}

function runStep(c: PlannedComplaint, step: PlannedComplaintStep, ctx: SeedContext): Promise<unknown> {
  const key = `complaint:${c.key}`;
  const story = storyOf(c.key);
  const by = ctx.person(step.by);
  const moved = (outcome: { record: { id: number; version: number } }) => ctx.track(key, outcome.record);
  const current = () => {
    const r = ctx.record(key);
    return { id: r.id, version: r.version };
  };
  switch (step.kind) {
    case 'create':
      return createComplaint(by, {
        receivedOn: story.receivedOn,
        channel: story.channel,
        complainantName: story.name,
        complainantContact: story.contact,
        complainantKind: story.kind,
        productId: ctx.id(ctx.productIds, story.product, 'product'),
        lot: c.lot ?? story.unknownLot,
        description: story.description,
        unitsAffected: story.units,
        personHarmed: Boolean(story.harm),
        harmDescription: story.harm,
        samplesReturning: story.samples ?? false,
      }).then((outcome) => {
        moved(outcome);
        if (outcome.record.number !== c.number) throw new Error(`the product gave ${outcome.record.number} where the plan expects ${c.number}`);
        ctx.numbers.set(key, outcome.record.number);
      });
    case 'start_assessment':
      return startAssessment(by, current()).then(moved);
    case 'record_assessment':
      return saveAssessment(by, {
        ...current(),
        category: story.category!,
        adverseEvent: story.adverse ?? false,
        seriousAdverseEvent: story.adverse ? (story.serious ?? false) : undefined,
        reportable: story.reportable ?? false,
        assessmentRationale: story.rationale!,
      }).then(moved);
    case 'skip_investigation':
      return ctx.signer(step.by).then((signer) => skipInvestigation(by, { ...current(), reason: step.reason }, signer)).then(moved);
    case 'complete_assessment':
      return ctx.signer(step.by).then((signer) => completeAssessment(by, current(), signer)).then(moved);
    case 'record_report_submitted':
      return recordReportSubmitted(by, { ...current(), submittedOn: step.submittedOn }).then(moved);
    case 'record_investigation':
      return saveInvestigation(by, {
        ...current(),
        retainedSamplesChecked: story.retained!.checked,
        retainedSamplesNote: story.retained!.note,
        investigationSummary: story.summary,
      }).then(moved);
    case 'link_deviation':
      return linkRecord(by, { ...current(), target: 'deviation', reference: ctx.number(`deviation:${step.deviation}`) }).then(moved);
    case 'complete_investigation':
      return ctx.signer(step.by).then((signer) => completeInvestigation(by, current(), signer)).then(moved);
    case 'write_response':
      return saveResponseDraft(by, { ...current(), letter: step.letter }).then(moved);
    case 'send_response':
      return sendResponse(by, { ...current(), channel: step.channel }).then(moved);
    case 'close':
      return ctx.signer(step.by).then((signer) => closeComplaint(by, current(), signer)).then(moved);
  }
}

export function complaintSteps(planned: readonly PlannedComplaint[]): StoryStep[] {
  return planned.flatMap((c) =>
    c.steps.map((step) => ({
      at: step.at,
      what: `complaint ${c.key}: ${step.kind.replace(/_/g, ' ')} by ${step.by}`,
      run: async (ctx: SeedContext) => {
        await runStep(c, step, ctx);
      },
    })),
  );
}
