import { mean } from './stats';

/*
 * X̄–R control charts across the weight checks of a batch. Each check is a subgroup; since the
 * X̄–R constants are tabulated for subgroups of 2 to 10, the subgroup is the first n units of each
 * check (n = 10, or fewer when a check has fewer units).
 *
 * Constants: the standard table of control-chart factors as given in ASTM E2587 and the
 * NIST/SEMATECH e-Handbook of Statistical Methods §6.3.2 (Shewhart X̄ and R charts). Every value for
 * n = 2…10 was checked against published reprints of that table (A2, d2, d3, D3, D4 to three places)
 * and a published computed table of d2 and d3 to four places; the originals themselves were not
 * consulted. d3 is listed so the tests can derive A2 = 3/(d2·√n), D3 = max(0, 1 − 3·d3/d2) and
 * D4 = 1 + 3·d3/d2 independently of the tabulated values.
 */

export interface ChartConstants {
  n: number;
  a2: number;
  d2: number;
  d3: number;
  /** Lower and upper R-chart factors (the table's D3 and D4). */
  lowerR: number;
  upperR: number;
}

export const chartConstants: Readonly<Record<number, ChartConstants>> = {
  2: { n: 2, a2: 1.88, d2: 1.128, d3: 0.853, lowerR: 0, upperR: 3.267 },
  3: { n: 3, a2: 1.023, d2: 1.693, d3: 0.888, lowerR: 0, upperR: 2.574 },
  4: { n: 4, a2: 0.729, d2: 2.059, d3: 0.88, lowerR: 0, upperR: 2.282 },
  5: { n: 5, a2: 0.577, d2: 2.326, d3: 0.864, lowerR: 0, upperR: 2.114 },
  6: { n: 6, a2: 0.483, d2: 2.534, d3: 0.848, lowerR: 0, upperR: 2.004 },
  7: { n: 7, a2: 0.419, d2: 2.704, d3: 0.833, lowerR: 0.076, upperR: 1.924 },
  8: { n: 8, a2: 0.373, d2: 2.847, d3: 0.82, lowerR: 0.136, upperR: 1.864 },
  9: { n: 9, a2: 0.337, d2: 2.97, d3: 0.808, lowerR: 0.184, upperR: 1.816 },
  10: { n: 10, a2: 0.308, d2: 3.078, d3: 0.797, lowerR: 0.223, upperR: 1.777 },
};

export const maxSubgroupSize = 10;

export function constantsFor(n: number): ChartConstants {
  const c = chartConstants[n];
  if (!c) throw new RangeError(`X̄–R constants are tabulated for subgroups of 2 to 10, not ${n}.`);
  return c;
}

/*
 * Western Electric Statistical Quality Control Handbook (1956), the four zone tests on one half of
 * the X̄ chart: 1 point beyond 3σ; 2 of 3 beyond 2σ; 4 of 5 beyond 1σ; 8 in a row on one side.
 * Checked against published summaries of the handbook's rules, not the handbook itself.
 */
export const runRules = {
  1: 'One point beyond 3σ',
  2: '2 of 3 successive points beyond 2σ on the same side',
  3: '4 of 5 successive points beyond 1σ on the same side',
  4: '8 successive points on the same side of the centre line',
} as const;
export type RunRule = keyof typeof runRules;

/**
 * Flags each point with the run rules it completes. A point is flagged for rules 2 and 3 only
 * when it is itself one of the points in the zone, so the flag sits where the signal showed.
 * Windows at the start of the series are shorter (two points beyond 2σ at once are already 2 of 3).
 */
export function westernElectricFlags(values: readonly number[], centre: number, sigma: number): RunRule[][] {
  const z = values.map((v) => (v - centre) / sigma);
  return z.map((zi, i) => {
    const flags: RunRule[] = [];
    if (Math.abs(zi) > 3) flags.push(1);
    const side = Math.sign(zi);
    const inWindow = (size: number, beyondSigma: number) =>
      z.slice(Math.max(0, i - size + 1), i + 1).filter((v) => Math.sign(v) === side && Math.abs(v) > beyondSigma).length;
    if (side !== 0 && Math.abs(zi) > 2 && inWindow(3, 2) >= 2) flags.push(2);
    if (side !== 0 && Math.abs(zi) > 1 && inWindow(5, 1) >= 4) flags.push(3);
    if (side !== 0 && i >= 7 && z.slice(i - 7, i + 1).every((v) => Math.sign(v) === side)) flags.push(4);
    return flags;
  });
}

export interface Subgroup {
  /** Caller's label for the point, e.g. the check's time. */
  label: string;
  values: readonly number[];
}

export interface XBarRPoint {
  label: string;
  mean: number;
  range: number;
  flags: RunRule[];
  /** Range beyond its own control limits (R chart, 3σ). */
  rangeOut: boolean;
}

export interface XBarRChart {
  n: number;
  constants: ChartConstants;
  grandMean: number;
  meanRange: number;
  /** σ within subgroups, R̄/d2. */
  sigma: number;
  xbar: { centre: number; lower: number; upper: number };
  r: { centre: number; lower: number; upper: number };
  points: XBarRPoint[];
}

/**
 * Limits from the subgroups themselves (a trial chart): X̄ ± A2·R̄ and D3·R̄ … D4·R̄. Null when
 * there is no subgroup of at least 2 units.
 */
export function xBarRChart(subgroups: readonly Subgroup[]): XBarRChart | null {
  const usable = subgroups.filter((s) => s.values.length >= 2);
  if (usable.length === 0) return null;
  const n = Math.min(maxSubgroupSize, ...usable.map((s) => s.values.length));
  const constants = constantsFor(n);
  const rows = usable.map((s) => {
    const v = s.values.slice(0, n);
    return { label: s.label, mean: mean(v), range: Math.max(...v) - Math.min(...v) };
  });
  const grandMean = mean(rows.map((r) => r.mean));
  const meanRange = mean(rows.map((r) => r.range));
  const xbar = { centre: grandMean, lower: grandMean - constants.a2 * meanRange, upper: grandMean + constants.a2 * meanRange };
  const r = { centre: meanRange, lower: constants.lowerR * meanRange, upper: constants.upperR * meanRange };
  // One sigma of a subgroup mean is a third of the distance to the limit (A2·R̄ = 3σ/√n).
  const sigmaMean = (constants.a2 * meanRange) / 3;
  const flags =
    sigmaMean > 0 ? westernElectricFlags(rows.map((p) => p.mean), grandMean, sigmaMean) : rows.map(() => [] as RunRule[]);
  return {
    n,
    constants,
    grandMean,
    meanRange,
    sigma: meanRange / constants.d2,
    xbar,
    r,
    points: rows.map((p, i) => ({ ...p, flags: flags[i]!, rangeOut: p.range > r.upper || p.range < r.lower })),
  };
}
