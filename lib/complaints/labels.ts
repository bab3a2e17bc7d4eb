import type { RegulatoryClockKind } from '../clocks/regulatory';
import type { ComplaintEventType } from '../../workflows/complaint';
import type { ComplaintState } from '../../workflows/states';

/*
 * Words for the complaint lifecycle, its catalogue and its decisions, shared by pages, messages, mail
 * and the seed. Pure.
 */

export const complaintStateLabels: Record<ComplaintState, string> = {
  received: 'Received',
  assessment: 'In assessment',
  investigation: 'Under investigation',
  response: 'Answer to send',
  closed: 'Closed',
};

export const complaintEventLabels: Record<ComplaintEventType, string> = {
  start_assessment: 'Start the assessment',
  complete_assessment: 'Sign the assessment',
  skip_investigation: 'Skip the investigation',
  complete_investigation: 'Sign the investigation',
  close: 'Close the complaint',
  reopen_assessment: 'Reopen for assessment',
  reopen_investigation: 'Reopen for investigation',
};

export const complainantKinds = ['pharmacy', 'distributor', 'consumer', 'other'] as const;
export type ComplainantKind = (typeof complainantKinds)[number];
export const complainantKindLabels: Record<ComplainantKind, string> = {
  pharmacy: 'Pharmacy',
  distributor: 'Distributor',
  consumer: 'Consumer',
  other: 'Other',
};

/** How the complaint reached the site. */
export const intakeChannels = ['phone', 'email', 'letter', 'web_form', 'in_person'] as const;
export type IntakeChannel = (typeof intakeChannels)[number];
export const intakeChannelLabels: Record<IntakeChannel, string> = {
  phone: 'Telephone',
  email: 'E-mail',
  letter: 'Letter',
  web_form: 'Web form',
  in_person: 'In person',
};

/*
 * Categories beside the capsule defects of the catalogue (capsule_defects.code): what customers
 * report that the filling-line catalogue does not name. Only "no defect found" rules out a quality
 * defect: capsules stuck together, a packaging, labelling, taste or odour complaint, or a suspected
 * reaction may still come from the product (21 CFR 211.198(b)(2), EU GMP 8.9), so it is investigated.
 */
export const nonDefectCategories = ['stuck_together', 'packaging', 'labelling', 'taste_or_odour', 'suspected_adverse_reaction', 'no_defect_found'] as const;
export type NonDefectCategory = (typeof nonDefectCategories)[number];
export const nonDefectCategoryLabels: Record<NonDefectCategory, string> = {
  stuck_together: 'Capsules stuck together',
  packaging: 'Packaging',
  labelling: 'Labelling',
  taste_or_odour: 'Taste or odour',
  suspected_adverse_reaction: 'Suspected adverse reaction',
  no_defect_found: 'No defect found',
};
const categoriesRulingOutADefect: readonly string[] = ['no_defect_found'] satisfies NonDefectCategory[];

export function isNonDefectCategory(value: string): value is NonDefectCategory {
  return (nonDefectCategories as readonly string[]).includes(value);
}

/** Whether a category leaves a quality defect possible; an unset category leaves everything open. */
export function qualityDefectPossible(category: string | null): boolean {
  return category === null || !categoriesRulingOutADefect.includes(category);
}

export const reportKindLabels: Record<RegulatoryClockKind, string> = {
  field_alert_report: 'Field alert report (drug, 3 working days)',
  dietary_supplement_sae: 'Serious adverse event report (dietary supplement, 15 business days)',
};

export const responseChannelLabels = { email: 'E-mail', post: 'Post' } as const;

/*
 * The definitions shown beside the adverse-event questions, in our own words. Drugs: 21 CFR 314.80(a).
 * Dietary supplements: FD&C Act §761(a), 21 U.S.C. 379aa-1(a).
 */
export const adverseEventDefinitions = {
  drug: {
    adverseEvent:
      'Adverse drug experience (21 CFR 314.80(a)): any unwanted event linked to the use of the drug in people, whether or not it is thought to be caused by the drug — in normal use, an overdose, misuse or abuse, on stopping it, or a lack of the expected effect.',
    serious:
      'Serious (21 CFR 314.80(a)): the event caused death, was life-threatening, needed a hospital stay or made one longer, left a lasting or significant disability, or caused a birth defect — or medical judgement finds it as grave because treatment was needed to prevent one of those outcomes.',
  },
  supplement: {
    adverseEvent:
      'Adverse event (21 U.S.C. 379aa-1(a)(1)): any health-related event linked to the use of the dietary supplement that is unwanted by the person, whether or not the supplement caused it.',
    serious:
      'Serious (21 U.S.C. 379aa-1(a)(2)): the event led to death, a life-threatening experience, a hospital stay, a lasting or significant disability or incapacity, or a birth defect — or needed medical or surgical treatment, in reasonable medical judgement, to prevent one of those outcomes.',
  },
} as const;

export type RegulatoryClass = keyof typeof adverseEventDefinitions;

/** The one report kind that applies to a product class (lib/clocks/regulatory.ts). */
export const reportKindFor: Record<RegulatoryClass, RegulatoryClockKind> = {
  drug: 'field_alert_report',
  supplement: 'dietary_supplement_sae',
};

/** Relation names in record_links from a complaint. */
export const complaintLinkRelations = { deviation: 'related_deviation', capa: 'related_capa', raisedCapa: 'raised_capa' } as const;
