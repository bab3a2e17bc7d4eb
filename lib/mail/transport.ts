import nodemailer, { type SendMailOptions, type Transporter } from 'nodemailer';
import type SMTPPool from 'nodemailer/lib/smtp-pool';
import { getEnv, type Env } from '../env';

/*
 * The SMTP connection the outbox worker sends through. Pooled, so a burst of notifications reuses
 * one connection instead of opening one per message. No 'server-only' here: the worker runs this
 * outside Next.js (scripts/worker.ts).
 */

/** What the worker needs from a transport; tests can pass their own. */
export interface MailTransport {
  sendMail(mail: SendMailOptions): Promise<unknown>;
  close?(): void;
}

export function createMailTransport(env: Env = getEnv()): Transporter {
  const options: SMTPPool.Options = {
    host: env.SMTP_HOST,
    port: env.SMTP_PORT,
    secure: env.SMTP_SECURE,
    requireTLS: !env.SMTP_SECURE && env.SMTP_REQUIRE_TLS,
    auth: env.SMTP_USER ? { user: env.SMTP_USER, pass: env.SMTP_PASSWORD ?? '' } : undefined,
    pool: true,
    maxConnections: 2,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 30_000,
  };
  return nodemailer.createTransport(options, { from: env.MAIL_FROM });
}
