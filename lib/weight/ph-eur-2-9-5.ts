import { beyond, mean, percentDeviation } from './stats';

/*
 * Ph. Eur. 2.9.5 Uniformity of mass of single-dose preparations (monograph 01/2008:20905, same text in
 * Ph. Eur. 6.0 and 11), applied to hard capsules; checked against the published chapter text.
 * 20 units; the limit depends on the average mass (Table 2.9.5.-1, capsules: less than 300 mg
 * 10 %, 300 mg or more 7.5 %). The preparation complies when not more than 2 individual masses
 * deviate from the average by more than the percentage and none deviates by more than twice it.
 * For hard capsules the chapter weighs each intact capsule, then its emptied shell, and uses the
 * difference (the content mass); the masses given here are those content masses.
 */

export const phEurSampleSize = 20;
export const phEurMaxOutside = 2;

/** Table 2.9.5.-1, capsules: the percentage deviation allowed for a given average content mass. */
export function phEurPercentLimit(averageMg: number): number {
  return averageMg < 300 ? 10 : 7.5;
}

export interface PhEurResult {
  method: 'ph_eur_2_9_5';
  status: 'pass' | 'fail' | 'incomplete';
  /** Units the chapter asks for, and how many were given. */
  required: number;
  given: number;
  averageMg: number;
  percentLimit: number;
  lowerMg: number;
  upperMg: number;
  lowerDoubleMg: number;
  upperDoubleMg: number;
  /** Indexes (into the masses given) of units beyond the limit, and beyond twice it. */
  beyondLimit: number[];
  beyondDouble: number[];
}

/**
 * Evaluates the first 20 content masses; fewer than 20 is incomplete (the chapter's sample is 20,
 * so no verdict is given on fewer).
 */
export function evaluatePhEur(netMg: readonly number[]): PhEurResult {
  const units = netMg.slice(0, phEurSampleSize);
  const averageMg = mean(units);
  const percentLimit = phEurPercentLimit(averageMg);
  const beyondLimit: number[] = [];
  const beyondDouble: number[] = [];
  units.forEach((x, i) => {
    const dev = percentDeviation(x, averageMg);
    if (beyond(dev, percentLimit)) beyondLimit.push(i);
    if (beyond(dev, 2 * percentLimit)) beyondDouble.push(i);
  });
  const complete = units.length === phEurSampleSize;
  const passes = beyondLimit.length <= phEurMaxOutside && beyondDouble.length === 0;
  return {
    method: 'ph_eur_2_9_5',
    status: complete ? (passes ? 'pass' : 'fail') : 'incomplete',
    required: phEurSampleSize,
    given: netMg.length,
    averageMg,
    percentLimit,
    lowerMg: averageMg * (1 - percentLimit / 100),
    upperMg: averageMg * (1 + percentLimit / 100),
    lowerDoubleMg: averageMg * (1 - (2 * percentLimit) / 100),
    upperDoubleMg: averageMg * (1 + (2 * percentLimit) / 100),
    beyondLimit,
    beyondDouble,
  };
}
