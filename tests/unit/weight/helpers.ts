/** 20 (or `n`) masses with the given special units first and the rest equal, so the mean is exactly `average`. */
export function sampleWithMean(average: number, specials: readonly number[], n = 20): number[] {
  const rest = (average * n - specials.reduce((a, b) => a + b, 0)) / (n - specials.length);
  return [...specials, ...Array.from({ length: n - specials.length }, () => rest)];
}
