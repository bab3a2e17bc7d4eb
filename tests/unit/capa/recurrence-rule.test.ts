import { describe, expect, it } from 'vitest';
import { describeRecurrence, recurrenceVerdict, wholeDaysBetween } from '@/lib/capa/recurrence-rule';
import { criterionFromFields, parseRecurrenceCriterion, serializeRecurrenceCriterion, updatePlanSchema } from '@/lib/capa/schemas';

/*
 * The recurrence rule beside a CAPA's effectiveness criterion. ICH Q10 §3.2.2 and EU GMP Part I
 * 1.4(xiv) ask that a CAPA's effectiveness be evaluated against criteria; that a recurrence of the
 * same defect fails a "no recurrence over N batches" criterion at once, and that it is met only once
 * the whole span has run, is common practice.
 */

const since = '2026-10-30T14:00:00.000Z';
const counts = (recurrences: number, batchesSince: number, daysSince: number) => ({ since, recurrences, batchesSince, daysSince });

describe('recurrence verdict', () => {
  it('is pending until the actions are completed (nothing is counted yet)', () => {
    expect(recurrenceVerdict({ since: null, recurrences: 0, batchesSince: 0, daysSince: 0 }, { batches: 20, days: null })).toBe('pending');
  });

  it('fails at the first recurrence, even before the span has run', () => {
    expect(recurrenceVerdict(counts(1, 3, 5), { batches: 20, days: null })).toBe(false);
  });

  it('is pending with no recurrence while the span has not run, and met once it has', () => {
    expect(recurrenceVerdict(counts(0, 14, 20), { batches: 20, days: null })).toBe('pending');
    expect(recurrenceVerdict(counts(0, 20, 20), { batches: 20, days: null })).toBe(true);
    expect(recurrenceVerdict(counts(0, 25, 29), { batches: null, days: 30 })).toBe('pending');
    expect(recurrenceVerdict(counts(0, 25, 30), { batches: null, days: 30 })).toBe(true);
  });

  it('needs every span it names (batches and days) to have run', () => {
    expect(recurrenceVerdict(counts(0, 20, 10), { batches: 20, days: 30 })).toBe('pending');
    expect(recurrenceVerdict(counts(0, 20, 30), { batches: 20, days: 30 })).toBe(true);
  });
});

describe('recurrence wording', () => {
  it('reads as a sentence beside the criterion', () => {
    expect(describeRecurrence(counts(0, 14, 12), { batches: 20, days: null }, 'broken body', 'Filler 2 (BW-FIL-02)')).toBe(
      '0 broken body deviations on Filler 2 (BW-FIL-02) over 14 of 20 batches since 2026-10-30',
    );
    expect(describeRecurrence(counts(1, 1, 1), { batches: 1, days: 1 }, 'light fill', 'ring BWR-0302')).toBe(
      '1 light fill deviation on ring BWR-0302 over 1 of 1 batch and 1 of 1 day since 2026-10-30',
    );
    expect(describeRecurrence({ since: null, recurrences: 0, batchesSince: 0, daysSince: 0 }, { batches: 20, days: null }, 'light fill', 'Filler 1')).toMatch(
      /^Counting starts when every action is completed/,
    );
  });

  it('counts whole days and never negative ones', () => {
    expect(wholeDaysBetween(since, new Date('2026-11-09T13:59:59.000Z'))).toBe(9);
    expect(wholeDaysBetween(since, new Date('2026-11-09T14:00:00.000Z'))).toBe(10);
    expect(wholeDaysBetween(since, new Date('2026-10-01T00:00:00.000Z'))).toBe(0);
  });
});

describe('recurrence criterion fields', () => {
  const plan = { id: 1, version: 1, title: 'Broken bodies', problemStatement: 'Broken bodies recur on one ring.', ownerId: 4 };

  it('is all or nothing: a defect, a machine or ring, and a span', () => {
    expect(updatePlanSchema.safeParse(plan).success).toBe(true);
    const partial = updatePlanSchema.safeParse({ ...plan, criterionDefectId: '3' });
    expect(partial.success).toBe(false);
    const fields = partial.success ? [] : partial.error.issues.map((i) => i.path.join('.'));
    expect(fields).toEqual(expect.arrayContaining(['criterionMachineId', 'criterionBatches']));
    const full = updatePlanSchema.parse({ ...plan, criterionDefectId: '3', criterionRingId: '7', criterionBatches: '20', criterionDays: '' });
    expect(criterionFromFields(full)).toEqual({ defectId: 3, ringId: 7, batches: 20 });
  });

  it('stores the same criterion as the same text, and reads back only what it wrote', () => {
    const text = serializeRecurrenceCriterion({ batches: 20, defectId: 3, machineId: 2 });
    expect(text).toBe('{"defectId":3,"machineId":2,"batches":20}');
    expect(parseRecurrenceCriterion(text)).toEqual({ defectId: 3, machineId: 2, batches: 20 });
    expect(parseRecurrenceCriterion('{"defectId":"x"}')).toBeNull();
    expect(parseRecurrenceCriterion('not json')).toBeNull();
    expect(parseRecurrenceCriterion(null)).toBeNull();
    expect(serializeRecurrenceCriterion(null)).toBeNull();
  });
});
