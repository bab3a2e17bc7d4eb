import { listCapturedMail, type CapturedMail } from '../../scripts/services/smtp';
import { testStack } from './env';

/*
 * Reading what the app sent. The SMTP fake (scripts/services/smtp.ts) writes each message it
 * receives as `<timestamp>-<n>.json` beside the raw `.eml`; these helpers read those files.
 */

export type { CapturedMail };

/** Every captured message, oldest first. */
export function readMessages(dir: string = testStack.mailDir): CapturedMail[] {
  return listCapturedMail(dir);
}

/** Messages addressed (To or Cc) to `address`, oldest first. */
export function messagesTo(address: string, dir: string = testStack.mailDir): CapturedMail[] {
  const wanted = address.toLowerCase();
  return readMessages(dir).filter((m) => m.to.includes(wanted) || m.cc.includes(wanted));
}

/**
 * Waits for the first message matching `predicate` (the worker sends mail asynchronously).
 * Pass `afterCount` (readMessages().length before acting) to ignore mail sent earlier.
 */
export async function waitForMessage(
  predicate: (mail: CapturedMail) => boolean,
  opts: { timeoutMs?: number; dir?: string; afterCount?: number } = {},
): Promise<CapturedMail> {
  const dir = opts.dir ?? testStack.mailDir;
  const deadline = Date.now() + (opts.timeoutMs ?? 20_000);
  for (;;) {
    const found = readMessages(dir).slice(opts.afterCount ?? 0).find(predicate);
    if (found) return found;
    if (Date.now() > deadline) {
      const seen = readMessages(dir).map((m) => `${m.to.join(',')}: ${m.subject}`);
      throw new Error(`no matching mail within ${opts.timeoutMs ?? 20_000} ms; captured so far:\n  ${seen.join('\n  ') || '(none)'}`);
    }
    await new Promise((r) => setTimeout(r, 200));
  }
}
