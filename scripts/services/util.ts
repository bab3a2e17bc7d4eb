import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import net from 'node:net';

/* Small helpers shared by the local service starters. */

export class StartError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'StartError';
  }
}

export function isRoot(): boolean {
  return typeof process.getuid === 'function' && process.getuid() === 0;
}

export function commandExists(cmd: string): boolean {
  return spawnSync('sh', ['-c', `command -v ${cmd}`], { stdio: 'ignore' }).status === 0;
}

/** Installs Debian packages when a command is missing; explains what to do when not root. */
export function ensureDebianPackage(command: string, pkg: string, log: (line: string) => void): void {
  if (commandExists(command)) return;
  if (!isRoot()) {
    throw new StartError(
      `${command} is not installed and this user cannot install it. Run as root, or install it first:\n` +
        `  sudo apt-get update && sudo apt-get install -y ${pkg}`,
    );
  }
  log(`installing ${pkg} from Debian (apt-get) ...`);
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit', env });
  execFileSync('apt-get', ['install', '-y', '-qq', pkg], { stdio: 'inherit', env });
  if (!commandExists(command)) throw new StartError(`${pkg} was installed but ${command} is still not on PATH`);
}

export function portInUse(port: number, host = '127.0.0.1'): Promise<boolean> {
  return new Promise((resolve) => {
    const server = net.createServer();
    server.once('error', () => resolve(true));
    server.once('listening', () => server.close(() => resolve(false)));
    server.listen(port, host);
  });
}

export async function assertPortFree(port: number, what: string, envVar: string): Promise<void> {
  if (await portInUse(port)) {
    throw new StartError(
      `port ${port} on 127.0.0.1 is already in use, so ${what} cannot start there.\n` +
        `Stop whatever holds it (ss -ltnp 'sport = :${port}') or choose another port with ${envVar}=<port>.`,
    );
  }
}

export function tail(file: string, lines = 25): string {
  if (!existsSync(file)) return '(no log written)';
  return readFileSync(file, 'utf8').trimEnd().split('\n').slice(-lines).join('\n');
}

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

export function pidAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

/**
 * Installs every missing package with one `apt-get update` and one `apt-get install`, so a fresh
 * machine pays for the package index once. Each entry is a command to look for and the package
 * that provides it.
 */
export function ensureDebianPackages(
  wanted: readonly { command: string; pkg: string }[],
  log: (line: string) => void,
): void {
  const missing = wanted.filter((w) => !commandExists(w.command));
  if (missing.length === 0) return;
  const pkgs = [...new Set(missing.map((m) => m.pkg))];
  if (!isRoot()) {
    throw new StartError(
      `${missing.map((m) => m.command).join(', ')} not installed and this user cannot install packages. ` +
        `Run as root, or install them first:\n  sudo apt-get update && sudo apt-get install -y ${pkgs.join(' ')}`,
    );
  }
  log(`installing ${pkgs.join(', ')} from Debian (apt-get) ...`);
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit', env });
  execFileSync('apt-get', ['install', '-y', '-qq', '--no-install-recommends', ...pkgs], { stdio: 'inherit', env });
  const still = missing.filter((m) => !commandExists(m.command));
  if (still.length) {
    throw new StartError(`installed ${pkgs.join(', ')} but ${still.map((m) => m.command).join(', ')} is still not on PATH`);
  }
}
