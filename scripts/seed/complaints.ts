import { and, asc, desc, eq, gt, lte, sql } from 'drizzle-orm';
import { diffFields, writeDemoAuditAt } from '../../lib/audit';
import { sqlUtc } from '../../lib/audit/hash';
import { roleLabels } from '../../lib/auth/roles';
import { addBusinessDays, makeCalendar } from '../../lib/clocks/business-days';
import { addDays } from '../../lib/clocks/dates';
import { reportDueOn } from '../../lib/complaints/deadline';
import { type ComplaintRow, complaintAuditFields, complaintKind } from '../../lib/complaints/kind';
import { type ComplainantKind, type IntakeChannel, isNonDefectCategory, reportKindFor } from '../../lib/complaints/labels';
import { draftLetterHtml } from '../../lib/complaints/letter';
import { formatRecordNumber } from '../../lib/records/number-format';
import { numberPrefixes } from '../../lib/records/types';
import { planEvent, resolveSnapshot } from '../../lib/records/workflow';
import { loadRelated, signedContentOf } from '../../lib/records/write-path';
import { signatureContentHash, signatureManifestHash } from '../../lib/signatures/hash';
import type { SignatureMeaning } from '../../lib/signatures/meanings';
import { type ComplaintEventType, complaintMachine } from '../../workflows/complaint';
import type { ComplaintState } from '../../workflows/states';
import type { Tx } from '../../db/client';
import { batches, capsuleDefects, complaints, deviations, products, recordLinks, signatures, siteClosures, stateHistory, users } from '../../db/schema';
import { mulberry32, randomInt } from './prng';
import { companyName } from './scenario';

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
 * Each step is checked against the complaint machine with the demo user who took it and written as
 * the write path writes it (state history, audit entries old → new, signatures), dated when it
 * happened. Numbers CMP-2026-0001... go in order of receipt through the record counter, so the next
 * live complaint continues the sequence. Lots are picked from the seeded batches by rule (the newest
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

interface Person {
  id: number;
  email: string;
  name: string;
  title: string;
  role: 'operator' | 'supervisor' | 'qa_investigator' | 'qa_approver' | 'admin';
}

const at = (day: string, time: string) => new Date(`${day}T${time}:00.000Z`);
const scenarioLast = new Date('2026-11-27T23:00:00.000Z');

/** Writes the demo complaints with their history, audit entries, signatures and links. */
export async function seedComplaints(tx: Tx): Promise<void> {
  const rand = mulberry32(0xc0_2026);
  const people = new Map<string, Person>(
    (await tx.select({ id: users.id, email: users.email, name: users.name, title: users.title, role: users.role }).from(users)).map((u) => [u.email, u]),
  );
  const person = (email: string) => {
    const p = people.get(email);
    if (!p) throw new Error(`demo user ${email} missing`);
    return p;
  };
  const productRows = new Map((await tx.select().from(products)).map((p) => [p.code, p]));
  const defectIds = new Map((await tx.select({ id: capsuleDefects.id, code: capsuleDefects.code }).from(capsuleDefects)).map((d) => [d.code, d.id]));
  const closures = await tx.select({ day: siteClosures.day, description: siteClosures.description }).from(siteClosures).where(eq(siteClosures.active, true));
  const siteCalendar = makeCalendar(closures);
  const lots = new Map<string, typeof batches.$inferSelect>();

  const ordered = [...stories].sort((a, b) => a.receivedOn.localeCompare(b.receivedOn));
  for (const [index, story] of ordered.entries()) {
    const product = productRows.get(story.product);
    if (!product) throw new Error(`demo complaint ${story.key}: no product ${story.product}`);
    let batch: typeof batches.$inferSelect | null = null;
    if (story.sameLotAs) {
      batch = lots.get(story.sameLotAs) ?? null;
      if (!batch) throw new Error(`demo complaint ${story.key}: ${story.sameLotAs} comes later or has no lot`);
    } else if (!story.unknownLot) {
      const [found] = await tx
        .select()
        .from(batches)
        .where(
          and(
            eq(batches.productId, product.id),
            eq(batches.status, 'released'),
            gt(batches.unitsShipped, 0),
            lte(batches.manufacturedOn, addDays(story.receivedOn, -7)),
          ),
        )
        .orderBy(desc(batches.manufacturedOn), asc(batches.id))
        .limit(1);
      batch = found ?? null;
      if (!batch) throw new Error(`demo complaint ${story.key}: no shipped lot of ${story.product} before ${story.receivedOn}`);
    }
    if (batch) lots.set(story.key, batch);

    const number = formatRecordNumber(numberPrefixes.complaint, 2026, index + 1);
    await tx.execute(
      sql`INSERT INTO record_counters (prefix, year, last_value) VALUES (${numberPrefixes.complaint}, ${2026}, LAST_INSERT_ID(1))
          ON DUPLICATE KEY UPDATE last_value = LAST_INSERT_ID(last_value + 1)`,
    );
    const [counter] = (await tx.execute(sql`SELECT LAST_INSERT_ID() AS value`)) as unknown as [{ value: number | string }[]];
    const given = formatRecordNumber(numberPrefixes.complaint, 2026, Number(counter[0]?.value));
    if (given !== number) throw new Error(`the complaint counter gave ${given} where the demo expects ${number}`);

    const taker = person(story.takenBy);
    const createdAt = at(story.receivedOn, `${String(13 + randomInt(rand, 0, 3)).padStart(2, '0')}:${String(randomInt(rand, 0, 5) * 10).padStart(2, '0')}`);
    let row: ComplaintRow = {
      id: 0,
      number,
      status: 'received',
      version: 1,
      receivedOn: story.receivedOn,
      channel: story.channel,
      complainantName: story.name,
      complainantContact: story.contact,
      complainantKind: story.kind,
      productId: product.id,
      batchId: batch?.id ?? null,
      lotAsReported: batch?.lotNumber ?? story.unknownLot ?? null,
      lotUnknown: !batch,
      description: story.description,
      unitsAffected: story.units ?? null,
      personHarmed: Boolean(story.harm),
      harmDescription: story.harm ?? null,
      samplesReturning: story.samples ?? false,
      category: null,
      defectId: null,
      adverseEvent: null,
      seriousAdverseEvent: null,
      reportable: null,
      reportKind: null,
      reportDueOn: null,
      reportSubmittedAt: null,
      assessmentRationale: null,
      reportabilityDecidedAt: null,
      reportabilityDecidedBy: null,
      investigationSkipReason: null,
      retainedSamplesChecked: null,
      retainedSamplesNote: null,
      investigationSummary: null,
      responseText: null,
      responseChannel: null,
      responseSentText: null,
      responseSentAt: null,
      responseSentBy: null,
      reopenReason: null,
      ownerId: null,
      createdBy: taker.id,
      dueAt: new Date(`${addBusinessDays(story.receivedOn, 30, siteCalendar)}T00:00:00.000Z`),
      closedAt: null,
      createdAt,
      updatedAt: createdAt,
    };
    const { id: _id, ...insertValues } = row;
    const [inserted] = await tx.insert(complaints).values(insertValues).$returningId();
    row = { ...row, id: inserted!.id };
    const complaintId = row.id;
    await tx.insert(stateHistory).values({ recordType: 'complaint', recordId: complaintId, event: 'create', fromState: null, toState: 'received', userId: taker.id, comment: null, at: createdAt });
    await writeDemoAuditAt(
      tx,
      { actor: taker, recordType: 'complaint', recordId: complaintId, action: 'create', changes: diffFields(null, row, ['number', 'status', ...complaintAuditFields]) },
      createdAt,
    );

    let last = createdAt;
    const step = (daysAfter: number, time: string) => {
      const t = at(addDays(story.receivedOn, daysAfter), time);
      const when = t < last ? new Date(last.getTime() + 10 * 60_000) : t;
      if (when > scenarioLast) throw new Error(`demo complaint ${story.key}: a step falls after the scenario`);
      last = when;
      return when;
    };
    const edit = async (action: string, by: Person, t: Date, changes: Partial<ComplaintRow>, extra: { field: string; from: unknown; to: unknown }[] = []) => {
      const before = row;
      row = { ...row, ...changes, version: row.version + 1, updatedAt: t };
      await writeDemoAuditAt(tx, { actor: by, recordType: 'complaint', recordId: complaintId, action, changes: [...diffFields(before, row, complaintAuditFields), ...extra] }, t);
    };
    const event = async (type: ComplaintEventType, by: Person, t: Date, reason: string | null, changes: Partial<ComplaintRow> = {}) => {
      const snapshot = resolveSnapshot(complaintMachine, row.status, {
        ownerId: row.ownerId,
        assessmentRecorded: Boolean(row.category && row.adverseEvent !== null && row.reportable !== null && row.assessmentRationale),
        qualityDefectPossible: row.category !== 'no_defect_found',
        investigationRecorded: row.retainedSamplesChecked !== null && Boolean(row.investigationSummary),
        responseSent: row.responseSentAt !== null,
      });
      const plan = planEvent(complaintMachine, snapshot, { type, actor: by });
      if (!plan.ok) throw new Error(`demo complaint ${story.key}: ${by.email} cannot ${type} in ${row.status} (${plan.problem})`);
      if (plan.rules.reasonRequired && !reason) throw new Error(`demo complaint ${story.key}: ${type} needs a reason`);
      const before = row;
      row = { ...row, ...changes, status: plan.nextState as ComplaintState, version: row.version + 1, updatedAt: t };
      await tx.insert(stateHistory).values({ recordType: 'complaint', recordId: complaintId, event: type, fromState: before.status, toState: row.status, userId: by.id, comment: reason, at: t });
      await writeDemoAuditAt(
        tx,
        { actor: by, recordType: 'complaint', recordId: complaintId, action: type, changes: diffFields(before, row, ['status', ...complaintAuditFields]), reason },
        t,
      );
      if (plan.rules.signature) await insertSignature(tx, by, row, plan.rules.signature, reason, t);
    };

    if (story.stage === 'received') {
      await tx.update(complaints).set(finalColumns(row)).where(eq(complaints.id, complaintId));
      continue;
    }
    const owner = person(story.owner ?? investigator);
    await event('start_assessment', owner, step(1, '08:40'), null, { ownerId: owner.id });
    if (story.category) {
      const kind = reportKindFor[product.regulatoryClass];
      await edit('record_assessment', owner, step(1, '10:15'), {
        category: story.category,
        defectId: isNonDefectCategory(story.category) ? null : (defectIds.get(story.category) ?? null),
        adverseEvent: story.adverse ?? false,
        seriousAdverseEvent: story.adverse ? (story.serious ?? false) : false,
        reportable: story.reportable ?? false,
        reportKind: story.reportable ? kind : null,
        reportDueOn: story.reportable ? reportDueOn(kind, story.receivedOn) : null,
        assessmentRationale: story.rationale ?? null,
      });
    }
    if (story.stage === 'assessment') {
      await tx.update(complaints).set(finalColumns(row)).where(eq(complaints.id, complaintId));
      continue;
    }
    if (story.skip) {
      const t = step(1, '11:30');
      await event('skip_investigation', owner, t, story.skip, { reportabilityDecidedAt: t, reportabilityDecidedBy: owner.id, investigationSkipReason: story.skip });
    } else {
      const t = step(1, '11:30');
      await event('complete_assessment', owner, t, null, { reportabilityDecidedAt: t, reportabilityDecidedBy: owner.id });
      if (story.reportable && story.reportedAfterDays !== undefined) {
        const submitted = addDays(story.receivedOn, story.reportedAfterDays);
        await edit('record_report_submitted', owner, step(story.reportedAfterDays, '16:00'), { reportSubmittedAt: new Date(`${submitted}T00:00:00.000Z`) });
      }
      if (story.retained) {
        await edit('record_investigation', owner, step(4, '14:20'), {
          retainedSamplesChecked: story.retained.checked,
          retainedSamplesNote: story.retained.note,
          investigationSummary: story.summary ?? null,
        });
      }
      if (story.linkDeviation && batch) {
        const [dev] = await tx
          .select({ id: deviations.id, number: deviations.number })
          .from(deviations)
          .innerJoin(batches, eq(batches.id, deviations.batchId))
          .where(and(eq(batches.machineId, batch.machineId ?? -1), lte(deviations.createdAt, last)))
          .orderBy(desc(deviations.createdAt))
          .limit(1);
        if (dev?.number) {
          const t = step(4, '15:00');
          await tx.insert(recordLinks).values({ fromType: 'complaint', fromId: complaintId, toType: 'deviation', toId: dev.id, relation: 'related_deviation', createdBy: owner.id, createdAt: t });
          await edit('link_deviation', owner, t, {}, [{ field: 'linked deviation', from: null, to: dev.number }]);
        }
      }
      if (story.stage === 'investigation') {
        await tx.update(complaints).set(finalColumns(row)).where(eq(complaints.id, complaintId));
        continue;
      }
      await event('complete_investigation', owner, step(5, '11:00'), null);
    }
    if (story.answer) {
      const letter = draftLetterHtml({
        siteName: companyName,
        number,
        complainantName: story.name,
        receivedOn: story.receivedOn,
        product: `${product.name} ${product.strength}`,
        lot: row.lotAsReported,
        reported: story.description,
        found: story.answer.text,
        signerName: owner.name,
        signerTitle: owner.title || roleLabels[owner.role],
      }).replace(/<p>\[Say[^<]*\]<\/p>\n?/, '');
      await edit('write_response', owner, step(6, '10:00'), { responseText: letter });
      const sentAt = step(6, '15:30');
      await edit('send_response', owner, sentAt, { responseChannel: story.answer.channel, responseSentText: letter, responseSentAt: sentAt, responseSentBy: owner.id });
      if (story.stage === 'closed') {
        const t = step(7, '09:30');
        await event('close', person(approver), t, null, { closedAt: t });
      }
    }
    await tx.update(complaints).set(finalColumns(row)).where(eq(complaints.id, complaintId));
  }
}

function finalColumns(row: ComplaintRow) {
  const { id: _id, number: _number, createdAt: _createdAt, ...rest } = row;
  return rest;
}

async function insertSignature(tx: Tx, signer: Person, row: ComplaintRow, meaning: SignatureMeaning, reason: string | null, t: Date): Promise<void> {
  const contentHash = signatureContentHash('complaint', row.id, row.version, signedContentOf(complaintKind, meaning, row, await loadRelated(complaintKind, tx, row))!);
  const manifest = {
    recordType: 'complaint',
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
      recordType: 'complaint',
      recordId: row.id,
      action: 'signed',
      changes: [{ field: 'signature', from: null, to: { id: inserted!.id, meaning, recordVersion: row.version, contentHash } }],
      reason,
    },
    t,
  );
}
