/*
 * Dates and times as people on the floor and auditors read them: ISO order, 24-hour clock, and the
 * time zone always stated, so a record reads the same on every screen (ALCOA+ "legible").
 */

export function formatUtc(value: string | Date | null | undefined, withSeconds = false): string {
  if (!value) return '—';
  const date = typeof value === 'string' ? new Date(value.includes('T') ? value : `${value.replace(' ', 'T')}Z`) : value;
  if (Number.isNaN(date.getTime())) return '—';
  const iso = date.toISOString();
  return `${iso.slice(0, 10)} ${iso.slice(11, withSeconds ? 19 : 16)} UTC`;
}
