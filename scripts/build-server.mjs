#!/usr/bin/env node
// The production build of the server side (`npm run build` runs it after the client's): the server,
// the workers, the shared code, the migrations and the migrate script compiled by tsc into
// dist-server/, which plain `node` runs. It is built afresh in a folder beside it, so a renamed or
// removed source (a migration above all) leaves no compiled copy behind, and then put in place by
// renaming, so processes already running from dist-server/ are not left half without files. A type error fails the build (tsc still
// writes the files); `--allow-type-errors` keeps them, for the test stack, whose type check is a
// step of its own.
import { spawnSync } from 'node:child_process';
import { existsSync, renameSync, rmSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const target = path.join(root, 'dist-server');
const fresh = `${target}.building-${process.pid}`;
const tsc = path.join(root, 'node_modules', 'typescript', 'bin', 'tsc');
const result = spawnSync(
  process.execPath,
  [tsc, '-p', path.join(root, 'tsconfig.server.build.json'), '--outDir', fresh],
  { cwd: root, stdio: 'inherit' },
);
if (result.status === 0 || (result.status === 2 && process.argv.includes('--allow-type-errors'))) {
  const old = `${target}.old-${process.pid}`;
  if (existsSync(target)) renameSync(target, old);
  renameSync(fresh, target);
  rmSync(old, { recursive: true, force: true });
} else {
  rmSync(fresh, { recursive: true, force: true });
}
// tsc exits 2 when it found errors but wrote the files, 1 when it wrote nothing.
if (result.status === 2 && process.argv.includes('--allow-type-errors')) {
  console.error('The server build has type errors (above); it was put in place anyway (--allow-type-errors).');
  process.exit(0);
}
if (result.status !== 0)
  console.error('The server build failed (tsc -p tsconfig.server.build.json); dist-server/ is unchanged.');
process.exit(result.status ?? 1);
