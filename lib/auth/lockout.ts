/*
 * Sign-in lock-out rule, pure. 21 CFR 11.300(d) asks for safeguards against unauthorised use and
 * for detecting attempts; locking after 5 consecutive failures for 15 minutes is common practice.
 */

export const maxConsecutiveFailures = 5;
export const lockMinutes = 15;

export function isLocked(lockedUntil: Date | null, now: Date): boolean {
  return lockedUntil !== null && lockedUntil.getTime() > now.getTime();
}

/** The account state after one more failed attempt. */
export function afterFailure(failedSignins: number, now: Date): { failedSignins: number; lockedUntil: Date | null } {
  const failures = failedSignins + 1;
  if (failures >= maxConsecutiveFailures) {
    return { failedSignins: 0, lockedUntil: new Date(now.getTime() + lockMinutes * 60_000) };
  }
  return { failedSignins: failures, lockedUntil: null };
}
