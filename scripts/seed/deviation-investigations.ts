import { type CauseBranch, probableCauses } from '../../lib/causes';
import type { CauseAnalysis, WhyStep } from '../../lib/deviations/investigation-schema';

/*
 * The investigation content of the demo deviations: a short rich-text report, five whys and the
 * marks on the cause-and-effect view, keyed by defect code so every deviation of a kind reads like
 * the same site's practice. Pure and deterministic. The story's own findings (report text, root
 * cause, impact) come in from scripts/seed/deviations.ts; this adds the structure around them.
 */

export interface StoryFindings {
  report: string;
  category: CauseBranch;
  rootCause: string;
  productImpact: string;
}

export interface InvestigationColumns {
  investigationReport: string;
  fiveWhys: string;
  causeAnalysis: string;
}

interface DefectPlaybook {
  /** The first whys, from the defect down to the mechanism; the story's root cause answers the last. */
  whys: WhyStep[];
  /** Catalogue causes ruled out, with the evidence that ruled them out. */
  ruledOut: Record<string, string>;
  /** The catalogue cause that contributed, by root-cause category, with its note. */
  contributing: Partial<Record<CauseBranch, { causeId: string; note: string }>>;
  /** A table of readings for the report, when the defect is measured. */
  table?: { caption: string; head: string[]; rows: string[][] };
}

const fillWeights = (target: number, readings: number[]) => ({
  caption: 'Fill weights at the first check after the event (target ' + target + ' mg, ±7.5 %)',
  head: ['Capsule', 'Net fill (mg)', 'Deviation from target'],
  rows: readings.map((r, i) => [String(i + 1), String(r), `${(((r - target) / target) * 100).toFixed(1)} %`]),
});

const playbooks: Record<string, DefectPlaybook> = {
  broken_body: {
    whys: [
      { why: 'Why were capsule bodies broken at the outfeed?', because: 'Bodies split as they were pulled into the body ring.' },
      { why: 'Why did they split in the ring?', because: 'They met an edge in the bore instead of seating freely.' },
    ],
    ruledOut: {
      vacuum_too_high: 'Vacuum gauge read 10.5 inHg, inside the 9–12 inHg range, throughout the shift.',
      shells_too_dry: 'Shell lot moisture on the certificate 14.2 %; loss on drying re-tested 14.0 %.',
      room_too_dry: 'Room log 42–45 % RH for the whole shift.',
    },
    contributing: {
      machine: { causeId: 'dented_ring', note: 'Body plate bores inspected under the lamp: damage found on the segment named in the root cause.' },
    },
  },
  cracked_shell: {
    whys: [
      { why: 'Why were shells cracked?', because: 'Caps and bodies were stressed at separation.' },
      { why: 'Why were they stressed?', because: 'The ring bore did not let the body drop square.' },
    ],
    ruledOut: {
      vacuum_too_high: 'Vacuum 10 inHg at the check and in the shift log.',
      shells_too_dry: 'Loss on drying of retained shells 13.8 %.',
      room_too_dry: 'Room 44 % RH.',
    },
    contributing: { machine: { causeId: 'dented_ring', note: 'Dent visible on the segment after cleaning; matches where the cracks started.' } },
  },
  dented_shell: {
    whys: [
      { why: 'Why were capsules dented?', because: 'Closed capsules were pressed out of line at closing.' },
      { why: 'Why out of line?', because: 'The closing pins no longer met the capsules squarely.' },
    ],
    ruledOut: {
      shells_too_moist: 'Shell moisture 14.6 % on the certificate, in range.',
      room_too_humid: 'Room 46 % RH.',
      handling: 'Dents seen straight from the machine, before any handling.',
    },
    contributing: { machine: { causeId: 'closing_pressure', note: 'Closing pressure at the validated value, but pins worn so the force landed off-centre.' } },
  },
  light_fill: {
    whys: [
      { why: 'Why were capsules light?', because: 'Less powder was dosed into each body.' },
      { why: 'Why was less powder dosed?', because: 'The powder filled the dosing bores less densely than at validation.' },
    ],
    ruledOut: {
      balance_tare: 'Balance checked with the 500 mg reference weight before and after: within 0.2 mg.',
      dosing_shoe_clearance: 'Shoe clearance measured 0.3 mm, as set.',
      table_speed: 'Table speed unchanged from the batch record.',
    },
    contributing: {
      material: { causeId: 'powder_flow', note: 'Tapped density and flow of the lot below the previous lot (certificate and in-house test).' },
      method: { causeId: 'hopper_level', note: 'Hopper level below the minimum mark while the powder was delayed.' },
    },
    table: fillWeights(600, [551, 574, 562, 598, 569, 603]),
  },
  heavy_fill: {
    whys: [
      { why: 'Why were capsules heavy?', because: 'More powder was dosed into each body.' },
      { why: 'Why more powder?', because: 'The auger fed the dosing station faster than the validated setting.' },
    ],
    ruledOut: {
      balance_tare: 'Balance verified with the reference weight: within 0.2 mg.',
      dented_ring: 'Rings inspected at the next changeover: no damage.',
      powder_flow: 'Same powder lot as the previous good batch.',
    },
    contributing: {
      machine: { causeId: 'auger_speed', note: 'Auger speed found above the validated range.' },
      people: { causeId: 'setting_change_unrecorded', note: 'Setting changed during the shift; not on the batch record.' },
      method: { causeId: 'setting_change_unrecorded', note: 'Handover did not include the validated settings.' },
    },
    table: fillWeights(500, [536, 541, 529, 502, 547, 538]),
  },
  unseparated: {
    whys: [
      { why: 'Why did capsules stay closed?', because: 'Caps and bodies were not pulled apart at the separation station.' },
      { why: 'Why not pulled apart?', because: 'The vacuum at the body ring was too low.' },
    ],
    ruledOut: {
      shells_too_moist: 'Shell moisture 14.1 %, in range.',
      room_too_humid: 'Room 45 % RH.',
      shell_maker_change: 'Same shell maker and size as the previous batches.',
    },
    contributing: { machine: { causeId: 'vacuum_too_low', note: 'Gauge read below 9 inHg when the defect was found.' } },
  },
  telescoped: {
    whys: [
      { why: 'Why were capsules telescoped?', because: 'Caps were pushed too far over the bodies at closing.' },
      { why: 'Why too far?', because: 'Closing force was not matched to the ring and shells.' },
    ],
    ruledOut: {
      shells_too_dry: 'Shell moisture 13.9 %.',
      room_too_dry: 'Room 43 % RH.',
      shell_dimensions: 'Cap and body lengths of 20 shells within the maker’s tolerance.',
    },
    contributing: { machine: { causeId: 'ring_alignment', note: 'Ring seating checked: worn, so the body sat lower than the pin expected.' } },
  },
  foreign_matter: {
    whys: [
      { why: 'Why was there foreign matter in capsules?', because: 'Dark particles came with the powder from the dosing station.' },
      { why: 'Where did the particles come from?', because: 'Metal shed inside the powder station.' },
    ],
    ruledOut: {
      incoming_material: 'Retained sample of the powder lot free of particles under the lamp.',
      gowning: 'Particles metallic (magnet test), not fibres.',
      room_cleanliness: 'Room cleaning records complete; no particles on settle surfaces.',
    },
    contributing: { machine: { causeId: 'wear_parts', note: 'Scoring found on the auger and feed tube.' } },
  },
  double_cap: {
    whys: [
      { why: 'Why were there double-capped capsules?', because: 'A second cap was placed on an already closed capsule.' },
      { why: 'Why was a capsule still in the ring?', because: 'The rectifier and ring were not emptied after a jam.' },
    ],
    ruledOut: {
      vacuum_too_low: 'Vacuum 10.5 inHg.',
      interlock_stop: 'No interlock stop in the machine log at the time.',
    },
    contributing: {
      method: { causeId: 'ring_not_cleared', note: 'Capsules left in the ring after the jam was cleared.' },
      people: { causeId: 'visual_check_missed', note: 'The in-process check after restart was skipped.' },
    },
  },
  unjoined_open: {
    whys: [
      { why: 'Why were capsules open?', because: 'Caps did not lock onto the bodies at closing.' },
      { why: 'Why did they not lock?', because: 'The shells had softened and gave way under the closing pin.' },
    ],
    ruledOut: {
      closing_pressure: 'Closing pressure at the validated value.',
      ring_alignment: 'Rings aligned at the changeover check.',
      shell_dimensions: 'Shell dimensions in tolerance.',
    },
    contributing: { environment: { causeId: 'excess_powder_on_ring', note: 'Damp powder built up on the ring faces and kept caps from seating.' } },
  },
};

const generic: DefectPlaybook = {
  whys: [{ why: 'Why did the defect occur?', because: 'The process left its validated conditions.' }],
  ruledOut: {},
  contributing: {},
};

function escapeHtml(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
}

function tableHtml(t: NonNullable<DefectPlaybook['table']>): string {
  const cell = (tag: 'th' | 'td', v: string) => `<${tag} colspan="1" rowspan="1"><p>${escapeHtml(v)}</p></${tag}>`;
  return (
    `<p><strong>${escapeHtml(t.caption)}</strong></p><table><tbody>` +
    `<tr>${t.head.map((h) => cell('th', h)).join('')}</tr>` +
    t.rows.map((r) => `<tr>${r.map((v) => cell('td', v)).join('')}</tr>`).join('') +
    '</tbody></table>'
  );
}

function playbookOf(defectCode: string | null): DefectPlaybook {
  return (defectCode ? playbooks[defectCode] : undefined) ?? generic;
}

/** What was looked at: the catalogue's check for each cause the investigator concluded on. */
function examined(defectCode: string | null, p: DefectPlaybook): string[] {
  const catalogue = defectCode ? probableCauses(defectCode) : [];
  const concluded = new Set([...Object.keys(p.ruledOut), ...Object.values(p.contributing).map((c) => c.causeId)]);
  return catalogue.filter((c) => concluded.has(c.id)).map((c) => c.check);
}

function analysisFor(defectCode: string | null, p: DefectPlaybook, findings: StoryFindings | null): CauseAnalysis {
  const known = new Set((defectCode ? probableCauses(defectCode) : []).map((c) => c.id));
  const catalogue: CauseAnalysis['catalogue'] = Object.entries(p.ruledOut)
    .filter(([id]) => known.has(id))
    .map(([causeId, note]) => ({ causeId, state: 'ruled_out' as const, note }));
  if (!findings) return { catalogue, own: [] };
  const contributing = p.contributing[findings.category];
  if (contributing && known.has(contributing.causeId) && !p.ruledOut[contributing.causeId]) {
    catalogue.push({ causeId: contributing.causeId, state: 'contributing', note: contributing.note });
  }
  // The root cause as the investigator worded it, on the branch of its category.
  return { catalogue, own: [{ branch: findings.category, cause: findings.rootCause, state: 'root_cause', note: '' }] };
}

/** The finished investigation: report with headings, a list (and a table for weight defects), five whys, marks. */
export function completeInvestigation(defectCode: string | null, findings: StoryFindings): InvestigationColumns {
  const p = playbookOf(defectCode);
  const checks = examined(defectCode, p);
  const report =
    `<h2>Summary</h2><p>${escapeHtml(findings.report)}</p>` +
    (checks.length > 0 ? `<h3>What was examined</h3><ul>${checks.map((c) => `<li><p>${escapeHtml(c)}</p></li>`).join('')}</ul>` : '') +
    (p.table ? tableHtml(p.table) : '') +
    `<h3>Conclusion</h3><p>${escapeHtml(findings.rootCause)}</p><p><strong>Product impact:</strong> ${escapeHtml(findings.productImpact)}</p>`;
  const whys: WhyStep[] = [...p.whys, { why: 'Why did that happen on this batch?', because: findings.rootCause }];
  return { investigationReport: report, fiveWhys: JSON.stringify(whys), causeAnalysis: JSON.stringify(analysisFor(defectCode, p, findings)) };
}

/** The first submission of an investigation later returned for rework: complete fields, a thinner report. */
export function firstSubmission(defectCode: string | null, findings: StoryFindings): InvestigationColumns {
  const full = completeInvestigation(defectCode, findings);
  const firstSentence = findings.report.split('. ')[0] + '.';
  return {
    ...full,
    investigationReport: `<h2>Summary</h2><p>${escapeHtml(firstSentence)}</p><h3>Conclusion</h3><p>${escapeHtml(findings.rootCause)}</p>`,
  };
}

/** An investigation under way: notes and the first whys, some causes ruled out, no conclusion yet. */
export function investigationInProgress(defectCode: string | null): InvestigationColumns {
  const p = playbookOf(defectCode);
  const checks = examined(defectCode, p);
  const report =
    '<h2>Notes so far</h2><p>Line walk-down done with the supervisor; retained samples and the shift records collected.</p>' +
    (checks.length > 0 ? `<h3>Checked</h3><ul>${checks.map((c) => `<li><p>${escapeHtml(c)}</p></li>`).join('')}</ul>` : '') +
    (p.table ? tableHtml(p.table) : '') +
    '<h3>Still open</h3><p>Ring inspection at the next changeover; supplier certificate requested.</p>';
  return {
    investigationReport: report,
    fiveWhys: JSON.stringify(p.whys),
    causeAnalysis: JSON.stringify(analysisFor(defectCode, p, null)),
  };
}
