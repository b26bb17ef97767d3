#!/usr/bin/env node
// First step of `npm start` and `npm test`: install npm packages when they are missing or when
// package-lock.json changed since the last install. Plain Node, no dependencies: it runs before
// anything is installed.
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const lock = join(root, 'package-lock.json');
const stamp = join(root, 'node_modules', '.trimout-lock-hash');

const [major, minor] = process.versions.node.split('.').map(Number);
if (major < 20 || (major === 20 && minor < 19)) {
  console.error(`Trimout needs Node.js 20.19 or newer; this is ${process.versions.node}.`);
  process.exit(1);
}

const hash = existsSync(lock) ? createHash('sha256').update(readFileSync(lock)).digest('hex') : 'no-lock';
const installed = existsSync(stamp) ? readFileSync(stamp, 'utf8').trim() : '';
if (installed !== hash) {
  const args = existsSync(lock) ? ['ci', '--no-audit', '--no-fund'] : ['install', '--no-audit', '--no-fund'];
  console.log(`[trimout] installing npm packages (npm ${args[0]}) ...`);
  const result = spawnSync('npm', args, { cwd: root, stdio: 'inherit' });
  if (result.status !== 0) {
    console.error('[trimout] npm could not install the packages; see the messages above.');
    process.exit(result.status ?? 1);
  }
  writeFileSync(stamp, hash + '\n');
}
