import { describe, expect, it } from 'vitest';
import { rpn, rpnMax, rpnMin } from '@/lib/risk/rpn';

// IEC 60812:2018, RPN method: RPN = S × O × D on 1-10 rankings, so 1 ≤ RPN ≤ 1000.
describe('rpn', () => {
  it('multiplies severity, occurrence and detection (IEC 60812:2018)', () => {
    expect(rpn(7, 4, 6)).toBe(168);
    expect(rpn(10, 1, 1)).toBe(10);
    expect(rpn(1, 10, 1)).toBe(10);
  });

  it('spans 1 to 1000 at the ends of the scales (IEC 60812:2018)', () => {
    expect(rpn(1, 1, 1)).toBe(rpnMin);
    expect(rpn(10, 10, 10)).toBe(rpnMax);
    expect(rpnMin).toBe(1);
    expect(rpnMax).toBe(1000);
  });

  it.each([
    [0, 5, 5, /Severity/],
    [11, 5, 5, /Severity/],
    [5, 0, 5, /Occurrence/],
    [5, 11, 5, /Occurrence/],
    [5, 5, 0, /Detection/],
    [5, 5, 11, /Detection/],
    [5.5, 5, 5, /Severity/],
    [Number.NaN, 5, 5, /Severity/],
    [5, Number.POSITIVE_INFINITY, 5, /Occurrence/],
  ])('refuses S=%s O=%s D=%s: rankings are whole numbers 1-10 (IEC 60812:2018)', (s, o, d, message) => {
    expect(() => rpn(s, o, d)).toThrow(RangeError);
    expect(() => rpn(s, o, d)).toThrow(message);
  });

  it('refuses a score passed as text', () => {
    expect(() => rpn('5' as unknown as number, 5, 5)).toThrow(RangeError);
  });
});
