import { type IsoDate, toDayNumber } from './dates';

/**
 * The record id the audit trail gave a site closure before closures had ids of their own
 * (migration 0010): the day written as a number (2026-12-28 → 20261228), which stays readable in
 * the trail. Entries written since name the closure's id; a closure's trail reads both
 * (lib/site-calendar/queries.ts), and the numbers cannot meet: ids count up from 1, day numbers
 * start at 20000101.
 */
export function closureRecordIdOf(day: IsoDate): number {
  toDayNumber(day);
  return Number(day.replaceAll('-', ''));
}
