import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { EnvError } from '../lib/env';
import { roleLabels } from '../lib/auth/roles';
import { demoPassword, demoUsers } from './seed/demo-users';
import { prepareDatabase } from './services/database';
import { startMariaDb } from './services/mariadb';
import { ensureBuild, startNextApp, startWorker, waitForApp, workerScript } from './services/next-app';
import { Teardown, watchAncestors, type ServiceProcess } from './services/processes';
import { startS3Fake } from './services/s3';
import {
  appSettings,
  assertDistinctPorts,
  checkNodeVersion,
  childEnv,
  loadOrCreateSecrets,
  portSetting,
} from './services/settings';
import { startSmtpFake } from './services/smtp';
import { StartError, assertPortFree, tail } from './services/util';

/*
 * `npm start`: the whole demo on one machine. A private MariaDB, an S3 fake and an SMTP fake with a
 * mail viewer, the built app and the mail worker, with the Brackwater Capsule Co. demo data on first
 * run. Ctrl-C stops all of it. Everything lives under .data/demo/.
 */

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const dataDir = path.join(root, '.data', 'demo');
const rel = (p: string) => path.relative(process.cwd(), p) || '.';
const say = (line: string) => console.log(`plumbline: ${line}`);

const teardown = new Teardown(say);
let signalled: NodeJS.Signals | null = null;
let resolveStop: (reason: string) => void = () => {};
const stopRequested = new Promise<string>((resolve) => (resolveStop = resolve));

function onSignal(signal: NodeJS.Signals, why: string = signal) {
  if (signalled) {
    say('still stopping, one moment ...');
    return;
  }
  signalled = signal;
  console.log('');
  say(`${why}: stopping ...`);
  resolveStop(signal);
  // Interrupts whatever is starting right now (a build, the app) instead of waiting for it.
  void teardown.stopAll();
}

function banner(opts: {
  appUrl: string;
  viewerUrl: string;
  mailDir: string;
  dbPort: number;
  s3Port: number;
  worker: boolean;
  seconds: number;
}) {
  const line = '─'.repeat(78);
  const out: string[] = [line, `  Plumbline is running (demo: Brackwater Capsule Co.)   ready in ${opts.seconds.toFixed(1)} s`, ''];
  out.push(`  Open        ${opts.appUrl}`);
  out.push(`  Sign in as  (every demo user's password: ${demoPassword})`);
  const width = Math.max(...demoUsers.map((u) => u.email.length));
  for (const u of demoUsers) {
    out.push(`              ${u.email.padEnd(width)}  ${roleLabels[u.role].padEnd(16)} ${u.name}`);
  }
  out.push('');
  out.push(`  Mail        nothing leaves this machine; read it at ${opts.viewerUrl}`);
  out.push(`              (one .json + .eml per message in ${rel(opts.mailDir)}/)`);
  if (!opts.worker) out.push(`              NOTE: ${workerScript} is missing, so queued mail is not being sent.`);
  out.push(`  Data        ${rel(dataDir)}/  (MariaDB 127.0.0.1:${opts.dbPort}, S3 fake 127.0.0.1:${opts.s3Port})`);
  out.push(`  Logs        ${rel(path.join(dataDir, 'logs'))}/app.log, worker.log, and below`);
  out.push(`  Stop        Ctrl-C (stops the app, the worker, the fakes and MariaDB)`);
  out.push(line);
  console.log(out.join('\n'));
}

async function start(): Promise<{ app: ServiceProcess; worker: ServiceProcess | null }> {
  const started = Date.now();
  checkNodeVersion();
  const ports = {
    PLUMBLINE_APP_PORT: portSetting('PLUMBLINE_APP_PORT', 3000),
    PLUMBLINE_DB_PORT: portSetting('PLUMBLINE_DB_PORT', 33061),
    PLUMBLINE_S3_PORT: portSetting('PLUMBLINE_S3_PORT', 9100),
    PLUMBLINE_SMTP_PORT: portSetting('PLUMBLINE_SMTP_PORT', 2525),
    PLUMBLINE_MAIL_VIEWER_PORT: portSetting('PLUMBLINE_MAIL_VIEWER_PORT', 2580),
  };
  assertDistinctPorts(ports);
  const appPort = ports.PLUMBLINE_APP_PORT;
  const appUrl = `http://localhost:${appPort}`;
  const secrets = loadOrCreateSecrets(path.join(dataDir, 'secrets.json'));

  // Settings are checked before anything starts, with the URLs every service will have.
  const s3Preview = { endpoint: '127.0.0.1', port: ports.PLUMBLINE_S3_PORT, accessKey: 'S3RVER', secretKey: 'S3RVER', bucket: 'plumbline-attachments' };
  const dbPreview = `mysql://plumbline_app:x@127.0.0.1:${ports.PLUMBLINE_DB_PORT}/plumbline`;
  appSettings({ appUrl, databaseUrl: dbPreview, databaseAdminUrl: dbPreview, authSecret: secrets.authSecret, s3: s3Preview, smtpPort: ports.PLUMBLINE_SMTP_PORT, nodeEnv: 'production' });
  const what: Record<keyof typeof ports, string> = {
    PLUMBLINE_APP_PORT: 'the app',
    PLUMBLINE_DB_PORT: 'MariaDB',
    PLUMBLINE_S3_PORT: 'the S3 fake',
    PLUMBLINE_SMTP_PORT: 'the SMTP fake',
    PLUMBLINE_MAIL_VIEWER_PORT: 'the mail viewer',
  };
  for (const [name, port] of Object.entries(ports)) await assertPortFree(port, what[name as keyof typeof ports], name);

  say(`starting MariaDB on 127.0.0.1:${ports.PLUMBLINE_DB_PORT} (data in ${rel(dataDir)}/) ...`);
  const mariadb = await startMariaDb({
    dataDir,
    port: ports.PLUMBLINE_DB_PORT,
    database: 'plumbline',
    appUser: 'plumbline_app',
    appPassword: secrets.appPassword,
    adminUser: 'plumbline_admin',
    adminPassword: secrets.adminPassword,
    log: say,
  });
  teardown.add('MariaDB', mariadb.stop);
  if (teardown.closed) throw new StartError('stopped');

  say('applying database migrations ...');
  const seedStarted = Date.now();
  const seed = await prepareDatabase({
    adminUrl: mariadb.adminUrl,
    appUrl: mariadb.appUrl,
    // The seed writes as the app does; the fakes it would mail through are not needed until the app runs.
    seedEnv: childEnv(
      appSettings({ appUrl, databaseUrl: mariadb.appUrl, databaseAdminUrl: mariadb.adminUrl, authSecret: secrets.authSecret, s3: s3Preview, smtpPort: ports.PLUMBLINE_SMTP_PORT, nodeEnv: 'production' }),
    ),
    teardown,
    recreateDatabase: () =>
      mariadb.rootSql('DROP DATABASE IF EXISTS `plumbline`; CREATE DATABASE `plumbline` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;'),
    log: say,
    where: `${rel(dataDir)}/`,
  });
  const took = ((Date.now() - seedStarted) / 1000).toFixed(1);
  if (seed === 'seeded' || seed === 'reseeded') say(`loaded the Brackwater Capsule Co. demo data (${took} s)`);
  if (seed === 'kept') say('database already has users: keeping its data (delete .data/demo/ for a fresh demo)');

  const s3 = await startS3Fake({
    port: ports.PLUMBLINE_S3_PORT,
    dataDir: path.join(dataDir, 's3'),
    bucket: 'plumbline-attachments',
    allowedOrigins: [appUrl, `http://127.0.0.1:${appPort}`],
  });
  teardown.add('S3 fake', s3.stop);
  const mailDir = path.join(dataDir, 'mail');
  const smtp = await startSmtpFake({
    port: ports.PLUMBLINE_SMTP_PORT,
    viewerPort: ports.PLUMBLINE_MAIL_VIEWER_PORT,
    dir: mailDir,
    log: (l) => say(l),
  });
  teardown.add('SMTP fake and mail viewer', smtp.stop);

  const settings = appSettings({
    appUrl,
    databaseUrl: mariadb.appUrl,
    databaseAdminUrl: mariadb.adminUrl,
    authSecret: secrets.authSecret,
    s3,
    smtpPort: smtp.port,
    nodeEnv: 'production',
  });
  const env = childEnv(settings);
  await ensureBuild({ root, env, settings, recordFile: path.join(dataDir, 'build-hash'), log: say, teardown });

  const logDir = path.join(dataDir, 'logs');
  const app = startNextApp({ root, port: appPort, env, logDir, echo: true });
  teardown.add('app', app.stop);
  const worker = startWorker({ root, env, logDir, echo: true });
  if (worker) teardown.add('worker', worker.stop);
  else say(`${workerScript} does not exist yet: running without the worker (mail stays queued).`);

  const { status } = await waitForApp(app, appPort);
  if (status >= 500) say(`note: the home page answered HTTP ${status}; see ${rel(app.logFile)}`);

  banner({
    appUrl,
    viewerUrl: smtp.viewerUrl ?? '',
    mailDir,
    dbPort: ports.PLUMBLINE_DB_PORT,
    s3Port: ports.PLUMBLINE_S3_PORT,
    worker: worker !== null,
    seconds: (Date.now() - started) / 1000,
  });
  return { app, worker };
}

function explain(err: unknown): string {
  if (err instanceof StartError || err instanceof EnvError) return err.message;
  if (err instanceof Error) {
    const cause = (err as { cause?: unknown }).cause;
    const detail = cause instanceof Error && cause.message !== err.message ? `\n  (${cause.message})` : '';
    return `${err.message}${detail}`;
  }
  return String(err);
}

async function main(): Promise<number> {
  // The migrations import app modules marked server-only; see the preload's comment.
  await import('./services/server-only-preload.mjs');
  process.on('SIGINT', () => onSignal('SIGINT'));
  process.on('SIGTERM', () => onSignal('SIGTERM'));
  process.on('SIGHUP', () => onSignal('SIGHUP'));
  watchAncestors(3, () => onSignal('SIGHUP', 'the npm command that started this has ended'));

  let running: Awaited<ReturnType<typeof start>>;
  try {
    running = await start();
  } catch (err) {
    if (!signalled) {
      console.error(`\nplumbline: could not start.\n${explain(err)}\n`);
      if (process.env.PLUMBLINE_DEBUG && err instanceof Error) console.error(err.stack);
    }
    await teardown.stopAll();
    return signalled ? 130 : 1;
  }

  const { app, worker } = running;
  void worker?.exited.then((code) => {
    if (signalled || teardown.closed) return;
    say(`the worker stopped (exit ${code}); the app keeps running but mail is not sent. Last lines of ${rel(worker.logFile)}:`);
    console.log(tail(worker.logFile, 15));
  });
  const reason = await Promise.race([stopRequested, app.exited.then((code) => `app-exit:${code}`)]);
  if (reason.startsWith('app-exit') && !signalled) {
    console.error(`\nplumbline: the app stopped unexpectedly (exit ${app.exitCode}). Last lines of ${rel(app.logFile)}:`);
    console.error(tail(app.logFile, 25));
    say('stopping the rest ...');
  }
  await teardown.stopAll();
  say('everything stopped.');
  return signalled ? 0 : 1;
}

main().then(
  (code) => process.exit(code),
  (err: unknown) => {
    console.error(`plumbline: ${explain(err)}`);
    process.exit(1);
  },
);
