#!/usr/bin/env node
// Runs before any dependency is installed, so it is plain JavaScript with Node's own modules only:
// install npm packages when missing or stale, then hand over to the TypeScript stack runner.
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, statSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import path from 'node:path';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const mode = process.argv[2] ?? 'start';

const [major, minor] = process.versions.node.split('.').map(Number);
if (major < 20 || (major === 20 && minor < 19)) {
  console.error(`Waterline needs Node.js 20.19 or newer; this is ${process.versions.node}.`);
  process.exit(1);
}

const lock = path.join(root, 'package-lock.json');
const installed = path.join(root, 'node_modules', '.package-lock.json');
const stale = !existsSync(installed) || (existsSync(lock) && statSync(lock).mtimeMs > statSync(installed).mtimeMs);
if (stale) {
  console.log('Installing npm dependencies (first run)…');
  const result = spawnSync('npm', [existsSync(lock) ? 'ci' : 'install', '--no-audit', '--no-fund'], {
    cwd: root,
    stdio: 'inherit',
  });
  if (result.status !== 0) process.exit(result.status ?? 1);
}

// Node with tsx's loader, not the tsx command: that command's signal relay kills its child outright
// when a second signal arrives quickly, which would skip stopping PostgreSQL and Redis.
const child = spawn(
  process.execPath,
  ['--import', 'tsx', path.join(root, 'scripts', 'stack.ts'), mode, ...process.argv.slice(3)],
  {
    cwd: root,
    stdio: 'inherit',
  },
);
// The stack runner stops its services on SIGINT/SIGTERM itself; pass the signal on and wait for it.
for (const signal of ['SIGINT', 'SIGTERM']) process.on(signal, () => child.kill(signal));
child.on('exit', (code, signal) => process.exit(code ?? (signal ? 1 : 0)));
