import { and, asc, eq, inArray, lt, lte, or, sql } from 'drizzle-orm';
import { db as defaultDb, type Db } from '../../db/client';
import { mailAttempts, mailOutbox } from '../../db/schema';
import { redactTokenLinks } from '../action-tokens/redact';
import { createMailTransport, type MailTransport } from './transport';

/*
 * The outbox worker. Several may run at once, on several hosts: each claims due rows with
 * SELECT ... FOR UPDATE SKIP LOCKED in a short transaction and marks them 'sending' before it talks
 * to SMTP, so no two workers send the same row in the same round.
 *
 * A worker killed mid-send leaves its rows in 'sending'. After staleAfterMs another worker reclaims
 * them; whether the first attempt reached the relay cannot be known, so the message may go out twice.
 * The retry reuses the Message-ID fixed at enqueue time, so a relay or mail client that de-duplicates
 * by Message-ID shows it once, and mail_attempts keeps the abandoned attempt on record. That is the
 * at-least-once guarantee of any outbox; nothing is ever lost.
 *
 * All times come from the database clock (UTC_TIMESTAMP), never from the worker's host.
 */

export const outboxDefaults = {
  batchSize: 10,
  maxAttempts: 8,
  staleAfterMs: 5 * 60_000,
  intervalMs: 5_000,
} as const;

/** Back-off before retry number `attempts` + 1: 1, 2, 4, ... minutes, at most an hour. */
export function retryDelayMs(attempts: number): number {
  return Math.min(60_000 * 2 ** Math.max(0, attempts - 1), 60 * 60_000);
}

export interface OutboxRunOptions {
  workerId: string;
  transport: MailTransport;
  batchSize?: number;
  /** After this many failed attempts a message is marked 'failed' and no longer retried. */
  maxAttempts?: number;
  /** A row left in 'sending' longer than this is taken to belong to a dead worker and reclaimed. */
  staleAfterMs?: number;
  retryDelay?: (attempts: number) => number;
  /** Checked before each send; when it turns true the rest of the batch is handed back unsent. */
  shouldStop?: () => boolean;
  database?: Db;
}

export interface OutboxRunResult {
  claimed: number;
  sent: number;
  retrying: number;
  failed: number;
  /** Claimed but handed back unsent because the worker is stopping. */
  released: number;
}

interface ClaimedMail {
  id: number;
  attemptId: number;
  attempts: number;
  toAddress: string;
  subject: string;
  textBody: string;
  htmlBody: string;
  messageId: string;
}

const now = sql`UTC_TIMESTAMP(3)`;
/** The database time `ms` milliseconds from now (negative: in the past). */
const fromNow = (ms: number) => sql`UTC_TIMESTAMP(3) + INTERVAL ${Math.round(ms) * 1000} MICROSECOND`;
const errorText = (err: unknown) => (err instanceof Error ? err.message : String(err)).slice(0, 1000);

async function claim(database: Db, workerId: string, batchSize: number, staleAfterMs: number): Promise<ClaimedMail[]> {
  // READ COMMITTED: the locking read takes no gap locks, so it never holds up transactions that are
  // queueing new mail at the same moment.
  return database.transaction(
    async (tx) => {
      const rows = await tx
        .select({
          id: mailOutbox.id,
          status: mailOutbox.status,
          attempts: mailOutbox.attempts,
          toAddress: mailOutbox.toAddress,
          subject: mailOutbox.subject,
          textBody: mailOutbox.textBody,
          htmlBody: mailOutbox.htmlBody,
          messageId: mailOutbox.messageId,
        })
        .from(mailOutbox)
        .where(
          or(
            and(eq(mailOutbox.status, 'pending'), lte(mailOutbox.nextAttemptAt, now)),
            and(eq(mailOutbox.status, 'sending'), lt(mailOutbox.claimedAt, fromNow(-staleAfterMs))),
          ),
        )
        .orderBy(asc(mailOutbox.id))
        .limit(batchSize)
        .for('update', { skipLocked: true });
      if (rows.length === 0) return [];

      const abandoned = rows.filter((r) => r.status === 'sending').map((r) => r.id);
      if (abandoned.length > 0) {
        await tx
          .update(mailAttempts)
          .set({
            outcome: 'failed',
            finishedAt: now,
            error: 'abandoned: the worker stopped without recording a result; the message may have been delivered, so the retry reuses its Message-ID',
          })
          .where(and(inArray(mailAttempts.outboxId, abandoned), eq(mailAttempts.outcome, 'started')));
      }

      await tx
        .update(mailOutbox)
        .set({ status: 'sending', claimedBy: workerId, claimedAt: now, attempts: sql`${mailOutbox.attempts} + 1` })
        .where(inArray(mailOutbox.id, rows.map((r) => r.id)));

      const claimed: ClaimedMail[] = [];
      for (const { status: _status, ...row } of rows) {
        const [attempt] = await tx
          .insert(mailAttempts)
          .values({ outboxId: row.id, worker: workerId, startedAt: now, outcome: 'started' })
          .$returningId();
        claimed.push({ ...row, attempts: row.attempts + 1, attemptId: attempt!.id });
      }
      return claimed;
    },
    { isolationLevel: 'read committed' },
  );
}

/** Claims one batch of due messages and sends them. Returns what happened to each. */
export async function runOutboxOnce(opts: OutboxRunOptions): Promise<OutboxRunResult> {
  const database = opts.database ?? defaultDb;
  const maxAttempts = opts.maxAttempts ?? outboxDefaults.maxAttempts;
  const retryDelay = opts.retryDelay ?? retryDelayMs;
  const claimed = await claim(
    database,
    opts.workerId,
    opts.batchSize ?? outboxDefaults.batchSize,
    opts.staleAfterMs ?? outboxDefaults.staleAfterMs,
  );
  const result: OutboxRunResult = { claimed: claimed.length, sent: 0, retrying: 0, failed: 0, released: 0 };
  // Only rows this worker still holds: if it was so slow that another worker reclaimed a row, the
  // other worker's state wins and this one only records its own attempt.
  const mine = (id: number) =>
    and(eq(mailOutbox.id, id), eq(mailOutbox.status, 'sending'), eq(mailOutbox.claimedBy, opts.workerId));

  for (const [index, mail] of claimed.entries()) {
    if (opts.shouldStop?.()) {
      const rest = claimed.slice(index);
      await database.transaction(async (tx) => {
        for (const m of rest) {
          await tx
            .update(mailOutbox)
            .set({ status: 'pending', claimedBy: null, claimedAt: null, attempts: sql`${mailOutbox.attempts} - 1` })
            .where(mine(m.id));
          await tx
            .update(mailAttempts)
            .set({ outcome: 'failed', finishedAt: now, error: 'not sent: the worker was stopping; handed back for the next run' })
            .where(eq(mailAttempts.id, m.attemptId));
        }
      });
      result.released = rest.length;
      break;
    }

    let failure: string | null = null;
    try {
      await opts.transport.sendMail({
        to: mail.toAddress,
        subject: mail.subject,
        text: mail.textBody,
        html: mail.htmlBody,
        messageId: mail.messageId,
        headers: { 'X-Plumbline-Outbox-Id': String(mail.id) },
      });
    } catch (err) {
      failure = errorText(err);
    }

    await database.transaction(async (tx) => {
      if (failure === null) {
        // The sent copy keeps the text but not a one-time link's token (lib/action-tokens/redact.ts).
        await tx
          .update(mailOutbox)
          .set({ status: 'sent', sentAt: now, lastError: null, textBody: redactTokenLinks(mail.textBody), htmlBody: redactTokenLinks(mail.htmlBody) })
          .where(mine(mail.id));
        await tx.update(mailAttempts).set({ outcome: 'sent', finishedAt: now }).where(eq(mailAttempts.id, mail.attemptId));
        return;
      }
      const giveUp = mail.attempts >= maxAttempts;
      await tx
        .update(mailOutbox)
        .set(
          giveUp
            ? { status: 'failed', lastError: failure }
            : { status: 'pending', claimedBy: null, claimedAt: null, lastError: failure, nextAttemptAt: fromNow(Math.max(0, retryDelay(mail.attempts))) },
        )
        .where(mine(mail.id));
      await tx
        .update(mailAttempts)
        .set({ outcome: 'failed', finishedAt: now, error: failure })
        .where(eq(mailAttempts.id, mail.attemptId));
    });
    if (failure === null) result.sent++;
    else if (mail.attempts >= maxAttempts) result.failed++;
    else result.retrying++;
  }
  return result;
}

export interface OutboxWorkerOptions extends Omit<OutboxRunOptions, 'transport' | 'shouldStop'> {
  /** Pause between polls when there was nothing (or less than a full batch) to send. */
  intervalMs?: number;
  /** Defaults to the SMTP relay from the environment; closed when the worker stops. */
  transport?: MailTransport;
  /** Stop gracefully on SIGINT and SIGTERM (default true). */
  handleSignals?: boolean;
  log?: (line: string) => void;
}

export interface OutboxWorker {
  /** Finishes the message being sent, hands back the rest of the batch, and resolves once stopped. */
  stop(): Promise<void>;
  /** Resolves when the worker has stopped, whoever stopped it. */
  stopped: Promise<void>;
}

export function startOutboxWorker(opts: OutboxWorkerOptions): OutboxWorker {
  const log = opts.log ?? ((line: string) => console.log(line));
  const ownTransport = opts.transport === undefined;
  const transport = opts.transport ?? createMailTransport();
  const batchSize = opts.batchSize ?? outboxDefaults.batchSize;
  const intervalMs = opts.intervalMs ?? outboxDefaults.intervalMs;
  let stopping = false;
  let wake: (() => void) | null = null;

  const onSignal = (signal: NodeJS.Signals) => {
    log(`outbox worker ${opts.workerId}: ${signal} received, finishing the current message`);
    void stop();
  };
  if (opts.handleSignals ?? true) {
    process.on('SIGINT', onSignal);
    process.on('SIGTERM', onSignal);
  }

  const stopped = (async () => {
    while (!stopping) {
      let full = false;
      try {
        const r = await runOutboxOnce({ ...opts, transport, batchSize, shouldStop: () => stopping });
        if (r.claimed > 0) {
          log(`outbox worker ${opts.workerId}: ${r.sent} sent, ${r.retrying} to retry, ${r.failed} failed, ${r.released} handed back`);
        }
        full = r.claimed === batchSize;
      } catch (err) {
        // The database or the relay being away is normal weather for a worker: log and poll again.
        log(`outbox worker ${opts.workerId}: ${errorText(err)}`);
      }
      if (full || stopping) continue;
      await new Promise<void>((resolve) => {
        const timer = setTimeout(resolve, intervalMs);
        wake = () => {
          clearTimeout(timer);
          resolve();
        };
      });
      wake = null;
    }
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
    if (ownTransport) transport.close?.();
  })();

  async function stop(): Promise<void> {
    stopping = true;
    wake?.();
    await stopped;
  }

  return { stop, stopped };
}
