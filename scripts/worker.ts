import { hostname } from 'node:os';
import { closeDb } from '../db/client';
import { getEnv } from '../lib/env';
import { startOutboxWorker } from '../lib/mail/worker';
import { startReminderLoop } from '../lib/reminders/loop';

/*
 * Runs one outbox worker until SIGINT or SIGTERM: npm run worker. Start as many as you like, on as
 * many hosts as you like; they share the work through the database. MAIL_WORKER_INTERVAL_MS sets
 * the polling pause (default 5000). Each worker also sweeps for due-soon and overdue items every
 * REMINDER_INTERVAL_MS (default 600000); the outbox's de-duplication keys make extra sweeps harmless.
 */

const env = getEnv();
const intervalMs = Number(process.env.MAIL_WORKER_INTERVAL_MS ?? 5_000);
if (!Number.isFinite(intervalMs) || intervalMs < 100) {
  console.error('MAIL_WORKER_INTERVAL_MS must be a number of milliseconds, at least 100');
  process.exit(1);
}
const reminderIntervalMs = Number(process.env.REMINDER_INTERVAL_MS ?? 600_000);
if (!Number.isFinite(reminderIntervalMs) || reminderIntervalMs < 1_000) {
  console.error('REMINDER_INTERVAL_MS must be a number of milliseconds, at least 1000');
  process.exit(1);
}
const workerId = `${hostname()}:${process.pid}`.slice(0, 64);

console.log(`outbox worker ${workerId}: sending through ${env.SMTP_HOST}:${env.SMTP_PORT}, polling every ${intervalMs} ms`);
const worker = startOutboxWorker({ workerId, intervalMs });
const reminders = startReminderLoop({ intervalMs: reminderIntervalMs });
worker.stopped
  .then(() => reminders.stop())
  .then(() => closeDb())
  .then(() => console.log(`outbox worker ${workerId}: stopped`))
  .catch((err: unknown) => {
    console.error(err instanceof Error ? err.message : err);
    process.exit(1);
  });
