import type { classifications } from '../../db/schema';

/*
 * The capsule defect catalogue shipped with the demo. Default classifications and severities are
 * common practice for visual inspection of filled hard capsules (no single published table fixes
 * them); a site reviews and adjusts them in its own catalogue. Critical defects carry the
 * quarantine caution shown whenever the defect is picked.
 */

export interface DefectSeed {
  code: string;
  name: string;
  description: string;
  defaultClassification: (typeof classifications)[number];
  /** 1-10, the risk scale's severity. */
  defaultSeverity: number;
  caution: string | null;
}

const quarantineFirst =
  'Critical defect: stop the line and quarantine the batch in process and any finished containers from it before anything else. ' +
  'Nothing is released, reworked or destroyed without QA authorisation. Follow the site quarantine SOP.';

const machineSafety =
  'Inspect or adjust the filler only with power isolated and interlocks intact, as the site SOPs require.';

export const defectCatalogue: readonly DefectSeed[] = [
  {
    code: 'cracked_shell',
    name: 'Cracked or split shell',
    description:
      'A crack or split in the cap or body wall, often from brittle (dry) shells, a misaligned or dented ring, or excessive closing pressure. Powder can leak and the dose is no longer protected.',
    defaultClassification: 'major',
    defaultSeverity: 6,
    caution: null,
  },
  {
    code: 'broken_body',
    name: 'Broken body',
    description:
      'Part of the body is missing or crushed, typically from ring damage, a jam at the closing station, or pins striking the body during ejection. The capsule cannot hold its fill.',
    defaultClassification: 'major',
    defaultSeverity: 7,
    caution: null,
  },
  {
    code: 'dented_shell',
    name: 'Dented shell',
    description:
      'A visible dent or indentation in the cap or body without a breach of the wall, e.g. from handling, pin pressure or soft shells.',
    defaultClassification: 'minor',
    defaultSeverity: 3,
    caution: null,
  },
  {
    code: 'light_fill',
    name: 'Light fill',
    description:
      'Fill mass below the lower limit for the product: the patient or consumer receives less than the labelled amount. Usual causes are a low powder level in the hopper, poor flow, auger speed or tamping settings, or a partly blocked ring.',
    defaultClassification: 'major',
    defaultSeverity: 7,
    caution: null,
  },
  {
    code: 'heavy_fill',
    name: 'Heavy fill',
    description:
      'Fill mass above the upper limit for the product, e.g. from over-compaction, a high powder bed or auger settings. Also tends to cause poor closure and powder on the shell.',
    defaultClassification: 'major',
    defaultSeverity: 6,
    caution: null,
  },
  {
    code: 'empty_capsule',
    name: 'Empty capsule',
    description:
      'A closed capsule with no fill, e.g. a body that was not in the ring during filling, a powder station that ran dry, or an unseparated capsule that passed through. A dose is missing entirely.',
    defaultClassification: 'critical',
    defaultSeverity: 8,
    caution: `${quarantineFirst} Empty capsules are rarely alone: assume others in the batch are empty until the batch is inspected.`,
  },
  {
    code: 'unseparated',
    name: 'Unseparated capsule',
    description:
      'Cap and body were not separated by the vacuum station and pass through the filler together, unfilled. Points to low vacuum, worn ring bores or out-of-specification empty shells.',
    defaultClassification: 'major',
    defaultSeverity: 5,
    caution: null,
  },
  {
    code: 'unjoined_open',
    name: 'Unjoined or open capsule',
    description:
      'Cap not locked onto the body (pre-lock or open), so powder can escape and the capsule can come apart. Usual causes: closing pins set short, heavy fill, or cap and body ring misalignment.',
    defaultClassification: 'major',
    defaultSeverity: 6,
    caution: null,
  },
  {
    code: 'telescoped',
    name: 'Telescoped capsule',
    description:
      'The body has been pushed through the cap or the cap driven too far over the body during closing, often splitting the shell and losing fill.',
    defaultClassification: 'major',
    defaultSeverity: 6,
    caution: null,
  },
  {
    code: 'double_cap',
    name: 'Double cap',
    description:
      'A second cap placed over the cap of a closed capsule, or a cap closed onto a cap, hiding what is underneath. Often from a cap left in the ring after a jam.',
    defaultClassification: 'major',
    defaultSeverity: 5,
    caution: null,
  },
  {
    code: 'powder_outside',
    name: 'Powder on outside of shell',
    description:
      'Powder adhering to the outer surface of the shell, from overfilling, a leaking closure or missing dedusting. A cross-contamination and appearance concern.',
    defaultClassification: 'minor',
    defaultSeverity: 3,
    caution: null,
  },
  {
    code: 'foreign_matter',
    name: 'Foreign matter',
    description:
      'Material that is not part of the product in or on the capsule: metal, plastic, fibre, glove fragments, insects, dark particles or product residue from another batch.',
    defaultClassification: 'critical',
    defaultSeverity: 9,
    caution: `${quarantineFirst} Keep the affected capsules and any fragment as evidence. ${machineSafety}`,
  },
  {
    code: 'mix_up',
    name: 'Wrong product or mix-up',
    description:
      'Capsules, shells or powder of another product, strength or lot found in the batch, or the wrong shell or powder used for the batch.',
    defaultClassification: 'critical',
    defaultSeverity: 10,
    caution: `${quarantineFirst} Quarantine every batch run on the line since the last clean line clearance, and repeat line clearance before restarting.`,
  },
  {
    code: 'print_colour',
    name: 'Print or colour defect',
    description:
      'Missing, smeared or incorrect imprint, or a shell colour that differs from the specification, without an effect on the fill.',
    defaultClassification: 'minor',
    defaultSeverity: 2,
    caution: null,
  },
  {
    code: 'shell_bubble_pinhole',
    name: 'Bubble or pinhole in shell',
    description: 'An air bubble or pinhole in the shell wall from shell manufacture; a pinhole can leak powder.',
    defaultClassification: 'minor',
    defaultSeverity: 4,
    caution: null,
  },
];
