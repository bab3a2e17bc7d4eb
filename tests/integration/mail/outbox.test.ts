import { randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import net from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { and, asc, eq, inArray, like, sql } from 'drizzle-orm';
import { drizzle } from 'drizzle-orm/mysql2';
import mysql from 'mysql2/promise';
import type { SendMailOptions } from 'nodemailer';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db, type Db } from '@/db/client';
import * as schema from '@/db/schema';
import { mailAttempts, mailOutbox } from '@/db/schema';
import { getEnv } from '@/lib/env';
import { enqueueMail } from '@/lib/mail/outbox';
import { renderMailLayout } from '@/lib/mail/templates/layout';
import { createMailTransport, type MailTransport } from '@/lib/mail/transport';
import { runOutboxOnce, startOutboxWorker } from '@/lib/mail/worker';
import { listCapturedMail, startSmtpFake, type RunningSmtpFake } from '../../../scripts/services/smtp';

/*
 * The transactional outbox against the real database and a real SMTP listener started here, so the
 * tests can take the relay down and bring it back. "Exactly once" and "never lost" are the outbox
 * pattern's promises (common practice); SKIP LOCKED is MariaDB's documented locking-read option.
 */

const run = randomUUID().slice(0, 8);
let seq = 0;
const key = (label: string) => `test:${run}:${label}:${seq++}`;
const mailDirs: string[] = [];
const transports: MailTransport[] = [];
const pools: mysql.Pool[] = [];

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const { port } = s.address() as net.AddressInfo;
      s.close(() => resolve(port));
    });
  });
}

async function startRelay(port?: number): Promise<RunningSmtpFake> {
  const dir = mkdtempSync(path.join(tmpdir(), 'plumbline-outbox-'));
  mailDirs.push(dir);
  return startSmtpFake({ port: port ?? (await freePort()), dir });
}

function transportTo(port: number): MailTransport {
  const t = createMailTransport({ ...getEnv(), SMTP_HOST: '127.0.0.1', SMTP_PORT: port, SMTP_USER: undefined });
  transports.push(t);
  return t;
}

/** A second pool, as a second worker process would have. */
function separatePool(): Db {
  const pool = mysql.createPool({ uri: process.env.DATABASE_URL!, timezone: 'Z', connectionLimit: 4 });
  pools.push(pool);
  return drizzle(pool, { schema, mode: 'default' });
}

async function enqueueMany(label: string, n: number): Promise<{ ids: number[]; messageIds: string[] }> {
  const messageIds: string[] = [];
  await db.transaction(async (tx) => {
    for (let i = 0; i < n; i++) {
      const { text, html } = renderMailLayout({
        siteName: 'Brackwater Capsule Co.',
        recordNumber: `DEV-2026-${String(i + 1).padStart(4, '0')}`,
        heading: `Outbox test ${label} ${i}`,
        paragraphs: ['A deviation needs your attention.'],
        link: { url: `https://quality.brackwater.example/deviations/${i + 1}`, label: 'Open the deviation' },
      });
      const r = await enqueueMail(tx, {
        dedupeKey: key(label),
        template: 'test',
        to: { address: `qa-${i}@brackwater.example` },
        subject: `[${run}] ${label} ${i}`,
        text,
        html,
      });
      messageIds.push(r.messageId);
    }
  });
  const rows = await db
    .select({ id: mailOutbox.id })
    .from(mailOutbox)
    .where(inArray(mailOutbox.messageId, messageIds))
    .orderBy(asc(mailOutbox.id));
  return { ids: rows.map((r) => r.id), messageIds };
}

const rowsFor = (ids: number[]) => db.select().from(mailOutbox).where(inArray(mailOutbox.id, ids)).orderBy(asc(mailOutbox.id));
const attemptsFor = (ids: number[]) =>
  db.select().from(mailAttempts).where(inArray(mailAttempts.outboxId, ids)).orderBy(asc(mailAttempts.id));
/** Other tests' leftover rows are not ours to send: park everything else so only this file's rows are due. */
const parkOthers = () =>
  db
    .update(mailOutbox)
    .set({ nextAttemptAt: sql`UTC_TIMESTAMP(3) + INTERVAL 1 DAY` })
    .where(and(eq(mailOutbox.status, 'pending'), sql`${mailOutbox.dedupeKey} NOT LIKE ${`test:${run}:%`}`));
const makeDue = (ids: number[]) =>
  db.update(mailOutbox).set({ nextAttemptAt: sql`UTC_TIMESTAMP(3) - INTERVAL 1 SECOND` }).where(inArray(mailOutbox.id, ids));

async function drain(worker: string, transport: MailTransport, database: Db, ids: number[], batchSize = 2) {
  for (let round = 0; round < 200; round++) {
    await runOutboxOnce({ workerId: worker, transport, database, batchSize });
    const rows = await database.select({ status: mailOutbox.status }).from(mailOutbox).where(inArray(mailOutbox.id, ids));
    if (rows.every((r) => r.status === 'sent')) return;
  }
  throw new Error(`${worker}: messages still not sent after 200 rounds`);
}

let relay: RunningSmtpFake;

beforeAll(async () => {
  relay = await startRelay();
  await parkOthers();
});

afterAll(async () => {
  for (const t of transports) t.close?.();
  await relay?.stop();
  await Promise.all(pools.map((p) => p.end()));
  await closeDb();
  for (const d of mailDirs) rmSync(d, { recursive: true, force: true });
});

describe('enqueueMail', () => {
  it('queues a notification once per dedupe key, keeping the first Message-ID', async () => {
    const dedupeKey = key('dedupe');
    const mail = { dedupeKey, template: 'test', to: { address: 'qa@brackwater.example' }, subject: 'once', text: 't', html: '<p>t</p>' };
    const first = await db.transaction((tx) => enqueueMail(tx, mail));
    const second = await db.transaction((tx) => enqueueMail(tx, { ...mail, subject: 'twice' }));
    expect(first.queued).toBe(true);
    expect(second).toEqual({ queued: false, messageId: first.messageId });
    expect(first.messageId).toMatch(/^<[0-9a-f-]{36}@[a-z0-9.-]+>$/);
    const rows = await db.select().from(mailOutbox).where(eq(mailOutbox.dedupeKey, dedupeKey));
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ subject: 'once', status: 'pending', attempts: 0 });
  });

  it('queues nothing when the surrounding transaction rolls back', async () => {
    const dedupeKey = key('rollback');
    await expect(
      db.transaction(async (tx) => {
        await enqueueMail(tx, { dedupeKey, template: 'test', to: { address: 'qa@brackwater.example' }, subject: 's', text: 't', html: 'h' });
        throw new Error('the event failed');
      }),
    ).rejects.toThrow('the event failed');
    expect(await db.select().from(mailOutbox).where(eq(mailOutbox.dedupeKey, dedupeKey))).toHaveLength(0);
  });

  it('refuses an over-long subject instead of letting INSERT IGNORE truncate it', async () => {
    await expect(
      db.transaction((tx) =>
        enqueueMail(tx, { dedupeKey: key('long'), template: 'test', to: { address: 'qa@brackwater.example' }, subject: 'x'.repeat(256), text: 't', html: 'h' }),
      ),
    ).rejects.toThrow();
  });
});

describe('outbox worker', () => {
  it('delivers each of 20 messages exactly once with two workers sending at the same time (SKIP LOCKED)', async () => {
    const { ids, messageIds } = await enqueueMany('pair', 20);
    expect(ids).toHaveLength(20);
    const slow = (t: MailTransport): MailTransport => ({
      // A little latency per send makes the two workers' rounds overlap.
      sendMail: async (m: SendMailOptions) => {
        await new Promise((r) => setTimeout(r, 25));
        return t.sendMail(m);
      },
    });
    await Promise.all([
      drain('worker-a', slow(transportTo(relay.port)), separatePool(), ids),
      drain('worker-b', slow(transportTo(relay.port)), separatePool(), ids),
    ]);

    const received = listCapturedMail(relay.dir).filter((m) => m.subject.startsWith(`[${run}] pair `));
    expect(received).toHaveLength(20);
    expect(received.map((m) => m.messageId).sort()).toEqual([...messageIds].sort());

    const rows = await rowsFor(ids);
    expect(rows.every((r) => r.status === 'sent' && r.attempts === 1 && r.sentAt !== null)).toBe(true);
    expect(new Set(rows.map((r) => r.claimedBy))).toEqual(new Set(['worker-a', 'worker-b']));
    const attempts = await attemptsFor(ids);
    expect(attempts).toHaveLength(20);
    expect(attempts.every((a) => a.outcome === 'sent' && a.finishedAt !== null)).toBe(true);
  });

  it('skips rows another worker holds locked instead of waiting for them', async () => {
    const { ids } = await enqueueMany('locked', 4);
    const other = separatePool();
    const received = listCapturedMail(relay.dir).length;
    await other.transaction(async (tx) => {
      // Another worker, mid-claim, holds the first two rows.
      await tx.select().from(mailOutbox).where(inArray(mailOutbox.id, ids.slice(0, 2))).for('update');
      const started = performance.now();
      const r = await runOutboxOnce({ workerId: 'worker-c', transport: transportTo(relay.port), batchSize: 10 });
      expect(performance.now() - started).toBeLessThan(5_000);
      expect(r).toMatchObject({ claimed: 2, sent: 2 });
    });
    const rows = await rowsFor(ids);
    expect(rows.map((r) => r.status)).toEqual(['pending', 'pending', 'sent', 'sent']);
    expect(listCapturedMail(relay.dir).length - received).toBe(2);
    await drain('worker-c', transportTo(relay.port), db, ids);
  });

  it('keeps messages pending with back-off while SMTP is down, then delivers each once when it is back', async () => {
    const port = await freePort();
    const transport = transportTo(port);
    const { ids, messageIds } = await enqueueMany('down', 3);

    const r1 = await runOutboxOnce({ workerId: 'worker-d', transport, batchSize: 10 });
    expect(r1).toMatchObject({ claimed: 3, sent: 0, retrying: 3, failed: 0 });
    let rows = await rowsFor(ids);
    expect(rows.every((r) => r.status === 'pending' && r.attempts === 1 && r.claimedBy === null)).toBe(true);
    expect(rows.every((r) => (r.lastError ?? '').length > 0)).toBe(true);
    // The first retry waits a minute (lib/mail/worker.ts retryDelayMs), measured on the database clock.
    const [{ dbNow } = { dbNow: new Date(0) }] = await db.select({ dbNow: sql<Date>`UTC_TIMESTAMP(3)`.mapWith(mailOutbox.nextAttemptAt) }).from(sql`DUAL`);
    for (const r of rows) {
      const wait = r.nextAttemptAt.getTime() - dbNow.getTime();
      expect(wait).toBeGreaterThan(50_000);
      expect(wait).toBeLessThanOrEqual(60_000);
    }
    let attempts = await attemptsFor(ids);
    expect(attempts.map((a) => a.outcome)).toEqual(['failed', 'failed', 'failed']);
    expect(attempts.every((a) => (a.error ?? '').length > 0 && a.finishedAt !== null)).toBe(true);

    // Not due yet: a second round leaves them alone.
    expect((await runOutboxOnce({ workerId: 'worker-d', transport, batchSize: 10 })).claimed).toBe(0);

    const back = await startRelay(port);
    try {
      await makeDue(ids);
      const r2 = await runOutboxOnce({ workerId: 'worker-d', transport, batchSize: 10 });
      expect(r2).toMatchObject({ claimed: 3, sent: 3 });
      expect((await runOutboxOnce({ workerId: 'worker-d', transport, batchSize: 10 })).claimed).toBe(0);
      const received = listCapturedMail(back.dir);
      expect(received.map((m) => m.messageId).sort()).toEqual([...messageIds].sort());
    } finally {
      // A pooled connection left open would make the relay wait for it before closing.
      transport.close?.();
      await back.stop();
    }
    rows = await rowsFor(ids);
    expect(rows.every((r) => r.status === 'sent' && r.attempts === 2 && r.lastError === null)).toBe(true);
    attempts = await attemptsFor(ids);
    expect(attempts.map((a) => a.outcome)).toEqual(['failed', 'failed', 'failed', 'sent', 'sent', 'sent']);
  });

  it('gives up after the last attempt and marks the message failed', async () => {
    const transport = transportTo(await freePort());
    const { ids } = await enqueueMany('give-up', 1);
    const opts = { workerId: 'worker-e', transport, maxAttempts: 2, retryDelay: () => 0 };
    expect(await runOutboxOnce(opts)).toMatchObject({ claimed: 1, retrying: 1 });
    expect(await runOutboxOnce(opts)).toMatchObject({ claimed: 1, failed: 1 });
    expect(await runOutboxOnce(opts)).toMatchObject({ claimed: 0 });
    const [row] = await rowsFor(ids);
    expect(row).toMatchObject({ status: 'failed', attempts: 2 });
    expect(await attemptsFor(ids)).toHaveLength(2);
  });

  it('reclaims a message left "sending" by a dead worker and resends it with the same Message-ID', async () => {
    const { ids, messageIds } = await enqueueMany('stale', 2);
    const [staleId, freshId] = ids as [number, number];
    // Worker "z" claimed both and died mid-send: one claim is 10 minutes old, the other 1 minute.
    for (const [id, minutes] of [
      [staleId, 10],
      [freshId, 1],
    ] as const) {
      await db
        .update(mailOutbox)
        .set({ status: 'sending', claimedBy: 'worker-z', attempts: 1, claimedAt: sql`UTC_TIMESTAMP(3) - INTERVAL ${minutes} MINUTE` })
        .where(eq(mailOutbox.id, id));
      await db.insert(mailAttempts).values({ outboxId: id, worker: 'worker-z', startedAt: sql`UTC_TIMESTAMP(3) - INTERVAL ${minutes} MINUTE`, outcome: 'started' });
    }
    const before = listCapturedMail(relay.dir).length;
    const r = await runOutboxOnce({ workerId: 'worker-f', transport: transportTo(relay.port), batchSize: 10 });
    expect(r).toMatchObject({ claimed: 1, sent: 1 });

    const received = listCapturedMail(relay.dir).slice(before);
    expect(received.map((m) => m.messageId)).toEqual([messageIds[0]]);
    const [stale, fresh] = await rowsFor(ids);
    expect(stale).toMatchObject({ status: 'sent', attempts: 2, claimedBy: 'worker-f' });
    expect(fresh).toMatchObject({ status: 'sending', claimedBy: 'worker-z' });
    const attempts = await attemptsFor([staleId]);
    expect(attempts.map((a) => [a.worker, a.outcome])).toEqual([
      ['worker-z', 'failed'],
      ['worker-f', 'sent'],
    ]);
    expect(attempts[0]!.error).toMatch(/abandoned/);
    // Leave nothing stuck for later tests.
    await makeDue([freshId]);
    await db.update(mailOutbox).set({ claimedAt: sql`UTC_TIMESTAMP(3) - INTERVAL 1 HOUR` }).where(eq(mailOutbox.id, freshId));
    await drain('worker-f', transportTo(relay.port), db, [freshId]);
  });

  it('sends a multipart message with the layout: plain text and escaped HTML, site name, record number and link', async () => {
    const { text, html } = renderMailLayout({
      siteName: 'Brackwater Capsule Co.',
      recordNumber: 'DEV-2026-0042',
      heading: 'Review <script>alert(1)</script> & approve',
      paragraphs: ['Batch BW-2026-1027-B is on hold.'],
      link: { url: 'https://quality.brackwater.example/deviations/42?x=1&y=2', label: 'Open DEV-2026-0042' },
    });
    const dedupeKey = key('layout');
    const { messageId } = await db.transaction((tx) =>
      enqueueMail(tx, { dedupeKey, template: 'test', to: { address: 'approver@brackwater.example' }, subject: `[${run}] layout`, text, html }),
    );
    const before = listCapturedMail(relay.dir).length;
    await runOutboxOnce({ workerId: 'worker-g', transport: transportTo(relay.port) });
    const [mail] = listCapturedMail(relay.dir).slice(before).filter((m) => m.messageId === messageId);
    expect(mail).toBeDefined();
    expect(mail!.to).toEqual(['approver@brackwater.example']);
    expect(mail!.from).toContain(getEnv().MAIL_FROM.replace(/^.*</, '').replace(/>$/, ''));
    expect(mail!.text).toContain('DEV-2026-0042: Review <script>alert(1)</script> & approve');
    expect(mail!.text).toContain('Open DEV-2026-0042: https://quality.brackwater.example/deviations/42?x=1&y=2');
    expect(mail!.html).toContain('Brackwater Capsule Co.');
    expect(mail!.html).toContain('Review &lt;script&gt;alert(1)&lt;/script&gt; &amp; approve');
    expect(mail!.html).not.toContain('<script>');
    expect(mail!.html).toContain('href="https://quality.brackwater.example/deviations/42?x=1&amp;y=2"');
  });

  it('stops gracefully: finishes the message being sent and hands the rest of the batch back', async () => {
    const { ids } = await enqueueMany('stop', 5);
    let started!: () => void;
    const firstSendStarted = new Promise<void>((r) => (started = r));
    const real = transportTo(relay.port);
    const transport: MailTransport = {
      sendMail: async (m) => {
        started();
        await new Promise((r) => setTimeout(r, 300));
        return real.sendMail(m);
      },
    };
    const worker = startOutboxWorker({ workerId: 'worker-h', transport, batchSize: 5, intervalMs: 60_000, handleSignals: false, log: () => {} });
    await firstSendStarted;
    await worker.stop();

    const rows = await rowsFor(ids);
    expect(rows.map((r) => r.status)).toEqual(['sent', 'pending', 'pending', 'pending', 'pending']);
    expect(rows.slice(1).every((r) => r.attempts === 0 && r.claimedBy === null)).toBe(true);
    const attempts = await attemptsFor(ids);
    expect(attempts.map((a) => a.outcome)).toEqual(['sent', 'failed', 'failed', 'failed', 'failed']);
    expect(attempts.slice(1).every((a) => /not sent/.test(a.error ?? ''))).toBe(true);
    await drain('worker-h', transportTo(relay.port), db, ids, 5);
  });
});

describe('no leftovers', () => {
  it('refuses to send to a relay that offers no STARTTLS unless the site turned the requirement off (OWASP ASVS 4.0.3 V9.2.1)', async () => {
    const relay = await startRelay(); // the fake offers no STARTTLS, like a misconfigured relay
    const mail = { from: 'quality@brackwater.example', to: 'approver@brackwater.example', subject: 'TLS check', text: 'x' };
    const strict = createMailTransport({ ...getEnv(), SMTP_HOST: '127.0.0.1', SMTP_PORT: relay.port, SMTP_USER: undefined, SMTP_REQUIRE_TLS: true });
    transports.push(strict);
    await expect(strict.sendMail(mail)).rejects.toThrow(/STARTTLS/i);
    const lax = createMailTransport({ ...getEnv(), SMTP_HOST: '127.0.0.1', SMTP_PORT: relay.port, SMTP_USER: undefined, SMTP_REQUIRE_TLS: false });
    transports.push(lax);
    await expect(lax.sendMail(mail)).resolves.toBeTruthy();
  });

  it('leaves none of this file\'s messages pending or sending', async () => {
    const left = await db
      .select({ id: mailOutbox.id, status: mailOutbox.status })
      .from(mailOutbox)
      .where(and(like(mailOutbox.dedupeKey, `test:${run}:%`), inArray(mailOutbox.status, ['pending', 'sending'])));
    expect(left).toEqual([]);
  });
});
