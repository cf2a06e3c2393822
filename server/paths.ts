import { existsSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/**
 * The checkout's root: the nearest folder up from this file that holds package.json. The same
 * whether this file runs from source (`server/`) or compiled (`dist-server/server/`), so the built
 * client (`dist/`) is found either way.
 */
function findRoot(from: string): string {
  for (let dir = from; ; dir = path.dirname(dir)) {
    if (existsSync(path.join(dir, 'package.json'))) return dir;
    if (path.dirname(dir) === dir) throw new Error(`no package.json above ${from}`);
  }
}

export const projectRoot = findRoot(path.dirname(fileURLToPath(import.meta.url)));

/**
 * The font files of Work Sans (SIL Open Font License, the package @fontsource/work-sans): the
 * handover pack embeds them, and the server's own pages (answer links, invitations) load them from
 * /fonts, as the app does from its bundle.
 */
export const workSansFiles = path.join(
  path.dirname(createRequire(import.meta.url).resolve('@fontsource/work-sans/LICENSE')),
  'files',
);
