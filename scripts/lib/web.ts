/**
 * Builds the web app (`expo export --platform web`) into dist/ when its sources changed since
 * the last build, then adds the manifest, icons and service worker (scripts/lib/pwa.ts): a hash
 * of the client's sources and of those steps' inputs is kept in dist/.build-hash.
 */
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { precompress } from './precompress';
import { addOfflineShell, PWA_SOURCES } from './pwa';
import { runInherit, say } from './run';

const root = path.resolve(__dirname, '..', '..');
const SOURCES = [
  'app',
  'components',
  'shared',
  'assets',
  'app.json',
  'babel.config.js',
  'metro.config.js',
  'package-lock.json',
  'scripts/lib/precompress.ts',
  ...PWA_SOURCES,
];

function* files(target: string): Generator<string> {
  if (!fs.existsSync(target)) return;
  const stat = fs.statSync(target);
  if (stat.isFile()) {
    yield target;
    return;
  }
  for (const entry of fs.readdirSync(target).sort()) yield* files(path.join(target, entry));
}

export function sourceHash(): string {
  const hash = createHash('sha256');
  for (const source of SOURCES) {
    for (const file of files(path.join(root, source))) {
      hash.update(path.relative(root, file));
      hash.update(fs.readFileSync(file));
    }
  }
  return hash.digest('hex');
}

export async function buildWebIfStale(distDir = path.join(root, 'dist')): Promise<void> {
  const stampFile = path.join(distDir, '.build-hash');
  const hash = sourceHash();
  if (fs.existsSync(path.join(distDir, 'index.html')) && fs.existsSync(stampFile)) {
    if (fs.readFileSync(stampFile, 'utf8').trim() === hash) {
      say('web app is up to date.');
      return;
    }
  }
  say('building the web app (expo export --platform web) ...');
  const started = Date.now();
  const code = await runInherit(
    path.join(root, 'node_modules', '.bin', 'expo'),
    ['export', '--platform', 'web', '--output-dir', path.relative(root, distDir)],
    { cwd: root, env: { ...process.env, CI: '1', EXPO_NO_TELEMETRY: '1', NODE_ENV: 'production' } },
  );
  if (code !== 0) throw new Error(`expo export failed with exit code ${code}.`);
  const shell = await addOfflineShell(distDir);
  say(`service worker precaches ${shell.count} files (${Math.round(shell.size / 1024)} KB).`);
  say(`${await precompress(distDir)} files compressed ahead (brotli 11, gzip 9).`);
  fs.writeFileSync(stampFile, hash + '\n');
  say(`web app built in ${Math.round((Date.now() - started) / 1000)} s.`);
}
