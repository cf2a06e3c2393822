import { hasCommand, isRoot, run } from './shell.ts';

/** Debian packages the stack needs, by the command each provides. */
const PACKAGES: Record<string, string> = {
  'redis-server': 'redis-server',
  chromium: 'chromium',
};

/**
 * Installs missing Debian packages when running as root; otherwise says what to install and stops.
 * PostgreSQL itself is expected (the Debian postgresql package), and only reported when missing.
 */
export function ensureDebianPackages(commands: string[]): void {
  const missing = commands.filter((c) => !hasCommand(c)).map((c) => PACKAGES[c] ?? c);
  if (missing.length === 0) return;
  if (!isRoot) {
    throw new Error(
      `Missing Debian packages: ${missing.join(', ')}. Install them with:\n  sudo apt-get install -y ${missing.join(' ')}`,
    );
  }
  console.log(`Installing Debian packages: ${missing.join(', ')}…`);
  run('apt-get', ['update', '-qq']);
  run('apt-get', ['install', '-y', '-qq', ...missing], { env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } });
}
