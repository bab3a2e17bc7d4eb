import { existsSync, readdirSync, rmSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { EnvError } from '../lib/env';
import { copyDatabaseRows, migrateOnly, prepareDatabase } from './services/database';
import { startMariaDb } from './services/mariadb';
import { ensureBuild, startNextApp, startWorker, waitForApp, workerScript } from './services/next-app';
import { Teardown, runForeground, watchAncestors } from './services/processes';
import { startS3Fake } from './services/s3';
import { appSettings, assertDistinctPorts, checkNodeVersion, childEnv, loadOrCreateSecrets, portSetting, withDatabase } from './services/settings';
import { startSmtpFake } from './services/smtp';
import { StartError, assertPortFree, ensureDebianPackages } from './services/util';

/*
 * `npm test`: unit and integration tests, then the browser tests against a production build, on a
 * private stack under .data/test/ that starts fresh every run (databases dropped, migrated and
 * seeded; mail and object folders emptied), so two runs of the same code give the same result.
 * Arguments go to vitest: `npm test -- tests/unit` runs only those files, and skips the services
 * and the build that the selection does not need.
 */

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const dataDir = path.join(root, '.data', 'test');
const say = (line: string) => console.log(`plumbline test: ${line}`);

type Project = 'unit' | 'integration' | 'e2e';
const projectDirs: Record<Project, string> = {
  unit: 'tests/unit',
  integration: 'tests/integration',
  e2e: 'tests/e2e',
};

// vitest options that take a value as the next argument; anything else starting with '-' is a flag.
const optionsWithValue = new Set([
  '-t',
  '--testNamePattern',
  '--reporter',
  '--outputFile',
  '--shard',
  '--bail',
  '--retry',
  '--maxWorkers',
  '--testTimeout',
  '--hookTimeout',
  '--sequence.seed',
  '--exclude',
]);

interface Selection {
  filters: string[];
  passthrough: string[];
  files: Record<Project, string[]>;
}

function listTests(dir: string): string[] {
  const full = path.join(root, dir);
  if (!existsSync(full)) return [];
  return readdirSync(full, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile() && /\.test\.tsx?$/.test(e.name))
    .map((e) => path.relative(root, path.join(e.parentPath, e.name)));
}

/** Same rule as vitest's own file filter, so we know which projects a selection touches. */
function matches(file: string, filters: string[]): boolean {
  if (filters.length === 0) return true;
  const rel = file.toLowerCase();
  return filters.some((f) => {
    if (path.isAbsolute(f) && path.join(root, file).startsWith(f)) return true;
    const relFilter = path.relative(root, path.resolve(root, f)) + (f.endsWith('/') ? '/' : '');
    return rel.includes(f.toLowerCase()) || rel.includes(relFilter.toLowerCase());
  });
}

function parseArgs(argv: string[]): Selection {
  const filters: string[] = [];
  const passthrough: string[] = [];
  const requested = new Set<Project>();
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i]!;
    if (arg === '--project' || arg.startsWith('--project=')) {
      const name = arg.includes('=') ? arg.slice('--project='.length) : argv[++i];
      if (name !== 'unit' && name !== 'integration' && name !== 'e2e') {
        throw new StartError(`--project ${name ?? ''}: the projects are unit, integration and e2e.`);
      }
      requested.add(name);
    } else if (arg.startsWith('-')) {
      passthrough.push(arg);
      if (optionsWithValue.has(arg) && i + 1 < argv.length) passthrough.push(argv[++i]!);
    } else {
      filters.push(arg);
    }
  }
  const files = {} as Record<Project, string[]>;
  for (const project of Object.keys(projectDirs) as Project[]) {
    const wanted = requested.size === 0 || requested.has(project);
    files[project] = wanted ? listTests(projectDirs[project]).filter((f) => matches(f, filters)) : [];
  }
  return { filters, passthrough, files };
}

interface PhaseResult {
  name: string;
  outcome: 'passed' | 'FAILED' | 'skipped';
  seconds: number;
  note?: string;
}

const teardown = new Teardown(say);
let signalled: NodeJS.Signals | null = null;

function onSignal(signal: NodeJS.Signals, why: string = signal) {
  if (signalled) return;
  signalled = signal;
  console.log('');
  say(`${why}: stopping ...`);
  void teardown.stopAll();
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

const vitestBin = 'node_modules/vitest/vitest.mjs';

async function runVitest(projects: Project[], sel: Selection, env: NodeJS.ProcessEnv): Promise<number> {
  // The whole unit suite measures the computation modules' branch coverage (thresholds in vitest.config.ts).
  const coverage = projects.includes('unit') && sel.filters.length === 0 && sel.passthrough.length === 0 ? ['--coverage'] : [];
  const args = [vitestBin, 'run', ...projects.flatMap((p) => ['--project', p]), ...coverage, ...sel.passthrough, ...sel.filters];
  return runForeground(process.execPath, args, { cwd: root, env }, teardown);
}

async function main(): Promise<number> {
  await import('./services/server-only-preload.mjs');
  process.on('SIGINT', () => onSignal('SIGINT'));
  process.on('SIGTERM', () => onSignal('SIGTERM'));
  process.on('SIGHUP', () => onSignal('SIGHUP'));
  watchAncestors(3, () => onSignal('SIGHUP', 'the npm command that started this has ended'));

  const started = Date.now();
  const results: PhaseResult[] = [];
  const phase = async (name: string, run: () => Promise<'passed' | 'FAILED' | { outcome: 'passed' | 'FAILED'; note: string }>) => {
    const t = Date.now();
    say(`── ${name}`);
    let outcome: PhaseResult['outcome'] = 'FAILED';
    let note: string | undefined;
    try {
      const r = await run();
      if (typeof r === 'string') outcome = r;
      else ({ outcome, note } = r);
    } catch (err) {
      if (!signalled) console.error(`\nplumbline test: ${name} failed.\n${explain(err)}\n`);
      note = signalled ? 'interrupted' : undefined;
    }
    if (signalled) note = 'interrupted';
    results.push({ name, outcome, seconds: (Date.now() - t) / 1000, note });
    return outcome === 'passed';
  };
  const skip = (name: string, note: string) => results.push({ name, outcome: 'skipped', seconds: 0, note });

  let sel: Selection;
  try {
    checkNodeVersion();
    sel = parseArgs(process.argv.slice(2));
  } catch (err) {
    console.error(`plumbline test: ${explain(err)}`);
    return 2;
  }
  const selected = (Object.keys(sel.files) as Project[]).filter((p) => sel.files[p].length > 0);
  if (selected.length === 0) {
    console.error(`plumbline test: no test file matches ${sel.filters.join(' ') || 'the selection'}.`);
    return 1;
  }
  const wantsUnitOrIntegration = selected.filter((p) => p !== 'e2e');
  const wantsServices = selected.includes('integration') || selected.includes('e2e');
  const wantsE2e = selected.includes('e2e');

  const ports = {
    PLUMBLINE_TEST_APP_PORT: portSetting('PLUMBLINE_TEST_APP_PORT', 3100),
    PLUMBLINE_TEST_DB_PORT: portSetting('PLUMBLINE_TEST_DB_PORT', 33062),
    PLUMBLINE_TEST_S3_PORT: portSetting('PLUMBLINE_TEST_S3_PORT', 9102),
    PLUMBLINE_TEST_SMTP_PORT: portSetting('PLUMBLINE_TEST_SMTP_PORT', 2527),
  };
  assertDistinctPorts(ports);
  const appPort = ports.PLUMBLINE_TEST_APP_PORT;
  const appUrl = `http://localhost:${appPort}`;
  const mailDir = path.join(dataDir, 'mail');
  const browserProfiles = path.join(dataDir, 'browser-profiles');
  const testEnvExtra = { PLUMBLINE_MAIL_DIR: mailDir, PLUMBLINE_E2E_BASE_URL: appUrl, PLUMBLINE_BROWSER_PROFILES: browserProfiles };
  rmSync(browserProfiles, { recursive: true, force: true });
  teardown.add('browser profiles', async () => rmSync(browserProfiles, { recursive: true, force: true }), { quiet: true });

  let itEnv: NodeJS.ProcessEnv = childEnv({}, { NODE_ENV: 'test' });
  let e2eSettings: Record<string, string> | null = null;

  if (wantsServices) {
    const ok = await phase('services: MariaDB, S3 and SMTP fakes, fresh databases', async () => {
      ensureDebianPackages(
        [
          { command: 'mariadbd', pkg: 'mariadb-server' },
          ...(wantsE2e ? [{ command: 'chromium', pkg: 'chromium' }] : []),
        ],
        say,
      );
      const what: Record<keyof typeof ports, string> = {
        PLUMBLINE_TEST_APP_PORT: 'the app under test',
        PLUMBLINE_TEST_DB_PORT: 'MariaDB',
        PLUMBLINE_TEST_S3_PORT: 'the S3 fake',
        PLUMBLINE_TEST_SMTP_PORT: 'the SMTP fake',
      };
      for (const [name, port] of Object.entries(ports)) await assertPortFree(port, what[name as keyof typeof ports], name);

      const secrets = loadOrCreateSecrets(path.join(dataDir, 'secrets.json'));
      const mariadb = await startMariaDb({
        dataDir,
        port: ports.PLUMBLINE_TEST_DB_PORT,
        database: 'plumbline_it',
        appUser: 'plumbline_app',
        appPassword: secrets.appPassword,
        adminUser: 'plumbline_admin',
        adminPassword: secrets.adminPassword,
        log: say,
      });
      teardown.add('MariaDB', mariadb.stop);
      if (teardown.closed) throw new StartError('stopped');

      const grants = ['127.0.0.1', 'localhost'].map(
        (host) => `GRANT ALL PRIVILEGES ON \`plumbline_e2e\`.* TO 'plumbline_admin'@'${host}' WITH GRANT OPTION`,
      );
      mariadb.rootSql(
        [
          'DROP DATABASE IF EXISTS `plumbline_it`',
          'DROP DATABASE IF EXISTS `plumbline_e2e`',
          'CREATE DATABASE `plumbline_it` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci',
          'CREATE DATABASE `plumbline_e2e` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci',
          ...grants,
        ].join(';\n') + ';',
      );
      const databases = {
        it: { adminUrl: mariadb.adminUrl, appUrl: mariadb.appUrl },
        e2e: { adminUrl: withDatabase(mariadb.adminUrl, 'plumbline_e2e'), appUrl: withDatabase(mariadb.appUrl, 'plumbline_e2e') },
      };
      const s3Settings = { endpoint: '127.0.0.1', port: ports.PLUMBLINE_TEST_S3_PORT, accessKey: 'S3RVER', secretKey: 'S3RVER', bucket: 'plumbline-test' };
      const seedEnv = (d: { adminUrl: string; appUrl: string }) =>
        childEnv(appSettings({ appUrl, databaseUrl: d.appUrl, databaseAdminUrl: d.adminUrl, authSecret: secrets.authSecret, s3: s3Settings, smtpPort: ports.PLUMBLINE_TEST_SMTP_PORT, nodeEnv: 'test' }));
      const seeding = Date.now();
      // The browser tests get the same demo as a copy: seeding a second time would only cost the time again.
      await Promise.all([prepareDatabase({ ...databases.it, seedEnv: seedEnv(databases.it), teardown }), migrateOnly(databases.e2e)]);
      copyDatabaseRows(mariadb.rootSql, 'plumbline_it', 'plumbline_e2e');
      say(`migrated and seeded the databases in ${((Date.now() - seeding) / 1000).toFixed(1)} s`);

      rmSync(path.join(dataDir, 's3'), { recursive: true, force: true });
      rmSync(mailDir, { recursive: true, force: true });
      const s3 = await startS3Fake({
        port: ports.PLUMBLINE_TEST_S3_PORT,
        dataDir: path.join(dataDir, 's3'),
        bucket: s3Settings.bucket,
        allowedOrigins: [appUrl, `http://127.0.0.1:${appPort}`],
      });
      teardown.add('S3 fake', s3.stop);
      const smtp = await startSmtpFake({ port: ports.PLUMBLINE_TEST_SMTP_PORT, dir: mailDir });
      teardown.add('SMTP fake', smtp.stop);

      const common = { appUrl, authSecret: secrets.authSecret, s3, smtpPort: smtp.port };
      itEnv = childEnv(
        appSettings({ ...common, databaseUrl: databases.it.appUrl, databaseAdminUrl: databases.it.adminUrl, nodeEnv: 'test' }),
        testEnvExtra,
      );
      e2eSettings = appSettings({
        ...common,
        databaseUrl: databases.e2e.appUrl,
        databaseAdminUrl: databases.e2e.adminUrl,
        nodeEnv: 'production',
        distDir: '.next-test',
      });
      return 'passed';
    });
    if (!ok) {
      if (wantsUnitOrIntegration.length) skip('unit + integration tests', 'services did not start');
      if (wantsE2e) skip('browser tests', 'services did not start');
      return finish(results, started, 1);
    }
  }

  if (wantsUnitOrIntegration.length && !signalled) {
    await phase(`${wantsUnitOrIntegration.join(' + ')} tests (vitest)`, async () =>
      (await runVitest(wantsUnitOrIntegration, sel, itEnv)) === 0 ? 'passed' : 'FAILED',
    );
  }

  if (wantsE2e && e2eSettings && !signalled) {
    const settings: Record<string, string> = e2eSettings;
    const appEnv = childEnv(settings);
    const built = await phase('build the app (next build)', async () => {
      const { built } = await ensureBuild({
        root,
        env: appEnv,
        settings,
        recordFile: path.join(dataDir, 'build-hash'),
        log: say,
        teardown,
      });
      return built ? 'passed' : { outcome: 'passed', note: 'unchanged since the last test build' };
    });
    let appUp = false;
    if (built && !signalled) {
      appUp = await phase(`start the app on ${appUrl} and the worker`, async () => {
        const logDir = path.join(dataDir, 'logs');
        rmSync(logDir, { recursive: true, force: true });
        const app = startNextApp({ root, port: appPort, env: appEnv, logDir, echo: false });
        teardown.add('app', app.stop);
        const worker = startWorker({ root, env: appEnv, logDir, echo: false });
        if (worker) teardown.add('worker', worker.stop);
        await waitForApp(app, appPort);
        return worker
          ? { outcome: 'passed', note: `logs in ${path.relative(root, logDir)}/` }
          : { outcome: 'passed', note: `${workerScript} missing: no worker` };
      });
    } else {
      skip('start the app and the worker', 'no build');
    }
    if (appUp && !signalled) {
      await phase('browser tests (vitest e2e, Chromium)', async () =>
        (await runVitest(['e2e'], sel, childEnv({ ...settings, NODE_ENV: 'test' }, testEnvExtra))) === 0 ? 'passed' : 'FAILED',
      );
    } else {
      skip('browser tests', 'the app did not start');
    }
  } else if (!wantsE2e) {
    skip('build, app and browser tests', 'no browser test selected');
  }

  return finish(results, started, 0);
}

async function finish(results: PhaseResult[], started: number, code: number): Promise<number> {
  await teardown.stopAll();
  const failed = code !== 0 || signalled !== null || results.some((r) => r.outcome === 'FAILED');
  const width = Math.max(...results.map((r) => r.name.length));
  const lines = results.map(
    (r) =>
      `  ${r.name.padEnd(width)}  ${r.outcome.padEnd(7)} ${r.outcome === 'skipped' ? '      ' : `${r.seconds.toFixed(1).padStart(5)} s`}${r.note ? `  (${r.note})` : ''}`,
  );
  const total = ((Date.now() - started) / 1000).toFixed(0);
  console.log(
    `\n${'─'.repeat(78)}\n  plumbline test summary\n${lines.join('\n')}\n  ` +
      `${signalled ? `interrupted (${signalled})` : failed ? 'FAILED' : 'all passed'} in ${total} s\n${'─'.repeat(78)}`,
  );
  return signalled ? 130 : failed ? 1 : 0;
}

main().then(
  (code) => process.exit(code),
  async (err: unknown) => {
    console.error(`plumbline test: ${explain(err)}`);
    await teardown.stopAll();
    process.exit(1);
  },
);
