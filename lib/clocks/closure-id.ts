import { type IsoDate, toDayNumber } from './dates';

/**
 * Site closures are keyed by their day; the audit trail needs a number, so the day is written as
 * one (2026-12-28 → 20261228), which stays readable in the trail.
 */
export function closureRecordIdOf(day: IsoDate): number {
  toDayNumber(day);
  return Number(day.replaceAll('-', ''));
}
