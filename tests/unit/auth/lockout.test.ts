import { describe, expect, it } from 'vitest';
import { afterFailure, isLocked, lockMinutes, maxConsecutiveFailures } from '@/lib/auth/lockout';

// 21 CFR 11.300(d): safeguards against attempted unauthorised use. The thresholds (5 consecutive
// failures, 15 minutes) are common practice, not a number the regulation gives.
describe('sign-in lock-out rule', () => {
  const now = new Date('2026-12-02T08:00:00.000Z');

  it('counts failures below the threshold without locking', () => {
    let state = { failedSignins: 0, lockedUntil: null as Date | null };
    for (let i = 1; i < maxConsecutiveFailures; i++) {
      state = afterFailure(state.failedSignins, now);
      expect(state).toEqual({ failedSignins: i, lockedUntil: null });
    }
  });

  it('locks for 15 minutes on the fifth consecutive failure and restarts the count', () => {
    const state = afterFailure(maxConsecutiveFailures - 1, now);
    expect(maxConsecutiveFailures).toBe(5);
    expect(lockMinutes).toBe(15);
    expect(state.failedSignins).toBe(0);
    expect(state.lockedUntil?.toISOString()).toBe('2026-12-02T08:15:00.000Z');
  });

  it('is locked until the lock time and not after', () => {
    const until = new Date('2026-12-02T08:15:00.000Z');
    expect(isLocked(until, new Date('2026-12-02T08:14:59.999Z'))).toBe(true);
    expect(isLocked(until, until)).toBe(false);
    expect(isLocked(null, now)).toBe(false);
  });
});
