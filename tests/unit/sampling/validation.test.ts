import { describe, expect, it } from 'vitest';
import { samplingFormValuesFrom, samplingInputSchema } from '@/lib/validation/sampling';

const base = { level: 'II', severity: 'normal', critical: 'hundred_percent', major: '0.65', minor: '2.5' };

describe('sampling calculator input', () => {
  it('reads a lot size typed with thousands separators', () => {
    const r = samplingInputSchema.safeParse({ ...base, lotSize: '250,000' });
    expect(r.success && r.data.lotSize).toBe(250000);
  });

  it('refuses a lot below the first row of ISO 2859-1:1999 Table 1 (2 units)', () => {
    const r = samplingInputSchema.safeParse({ ...base, lotSize: '1' });
    expect(r.success).toBe(false);
    expect(r.error?.issues[0]?.message).toMatch(/starts at a lot of 2/);
  });

  it('refuses text, empty and unknown AQLs', () => {
    expect(samplingInputSchema.safeParse({ ...base, lotSize: 'lots' }).success).toBe(false);
    expect(samplingInputSchema.safeParse({ ...base, lotSize: '' }).success).toBe(false);
    expect(samplingInputSchema.safeParse({ ...base, lotSize: '500', major: '0.5' }).success).toBe(false);
  });

  it('starts the form from the address, with common-practice defaults for anything unknown', () => {
    // common practice: major 0.65, minor 2.5, critical 100 %, general level II, normal inspection
    expect(samplingFormValuesFrom({ lotSize: '5000', major: '1.0', minor: 'junk', level: ['II', 'III'] })).toEqual({
      lotSize: '5000',
      level: 'II',
      severity: 'normal',
      critical: 'hundred_percent',
      major: '1.0',
      minor: '2.5',
    });
  });
});
