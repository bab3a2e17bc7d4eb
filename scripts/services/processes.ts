import { spawn, type ChildProcess } from 'node:child_process';
import { createWriteStream, mkdirSync, readFileSync, type WriteStream } from 'node:fs';
import path from 'node:path';
import { createInterface } from 'node:readline';
import { pidAlive, sleep } from './util';

/*
 * Child processes for the local stacks, and the teardown that stops everything in reverse order.
 * Long-running children (app, worker) get their own process group, so stopping one also stops
 * anything it spawned, and a Ctrl-C in the terminal reaches only the script, which then shuts
 * things down in order.
 */

export interface ServiceProcess {
  name: string;
  pid: number;
  logFile: string;
  /** Exit code, or null while running (or when killed by a signal). */
  readonly exitCode: number | null;
  readonly running: boolean;
  exited: Promise<number | null>;
  stop(): Promise<void>;
}

export interface ServiceProcessOptions {
  cwd: string;
  env: NodeJS.ProcessEnv;
  logFile: string;
  /** Echo output to the terminal, each line prefixed with `[name]`. */
  echo: boolean;
}

export function spawnService(name: string, command: string, args: string[], opts: ServiceProcessOptions): ServiceProcess {
  mkdirSync(path.dirname(opts.logFile), { recursive: true });
  const logStream: WriteStream = createWriteStream(opts.logFile, { flags: 'a' });
  logStream.write(`\n--- ${new Date().toISOString()} ${command} ${args.join(' ')}\n`);
  const child: ChildProcess = spawn(command, args, {
    cwd: opts.cwd,
    env: opts.env,
    detached: true,
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let running = true;
  let exitCode: number | null = null;
  const exited = new Promise<number | null>((resolve) => {
    child.once('exit', (code) => {
      running = false;
      exitCode = code;
      resolve(code);
    });
    child.once('error', (err) => {
      logStream.write(`could not start: ${err.message}\n`);
      running = false;
      exitCode = -1;
      resolve(-1);
    });
  });
  for (const stream of [child.stdout, child.stderr]) {
    if (!stream) continue;
    createInterface({ input: stream }).on('line', (line) => {
      logStream.write(line + '\n');
      if (opts.echo) process.stdout.write(`[${name}] ${line}\n`);
    });
  }

  let stopping: Promise<void> | null = null;
  const stop = () => {
    stopping ??= (async () => {
      const pid = child.pid;
      if (pid !== undefined && running) {
        signalGroup(pid, 'SIGTERM');
        const until = Date.now() + 10_000;
        while (running && Date.now() < until) await sleep(50);
        if (running || pidAlive(pid)) signalGroup(pid, 'SIGKILL');
        await Promise.race([exited, sleep(2_000)]);
      }
      await new Promise<void>((r) => logStream.end(() => r()));
    })();
    return stopping;
  };

  return {
    name,
    pid: child.pid ?? -1,
    logFile: opts.logFile,
    get exitCode() {
      return exitCode;
    },
    get running() {
      return running;
    },
    exited,
    stop,
  };
}

function signalGroup(pid: number, signal: NodeJS.Signals) {
  try {
    process.kill(-pid, signal);
  } catch {
    try {
      process.kill(pid, signal);
    } catch {
      // already gone
    }
  }
}

/**
 * Runs a command in the foreground with the terminal attached (next build, vitest) and resolves
 * with its exit code. It stays in our process group, so Ctrl-C reaches it directly.
 */
export function runForeground(
  command: string,
  args: string[],
  opts: { cwd: string; env: NodeJS.ProcessEnv },
  teardown: Teardown,
): Promise<number> {
  return new Promise((resolve) => {
    const child = spawn(command, args, { cwd: opts.cwd, env: opts.env, stdio: 'inherit' });
    const forget = teardown.add(`${path.basename(command)} ${args[0] ?? ''}`.trim(), async () => {
      if (child.exitCode === null && child.signalCode === null) {
        child.kill('SIGTERM');
        await Promise.race([new Promise((r) => child.once('exit', r)), sleep(10_000)]);
        if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
      }
    }, { quiet: true });
    child.once('error', () => {
      forget();
      resolve(127);
    });
    child.once('exit', (code, signal) => {
      forget();
      resolve(code ?? (signal ? 128 : 1));
    });
  });
}

interface TeardownStep {
  name: string;
  run: () => Promise<void>;
  quiet: boolean;
}

/** Things to stop, in reverse order of starting. Adding after teardown began stops the thing at once. */
export class Teardown {
  private steps: TeardownStep[] = [];
  private late: Promise<void>[] = [];
  private closing: Promise<void> | null = null;

  constructor(private readonly log: (line: string) => void) {}

  get closed(): boolean {
    return this.closing !== null;
  }

  /** Returns a function that removes the step (for things that ended on their own). */
  add(name: string, run: () => Promise<void>, opts: { quiet?: boolean } = {}): () => void {
    const step: TeardownStep = { name, run, quiet: opts.quiet ?? false };
    if (this.closing) {
      this.late.push(this.closing.then(() => this.runStep(step)));
      return () => {};
    }
    this.steps.push(step);
    return () => {
      this.steps = this.steps.filter((s) => s !== step);
    };
  }

  async stopAll(): Promise<void> {
    this.closing ??= (async () => {
      const steps = this.steps.reverse();
      this.steps = [];
      for (const step of steps) await this.runStep(step);
    })();
    await this.closing;
    await Promise.all(this.late);
  }

  private async runStep(step: TeardownStep) {
    try {
      await step.run();
      if (!step.quiet) this.log(`stopped ${step.name}`);
    } catch (err) {
      this.log(`could not stop ${step.name}: ${err instanceof Error ? err.message : String(err)}`);
    }
  }
}

function parentOf(pid: number): number | null {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    const ppid = Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]);
    return Number.isInteger(ppid) ? ppid : null;
  } catch {
    return null;
  }
}

/**
 * Calls `onGone` when one of our nearest ancestors (tsx, the npm shell, npm) exits. A signal sent
 * to npm alone reaches its `sh -c`, which does not pass it on, so without this watch the stack
 * would outlive the command that started it.
 */
export function watchAncestors(levels: number, onGone: () => void): void {
  const chain: number[] = [];
  let pid: number | null = process.ppid;
  while (chain.length < levels && pid !== null && pid > 1) {
    chain.push(pid);
    pid = parentOf(pid);
  }
  const timer = setInterval(() => {
    if (chain.some((p) => !pidAlive(p))) {
      clearInterval(timer);
      onGone();
    }
  }, 1_000);
  timer.unref();
}
