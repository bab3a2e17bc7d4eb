import { describe, expect, it } from 'vitest';
import { adjustmentHints, fillDirection } from '@/lib/weight/hints';

/* Common practice for auger-fed semi-automatic fillers (no published source). */

describe('adjustment hints', () => {
  it('reads the direction of a failure from the mean against the target', () => {
    expect(fillDirection(480, 500)).toBe('light');
    expect(fillDirection(520, 500)).toBe('heavy');
    expect(fillDirection(503, 500)).toBe('spread');
    expect(fillDirection(495, 500)).toBe('spread');
  });

  it('light: faster auger or slower fill table (common practice)', () => {
    expect(adjustmentHints('light')[0]!.text).toMatch(/speed the auger up.*slow the fill table/);
  });

  it('heavy: slower auger or faster fill table (common practice)', () => {
    expect(adjustmentHints('heavy')[0]!.text).toMatch(/slow the auger.*speed the fill table up/);
  });

  it('spread: points at hopper level, flow and the ring (common practice)', () => {
    expect(adjustmentHints('spread')[0]!.text).toMatch(/hopper level.*ring/);
  });

  it('speeds before the dosing-shoe clearance (about 0.003 in), which is changed only with power off (common practice)', () => {
    const hints = adjustmentHints('light');
    expect(hints[1]!.text).toMatch(/only then.*0\.003 in/);
    expect(hints[2]).toMatchObject({ caution: true });
    expect(hints[2]!.text).toMatch(/power off and isolated.*interlock/);
  });
});
