import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { runForeground, spawnService, type ServiceProcess, type Teardown } from './processes';
import { StartError, sleep, tail } from './util';

/*
 * Building and running the Next.js app and the mail worker for the local stacks. A build is skipped
 * when nothing that goes into it changed: the sources (tracked and new, not ignored), the lock file,
 * the settings the build sees, and the build output itself still being the one we made.
 */

const nextBin = 'node_modules/next/dist/bin/next';

/** Paths that never reach the Next.js build; changing them must not cost a rebuild. */
const outsideBuild = [/^tests\//, /^scripts\//, /^\.ci\//, /^\.notes\//, /^drizzle\//, /\.md$/];

function buildInputFiles(root: string): string[] {
  const git = spawnSync('git', ['ls-files', '--cached', '--others', '--exclude-standard', '-z'], {
    cwd: root,
    encoding: 'utf8',
    maxBuffer: 64 * 1024 * 1024,
  });
  if (git.status === 0) return git.stdout.split('\0').filter(Boolean);
  // Not a git checkout (e.g. an unpacked archive): walk the tree instead.
  const skip = new Set(['node_modules', '.next', '.next-test', '.data', '.git', 'coverage']);
  const files: string[] = [];
  const walk = (rel: string) => {
    for (const entry of readdirSync(path.join(root, rel), { withFileTypes: true })) {
      const child = rel ? `${rel}/${entry.name}` : entry.name;
      if (entry.isDirectory()) {
        if (!skip.has(entry.name)) walk(child);
      } else if (entry.isFile()) files.push(child);
    }
  };
  walk('');
  return files;
}

export function buildFingerprint(root: string, settings: Record<string, string>): string {
  const hash = createHash('sha256');
  const files = buildInputFiles(root)
    .filter((f) => !outsideBuild.some((re) => re.test(f)))
    .sort();
  for (const file of files) {
    const full = path.join(root, file);
    let digest = 'missing';
    if (existsSync(full) && statSync(full).isFile()) {
      digest = createHash('sha256').update(readFileSync(full)).digest('hex');
    }
    hash.update(`${file}\0${digest}\0`);
  }
  const lock = path.join(root, 'package-lock.json');
  hash.update(`package-lock.json\0${existsSync(lock) ? createHash('sha256').update(readFileSync(lock)).digest('hex') : 'missing'}\0`);
  const sorted = Object.keys(settings)
    .sort()
    .map((k) => [k, settings[k]]);
  hash.update(JSON.stringify(sorted));
  return hash.digest('hex');
}

interface BuildRecord {
  fingerprint: string;
  buildId: string;
}

function readBuildId(root: string, distDir: string): string | null {
  const file = path.join(root, distDir, 'BUILD_ID');
  return existsSync(file) ? readFileSync(file, 'utf8').trim() : null;
}

export interface EnsureBuildOptions {
  root: string;
  env: NodeJS.ProcessEnv;
  /** The settings the build sees; part of the fingerprint. */
  settings: Record<string, string>;
  recordFile: string;
  log: (line: string) => void;
  teardown: Teardown;
  force?: boolean;
}

/** Runs `next build` unless the last build from these inputs is still in place. */
export async function ensureBuild(opts: EnsureBuildOptions): Promise<{ built: boolean; seconds: number }> {
  const started = Date.now();
  const fingerprint = buildFingerprint(opts.root, opts.settings);
  const distDir = opts.settings.NEXT_DIST_DIR ?? '.next';
  if (!opts.force && existsSync(opts.recordFile)) {
    try {
      const record = JSON.parse(readFileSync(opts.recordFile, 'utf8')) as BuildRecord;
      const current = readBuildId(opts.root, distDir);
      if (record.fingerprint === fingerprint && current !== null && record.buildId === current) {
        opts.log('sources unchanged since the last build: skipping next build');
        return { built: false, seconds: (Date.now() - started) / 1000 };
      }
    } catch {
      // An unreadable record only means we build again.
    }
  }
  opts.log('building the app (next build) ...');
  rmSync(opts.recordFile, { force: true });
  const code = await runForeground(process.execPath, [nextBin, 'build'], { cwd: opts.root, env: opts.env }, opts.teardown);
  if (opts.teardown.closed) throw new StartError('stopped while building');
  if (code !== 0) throw new StartError(`next build failed (exit ${code}); the reason is in the build output above.`);
  const buildId = readBuildId(opts.root, distDir);
  if (buildId) writeFileSync(opts.recordFile, JSON.stringify({ fingerprint, buildId } satisfies BuildRecord));
  return { built: true, seconds: (Date.now() - started) / 1000 };
}

export interface AppProcessOptions {
  root: string;
  port: number;
  env: NodeJS.ProcessEnv;
  logDir: string;
  echo: boolean;
}

/*
 * Idle keep-alive connections stay open two minutes (Node's default is 5 s). Clients that pool
 * sockets without reading the server's Keep-Alive hint (Playwright's request context; many load
 * balancers, whose idle timeout is 60 s) otherwise reuse a socket at the moment the server closes
 * it and get ECONNRESET (microsoft/playwright#42698). The server outliving the client's idle time
 * makes the client the side that closes.
 */
const keepAliveMs = 120_000;

export function startNextApp(opts: AppProcessOptions): ServiceProcess {
  const args = [nextBin, 'start', '-H', '127.0.0.1', '-p', String(opts.port), '--keepAliveTimeout', String(keepAliveMs)];
  return spawnService('app', process.execPath, args, {
    cwd: opts.root,
    env: opts.env,
    logFile: path.join(opts.logDir, 'app.log'),
    echo: opts.echo,
  });
}

export const workerScript = 'scripts/worker.ts';
export const serverOnlyPreload = './scripts/services/server-only-preload.mjs';

/** The mail/deadline worker, or null when scripts/worker.ts is not there. */
export function startWorker(opts: Omit<AppProcessOptions, 'port'>): ServiceProcess | null {
  if (!existsSync(path.join(opts.root, workerScript))) return null;
  return spawnService('worker', process.execPath, ['--import', 'tsx', '--import', serverOnlyPreload, workerScript], {
    cwd: opts.root,
    env: opts.env,
    logFile: path.join(opts.logDir, 'worker.log'),
    echo: opts.echo,
  });
}

async function answers(url: string): Promise<number | null> {
  try {
    const res = await fetch(url, { redirect: 'manual', signal: AbortSignal.timeout(5_000) });
    await res.body?.cancel();
    return res.status;
  } catch {
    return null;
  }
}

/**
 * Waits until the app answers HTTP on 127.0.0.1 and on localhost (browsers and Auth.js use the
 * latter). Any status counts as answering; a 5xx on the home page is reported, not hidden.
 */
export async function waitForApp(app: ServiceProcess, port: number, timeoutMs = 90_000): Promise<{ status: number }> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    if (!app.running) {
      throw new StartError(`the app stopped while starting (exit ${app.exitCode}). Last lines of ${app.logFile}:\n${tail(app.logFile)}`);
    }
    const status = await answers(`http://127.0.0.1:${port}/`);
    if (status !== null) break;
    if (Date.now() > deadline) {
      throw new StartError(`the app did not answer on port ${port} within ${timeoutMs / 1000} s. Last lines of ${app.logFile}:\n${tail(app.logFile)}`);
    }
    await sleep(250);
  }
  const status = await answers(`http://localhost:${port}/`);
  if (status === null) {
    throw new StartError(
      `the app answers on http://127.0.0.1:${port} but not on http://localhost:${port}.\n` +
        'Check that /etc/hosts maps localhost to 127.0.0.1.',
    );
  }
  return { status };
}
