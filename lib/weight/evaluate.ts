import { type AdjustmentHint, type FillDirection, adjustmentHints, fillDirection } from './hints';
import { type PhEurResult, evaluatePhEur } from './ph-eur-2-9-5';
import { type FillLimits, type MassSummary, countOutside, cpk, summarize } from './stats';
import { type Usp2091Result, evaluateUsp2091 } from './usp-2091';
import { type Usp905Result, evaluateUsp905, usp905L1, usp905L2 } from './usp-905';

/*
 * One weight check, end to end: net masses from what was weighed, the pharmacopoeial test chosen,
 * the product's own limits on top, the numbers QA reads, and hints when it fails. Pure and quick,
 * so the page runs it on every keystroke and the server runs the same code before it saves.
 */

export const weightMethods = ['ph_eur_2_9_5', 'usp_905', 'usp_2091'] as const;
export type WeightMethod = (typeof weightMethods)[number];
export type MassMode = 'gross' | 'net';
export type Status = 'pass' | 'fail' | 'incomplete';

export const methodLabels: Record<WeightMethod, string> = {
  ph_eur_2_9_5: 'Ph. Eur. 2.9.5 uniformity of mass',
  usp_905: 'USP <905> weight variation',
  usp_2091: 'USP <2091> weight variation (dietary supplements)',
};

export const methodShortLabels: Record<WeightMethod, string> = {
  ph_eur_2_9_5: 'Ph. Eur. 2.9.5',
  usp_905: 'USP <905>',
  usp_2091: 'USP <2091>',
};

/** Supplements default to the supplement chapter; drugs to Ph. Eur. 2.9.5. */
export function defaultMethod(regulatoryClass: 'supplement' | 'drug'): WeightMethod {
  return regulatoryClass === 'supplement' ? 'usp_2091' : 'ph_eur_2_9_5';
}

export interface WeightCheckInput {
  method: WeightMethod;
  massMode: MassMode;
  massesMg: readonly number[];
  /** Mean empty-shell mass, required when masses are gross. */
  shellMassMg: number | null;
  product: FillLimits;
  /** USP <905> only: assay, % label claim (default 100) and target T (default 100). */
  assayPercent?: number;
  targetPercent?: number;
}

/** `next_stage`: not met at this stage, which sends the test on to the next one (not a failure). */
export type RuleStatus = Status | 'next_stage';

export interface RuleResult {
  id: string;
  label: string;
  source: string;
  status: RuleStatus;
  detail: string;
}

export type PharmacopoeiaResult = PhEurResult | Usp905Result | Usp2091Result;

export interface WeightEvaluation {
  method: WeightMethod;
  verdict: Status;
  netMg: number[];
  summary: MassSummary;
  outside: { below: number; above: number };
  /** Against the product limits, with this check's sample SD as σ (a quick read, not a batch Cpk). */
  cpk: number;
  rules: RuleResult[];
  pharmacopoeia: PharmacopoeiaResult | null;
  /** Input problems that stop an evaluation (e.g. gross masses without a shell mass). */
  problems: string[];
  direction: FillDirection | null;
  hints: AdjustmentHint[];
}

const fmt = (n: number, digits = 1) => n.toFixed(digits);
const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

function phEurRules(r: PhEurResult): RuleResult[] {
  const source = 'Ph. Eur. 2.9.5, Table 2.9.5.-1';
  if (r.status === 'incomplete') {
    return [{ id: 'ph_eur_sample', label: '20 units weighed', source, status: 'incomplete', detail: `${r.given} of 20 units entered.` }];
  }
  const lim = `${fmt(r.percentLimit)} % of the average ${fmt(r.averageMg)} mg (${fmt(r.lowerMg)}–${fmt(r.upperMg)} mg)`;
  return [
    {
      id: 'ph_eur_limit',
      label: `Not more than 2 units deviate by more than ${fmt(r.percentLimit)} %`,
      source,
      status: r.beyondLimit.length <= 2 ? 'pass' : 'fail',
      detail: `${plural(r.beyondLimit.length, 'unit', 'units')} outside ${lim}.`,
    },
    {
      id: 'ph_eur_double',
      label: `None deviates by more than ${fmt(2 * r.percentLimit)} %`,
      source,
      status: r.beyondDouble.length === 0 ? 'pass' : 'fail',
      detail: `${plural(r.beyondDouble.length, 'unit', 'units')} outside ${fmt(r.lowerDoubleMg)}–${fmt(r.upperDoubleMg)} mg.`,
    },
  ];
}

function usp905Rules(r: Usp905Result): RuleResult[] {
  const source = 'USP <905>, weight variation, Table 2';
  if (r.stages.length === 0) {
    return [{ id: 'usp905_sample', label: 'Stage 1: 10 units weighed', source, status: 'incomplete', detail: `${r.given} of 10 units entered.` }];
  }
  const rules = r.stages.map((s): RuleResult => ({
    id: `usp905_stage${s.stage}`,
    label: s.stage === 1 ? `Stage 1 (10 units): AV ≤ L1 = ${fmt(usp905L1)}` : `Stage 2 (30 units): AV ≤ L1 and every unit within ${fmt(usp905L2, 0)} % of M`,
    source,
    status: s.passes ? 'pass' : s.stage === 1 ? 'next_stage' : 'fail',
    detail:
      `AV = |M − X̄| + k·s = |${fmt(s.m, 2)} − ${fmt(s.xBar, 2)}| + ${fmt(s.k)} × ${fmt(s.s, 2)} = ${fmt(s.av, 2)}` +
      (s.stage === 2 ? `; ${plural(s.outsideL2.length, 'unit', 'units')} outside ${fmt(0.75 * s.m, 1)}–${fmt(1.25 * s.m, 1)} %.` : '.'),
  }));
  if (r.status === 'incomplete') {
    rules.push({ id: 'usp905_stage2_needed', label: 'Stage 2: 20 more units', source, status: 'incomplete', detail: `Stage 1 failed; enter 30 units in all (${r.given} entered).` });
  }
  return rules;
}

function usp2091Rules(r: Usp2091Result): RuleResult[] {
  const source = 'USP <2091> Weight Variation of Dietary Supplements, Hard Shell Capsules';
  const rules: RuleResult[] = [];
  if (r.given < 20) {
    return [{ id: 'usp2091_sample', label: '20 capsules weighed', source, status: 'incomplete', detail: `${r.given} of 20 capsules entered.` }];
  }
  if (r.screen) {
    rules.push({
      id: 'usp2091_screen',
      label: 'Intact capsules: every gross mass within 90–110 % of the average',
      source,
      status: r.screen.passes ? 'pass' : 'next_stage',
      detail: `${plural(r.screen.outside.length, 'capsule', 'capsules')} outside, average ${fmt(r.screen.averageMg)} mg.${r.screen.passes ? '' : ' Net contents decide.'}`,
    });
  }
  const countRule = (c: NonNullable<Usp2091Result['stage1']>, stage: 1 | 2): RuleResult => ({
    id: `usp2091_stage${stage}`,
    label: stage === 1 ? 'Net contents of 20: not more than 2 beyond 10 %, none beyond 25 %' : 'Net contents of 60: not more than 6 beyond 10 %, none beyond 25 %',
    source,
    status: stage === 1 && r.decidedBy !== 'stage_1' ? 'next_stage' : r.status,
    detail: `Average ${fmt(c.averageMg)} mg; ${plural(c.beyondPercent.length, 'capsule', 'capsules')} beyond 10 %, ${c.beyondOuter.length} beyond 25 %.`,
  });
  if (r.stage1) rules.push(countRule(r.stage1, 1));
  if (r.stage2) rules.push(countRule(r.stage2, 2));
  if (r.decidedBy === 'more_units') {
    rules.push({ id: 'usp2091_stage2_needed', label: 'Stage 2: 40 more capsules', source, status: 'incomplete', detail: `3 to 6 capsules beyond 10 %: enter 60 in all (${r.given} entered).` });
  }
  return rules;
}

export function evaluateWeightCheck(input: WeightCheckInput): WeightEvaluation {
  const problems: string[] = [];
  let netMg: number[] = [...input.massesMg];
  if (input.massMode === 'gross') {
    if (input.shellMassMg === null || !(input.shellMassMg > 0)) {
      problems.push('Gross masses need the mean empty-shell mass to work out the fill.');
    } else {
      const shell = input.shellMassMg;
      netMg = input.massesMg.map((m) => m - shell);
      if (netMg.some((m) => m <= 0)) problems.push('A gross mass is not more than the shell mass; check the unit and the shell mass.');
    }
  }
  const summary = summarize(netMg);
  const outside = countOutside(netMg, input.product);
  const empty: WeightEvaluation = {
    method: input.method,
    verdict: 'incomplete',
    netMg,
    summary,
    outside,
    cpk: Number.NaN,
    rules: [],
    pharmacopoeia: null,
    problems,
    direction: null,
    hints: [],
  };
  if (problems.length > 0 || netMg.length === 0) return empty;

  let pharmacopoeia: PharmacopoeiaResult;
  let rules: RuleResult[];
  if (input.method === 'ph_eur_2_9_5') {
    const r = evaluatePhEur(netMg);
    pharmacopoeia = r;
    rules = phEurRules(r);
  } else if (input.method === 'usp_905') {
    const r = evaluateUsp905(netMg, { assayPercent: input.assayPercent, targetPercent: input.targetPercent });
    pharmacopoeia = r;
    rules = usp905Rules(r);
  } else {
    const r = evaluateUsp2091(input.massMode === 'gross' ? input.massesMg : null, netMg);
    pharmacopoeia = r;
    rules = usp2091Rules(r);
  }

  const siteSource = "Product master data (the site's own limits)";
  const { lowerMg, upperMg } = input.product;
  rules.push({
    id: 'product_mean',
    label: `Average within the product's limits ${fmt(lowerMg)}–${fmt(upperMg)} mg`,
    source: siteSource,
    status: summary.mean >= lowerMg && summary.mean <= upperMg ? 'pass' : 'fail',
    detail: `Average ${fmt(summary.mean)} mg against target ${fmt(input.product.targetMg)} mg.`,
  });
  const out = outside.below + outside.above;
  rules.push({
    id: 'product_units',
    label: "No unit outside the product's limits",
    source: siteSource,
    status: out === 0 ? 'pass' : 'fail',
    detail: `${out} outside (${outside.below} below, ${outside.above} above).`,
  });

  const verdict: Status = rules.some((r) => r.status === 'fail')
    ? 'fail'
    : rules.some((r) => r.status === 'incomplete')
      ? 'incomplete'
      : 'pass';
  const direction = verdict === 'fail' ? fillDirection(summary.mean, input.product.targetMg) : null;
  return {
    ...empty,
    verdict,
    cpk: cpk(summary.mean, summary.sd, lowerMg, upperMg),
    rules,
    pharmacopoeia,
    direction,
    hints: direction ? adjustmentHints(direction) : [],
  };
}
