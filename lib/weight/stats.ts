/*
 * Descriptive statistics for a sample of capsule masses. Plain loops: the weight page recomputes
 * everything on each keystroke, and a sample is at most a few dozen numbers.
 */

export function mean(values: readonly number[]): number {
  if (values.length === 0) return Number.NaN;
  let sum = 0;
  for (const v of values) sum += v;
  return sum / values.length;
}

/** Sample standard deviation (divisor n − 1), as pharmacopoeial and SPC formulas use; NaN below 2 values. */
export function sampleSd(values: readonly number[]): number {
  if (values.length < 2) return Number.NaN;
  const m = mean(values);
  let ss = 0;
  for (const v of values) ss += (v - m) * (v - m);
  return Math.sqrt(ss / (values.length - 1));
}

/** Middle value (mean of the two middle values for an even count); NaN for no values. */
export function median(values: readonly number[]): number {
  if (values.length === 0) return Number.NaN;
  const sorted = [...values].sort((a, b) => a - b);
  const mid = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2;
}

export interface MassSummary {
  count: number;
  mean: number;
  median: number;
  sd: number;
  /** Relative standard deviation, % of the mean. */
  rsd: number;
  min: number;
  max: number;
  range: number;
}

export function summarize(values: readonly number[]): MassSummary {
  if (values.length === 0) {
    return { count: 0, mean: Number.NaN, median: Number.NaN, sd: Number.NaN, rsd: Number.NaN, min: Number.NaN, max: Number.NaN, range: Number.NaN };
  }
  let min = Infinity;
  let max = -Infinity;
  for (const v of values) {
    if (v < min) min = v;
    if (v > max) max = v;
  }
  const m = mean(values);
  const sd = sampleSd(values);
  return { count: values.length, mean: m, median: median(values), sd, rsd: (sd / m) * 100, min, max, range: max - min };
}

export interface FillLimits {
  targetMg: number;
  lowerMg: number;
  upperMg: number;
}

/** Units strictly outside the product's own fill limits (a unit on a limit is inside). */
export function countOutside(values: readonly number[], limits: FillLimits): { below: number; above: number } {
  let below = 0;
  let above = 0;
  for (const v of values) {
    if (v < limits.lowerMg) below++;
    else if (v > limits.upperMg) above++;
  }
  return { below, above };
}

/**
 * Process capability against two-sided specification limits:
 * Cpk = min(USL − μ, μ − LSL) / 3σ (NIST/SEMATECH e-Handbook §6.1.6). σ is whatever estimate the
 * caller has: R̄/d2 across subgroups for Cpk proper, the sample SD of one check for a quick read.
 * NaN when σ is not a positive number.
 */
export function cpk(mu: number, sigma: number, lower: number, upper: number): number {
  if (!(sigma > 0)) return Number.NaN;
  return Math.min(upper - mu, mu - lower) / (3 * sigma);
}

/** Cp = (USL − LSL) / 6σ (NIST/SEMATECH e-Handbook §6.1.6). */
export function cp(sigma: number, lower: number, upper: number): number {
  if (!(sigma > 0)) return Number.NaN;
  return (upper - lower) / (6 * sigma);
}

/**
 * A deviation "more than" a limit, with a tolerance of a few parts per billion so that a value
 * exactly on the limit, which binary floating point may land a hair above, is not counted.
 */
export function beyond(value: number, limit: number): boolean {
  return value > limit + Math.abs(limit) * 1e-9 + 1e-12;
}

/** |x − average| as a percentage of the average. */
export function percentDeviation(x: number, average: number): number {
  return (Math.abs(x - average) / average) * 100;
}
