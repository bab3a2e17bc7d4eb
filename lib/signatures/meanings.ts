/*
 * What a signature means (21 CFR 11.50(a)(3): every signed record shows the meaning associated with
 * the signature). A closed list, so reports and filters can rely on it. Pure: importable from the
 * client, the workflows' tests and the schema.
 */

export const signatureMeanings = [
  'authored',
  'reviewed',
  'approved',
  'rejected',
  'verified',
  'responsible',
  'investigation_complete',
  'effective',
  'not_effective',
  'reportability_decided',
] as const;
export type SignatureMeaning = (typeof signatureMeanings)[number];

/** How the meaning reads next to the printed name, e.g. "Approved by Henrike Mbeki-Strand". */
export const signatureMeaningLabels: Record<SignatureMeaning, string> = {
  authored: 'Authored',
  reviewed: 'Reviewed',
  approved: 'Approved',
  rejected: 'Rejected',
  verified: 'Verified',
  responsible: 'Responsible',
  investigation_complete: 'Investigation complete',
  effective: 'Effective',
  not_effective: 'Not effective',
  reportability_decided: 'Reportability decided',
};

/** The sentence the signer reads before entering the password. */
export const signatureMeaningStatements: Record<SignatureMeaning, string> = {
  authored: 'I am the author of this record and its content is true and complete.',
  reviewed: 'I have reviewed this record.',
  approved: 'I approve this record as it stands.',
  rejected: 'I reject this record as it stands.',
  verified: 'I have checked this myself and confirm it is correct.',
  responsible: 'I take responsibility for this record.',
  investigation_complete:
    'I have completed this investigation; the root cause, product impact and batch recommendations are as recorded.',
  effective:
    'I have reviewed the evidence against the effectiveness criteria written in the plan; the actions achieved them.',
  not_effective:
    'I have reviewed the evidence against the effectiveness criteria written in the plan; the actions did not achieve them, for the reason I give.',
  reportability_decided:
    'I have assessed this complaint; its category, whether it is an adverse event and whether it is serious, and whether it must be reported to the regulator, are as recorded, for the reasons given.',
};

export function isSignatureMeaning(value: unknown): value is SignatureMeaning {
  return typeof value === 'string' && (signatureMeanings as readonly string[]).includes(value);
}
