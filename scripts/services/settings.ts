import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { envSchema, parseEnv } from '../../lib/env';
import { StartError } from './util';

/*
 * Settings for the local stacks. Everything the app and the worker need travels as environment
 * variables, validated by lib/env before anything starts, so a bad value stops us with the same
 * message the app itself would give.
 */

export const siteName = 'Brackwater Capsule Co.';
export const mailFrom = 'Brackwater Capsule Co. Quality <quality@brackwater.example>';

export function checkNodeVersion(): void {
  const [major = 0, minor = 0] = process.versions.node.split('.').map(Number);
  if ((major === 20 && minor >= 19) || major >= 22) return;
  throw new StartError(
    `Plumbline needs Node.js 20.19 or newer (20.x), or 22 and newer; this is ${process.versions.node}.\n` +
      'Install a supported Node.js (e.g. from nodejs.org or your package manager) and run again.',
  );
}

/** A port from PLUMBLINE_* with a default; anything but a whole number in range is refused. */
export function portSetting(name: string, fallback: number): number {
  const raw = process.env[name];
  if (raw === undefined || raw === '') return fallback;
  const port = Number(raw);
  if (!Number.isInteger(port) || port < 1024 || port > 65535) {
    throw new StartError(`${name}=${raw} is not usable: give a port number between 1024 and 65535.`);
  }
  return port;
}

export function assertDistinctPorts(ports: Record<string, number>): void {
  const seen = new Map<number, string>();
  for (const [name, port] of Object.entries(ports)) {
    const other = seen.get(port);
    if (other) throw new StartError(`${name} and ${other} are both set to port ${port}; give each its own port.`);
    seen.set(port, name);
  }
}

export interface StackSecrets {
  appPassword: string;
  adminPassword: string;
  authSecret: string;
}

const randomSecret = (bytes: number) => randomBytes(bytes).toString('base64url');

/** Secrets made on first run and reused afterwards, readable only by the owner. */
export function loadOrCreateSecrets(file: string): StackSecrets {
  if (existsSync(file)) {
    try {
      const s = JSON.parse(readFileSync(file, 'utf8')) as Partial<StackSecrets>;
      if (s.appPassword && s.adminPassword && s.authSecret && s.authSecret.length >= 32) {
        return { appPassword: s.appPassword, adminPassword: s.adminPassword, authSecret: s.authSecret };
      }
    } catch {
      // Unreadable: make new ones below; MariaDB users get the new passwords when it starts.
    }
  }
  const secrets: StackSecrets = {
    appPassword: randomSecret(24),
    adminPassword: randomSecret(24),
    authSecret: randomSecret(32),
  };
  mkdirSync(path.dirname(file), { recursive: true });
  writeFileSync(file, JSON.stringify(secrets, null, 2) + '\n', { mode: 0o600 });
  return secrets;
}

export interface AppSettingsInput {
  appUrl: string;
  databaseUrl: string;
  databaseAdminUrl: string;
  authSecret: string;
  s3: { endpoint: string; port: number; accessKey: string; secretKey: string; bucket: string };
  smtpPort: number;
  nodeEnv: 'production' | 'test';
  /** Build folder; the test stack uses its own so it never replaces the demo's build. */
  distDir?: string;
}

/** The app's settings (lib/env names). SITE_NAME and MAIL_FROM may be overridden from the shell. */
export function appSettings(input: AppSettingsInput): Record<string, string> {
  const settings: Record<string, string> = {
    NODE_ENV: input.nodeEnv,
    DATABASE_URL: input.databaseUrl,
    DATABASE_ADMIN_URL: input.databaseAdminUrl,
    AUTH_SECRET: input.authSecret,
    APP_URL: input.appUrl,
    AUTH_URL: input.appUrl,
    AUTH_TRUST_HOST: 'true',
    SITE_NAME: process.env.SITE_NAME || siteName,
    S3_ENDPOINT: input.s3.endpoint,
    S3_PORT: String(input.s3.port),
    S3_USE_SSL: 'false',
    S3_ACCESS_KEY: input.s3.accessKey,
    S3_SECRET_KEY: input.s3.secretKey,
    S3_BUCKET: input.s3.bucket,
    S3_REGION: 'us-east-1',
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(input.smtpPort),
    SMTP_SECURE: 'false',
    // The SMTP fake listens on loopback only and offers no STARTTLS; a real relay must (README, Configuration).
    SMTP_REQUIRE_TLS: 'false',
    MAIL_FROM: process.env.MAIL_FROM || mailFrom,
    NEXT_DIST_DIR: input.distDir ?? '.next',
  };
  parseEnv(settings);
  return settings;
}

/**
 * The environment for a child: the shell's own variables minus every app setting (so a stray
 * DATABASE_URL or SMTP_PASSWORD in the shell cannot leak in), plus ours.
 */
export function childEnv(settings: Record<string, string>, extra: Record<string, string> = {}): NodeJS.ProcessEnv {
  const env: NodeJS.ProcessEnv = { ...process.env };
  for (const key of [...Object.keys(envSchema.shape), 'AUTH_URL', 'AUTH_TRUST_HOST', 'NEXTAUTH_URL', 'NEXTAUTH_SECRET']) {
    delete env[key];
  }
  return { ...env, NEXT_TELEMETRY_DISABLED: '1', ...settings, ...extra };
}

/** The same database URL with another database name. */
export function withDatabase(url: string, database: string): string {
  const u = new URL(url);
  u.pathname = `/${database}`;
  return u.toString();
}
