/* Number formatting shared by the weight components: fixed decimals, a dash for "no value". */

export function num(value: number | null | undefined, digits = 1): string {
  return value === null || value === undefined || !Number.isFinite(value) ? '—' : value.toFixed(digits);
}
