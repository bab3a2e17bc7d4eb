/* The text form of record numbers, e.g. DEV-2026-0042. Pure. */

/** Zero-padded to four digits; the 10 000th record of a year simply gets five. */
export function formatRecordNumber(prefix: string, year: number, value: number): string {
  return `${prefix}-${year}-${String(value).padStart(4, '0')}`;
}

export function parseRecordNumber(text: string): { prefix: string; year: number; value: number } | null {
  const m = /^([A-Z]+)-(\d{4})-(\d{4,})$/.exec(text.trim());
  if (!m) return null;
  return { prefix: m[1]!, year: Number(m[2]), value: Number(m[3]) };
}
