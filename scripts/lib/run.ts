import { spawn, spawnSync, type SpawnOptions } from 'node:child_process';

export const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;

export function say(message: string) {
  console.log(`[trimout] ${message}`);
}

/** Runs a command to completion; throws with its output on failure. */
export function runSync(cmd: string, args: string[], options: SpawnOptions & { quiet?: boolean } = {}) {
  const result = spawnSync(cmd, args, {
    encoding: 'utf8',
    stdio: options.quiet === false ? 'inherit' : 'pipe',
    ...options,
  });
  if (result.error) throw result.error;
  if (result.status !== 0) {
    const out = `${result.stdout ?? ''}${result.stderr ?? ''}`.trim();
    throw new Error(`${cmd} ${args.join(' ')} exited with ${result.status}${out ? `:\n${out}` : ''}`);
  }
  return String(result.stdout ?? '');
}

export function tryRun(cmd: string, args: string[], options: SpawnOptions = {}): boolean {
  const result = spawnSync(cmd, args, { stdio: 'ignore', ...options });
  return result.status === 0;
}

/** Runs a command with inherited output; resolves with its exit code. */
export function runInherit(cmd: string, args: string[], options: SpawnOptions = {}): Promise<number> {
  return new Promise((resolve, reject) => {
    const child = spawn(cmd, args, { stdio: 'inherit', ...options });
    child.on('error', reject);
    child.on('exit', (code, signal) => resolve(code ?? (signal ? 1 : 0)));
  });
}

/** Installs Debian packages (as root, or through sudo without a password). */
export function aptInstall(packages: string[]) {
  const sudo = isRoot ? [] : ['sudo', '-n'];
  if (!isRoot && !tryRun('sudo', ['-n', 'true'])) {
    throw new Error(
      `Trimout needs the Debian packages ${packages.join(', ')}. Install them with:\n  sudo apt-get install -y ${packages.join(' ')}`,
    );
  }
  say(`installing ${packages.join(', ')} from Debian (apt-get) ...`);
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  const [cmd, ...pre] = [...sudo, 'apt-get'];
  runSync(cmd!, [...pre, 'update', '-q'], { env, quiet: false });
  runSync(cmd!, [...pre, 'install', '-y', '-q', ...packages], { env, quiet: false });
}
