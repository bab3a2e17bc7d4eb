import { describe, expect, it } from 'vitest';
import { addClosureSchema, deactivateClosureSchema, dueDaysSchema } from '../../../lib/validation/clocks';

const issues = (r: { success: boolean; error?: { issues: { path: PropertyKey[]; message: string }[] } }) =>
  r.error?.issues.map((i) => `${String(i.path[0])}: ${i.message}`) ?? [];

describe('site calendar input', () => {
  it('accepts a working day with a description', () => {
    expect(addClosureSchema.parse({ day: ' 2026-12-28 ', description: ' Plant shutdown ' })).toEqual({
      day: '2026-12-28',
      description: 'Plant shutdown',
    });
  });

  it('says what a weekend or federal holiday already is, one message per field (5 U.S.C. 6103)', () => {
    expect(issues(addClosureSchema.safeParse({ day: '2027-12-24', description: 'Closed' }))).toEqual([
      'day: 2027-12-24 is already not a business day (Christmas Day (observed)); no closure is needed.',
    ]);
    expect(issues(addClosureSchema.safeParse({ day: '2026-12-26', description: 'Closed' }))).toEqual([
      'day: 2026-12-26 is already not a business day (Saturday); no closure is needed.',
    ]);
    expect(issues(addClosureSchema.safeParse({ day: '28/12/2026', description: 'x' }))).toEqual([
      'day: Enter a date as YYYY-MM-DD, e.g. 2026-12-28.',
      'description: Say what the closure is, e.g. “Plant shutdown”.',
    ]);
    expect(issues(addClosureSchema.safeParse({ day: '1985-06-03', description: 'Closed' }))).toEqual([
      'day: Enter a date between 1986 and 2199.',
    ]);
  });

  it('requires a reason to deactivate and whole days 1–365 for targets (common practice bounds)', () => {
    expect(deactivateClosureSchema.safeParse({ day: '2026-12-28', reason: ' ' }).success).toBe(false);
    expect(dueDaysSchema.parse({ critical: '15', major: '30', minor: '30', reason: 'Annual review' })).toMatchObject({
      critical: 15,
      major: 30,
    });
    expect(issues(dueDaysSchema.safeParse({ critical: '2.5', major: '0', minor: '366', reason: 'ok then' }))).toEqual([
      'critical: Critical: enter a whole number of days.',
      'major: Major: at least 1 day.',
      'minor: Minor: at most 365 days.',
    ]);
  });
});
