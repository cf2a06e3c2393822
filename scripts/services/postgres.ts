import { chmodSync, chownSync, existsSync, mkdirSync, readdirSync, appendFileSync, statSync } from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import {
  claimRunning,
  claimStarted,
  hasCommand,
  isRoot,
  portInUse,
  portTakenError,
  releaseClaim,
  run,
} from './shell.ts';

export interface PostgresHandle {
  port: number;
  /** True when this process started the server (and so stops it). */
  startedHere: boolean;
  stop(): void;
}

/** The newest Debian PostgreSQL's binaries, or whatever is on PATH. */
function binDir(): string {
  const base = '/usr/lib/postgresql';
  if (existsSync(base)) {
    const versions = readdirSync(base)
      .filter((v) => existsSync(path.join(base, v, 'bin', 'initdb')))
      .sort((a, b) => Number(b) - Number(a));
    if (versions[0]) return path.join(base, versions[0], 'bin');
  }
  if (hasCommand('initdb')) return '';
  throw new Error(
    'PostgreSQL is not installed. Install it with:\n  sudo apt-get install -y postgresql postgresql-contrib',
  );
}

/** PostgreSQL refuses to run as root: as root, the cluster belongs to the postgres user. */
function prepareOwnership(dataDir: string): void {
  if (!isRoot) return;
  const uid = Number(run('id', ['-u', 'postgres']).trim());
  const gid = Number(run('id', ['-g', 'postgres']).trim());
  chownSync(dataDir, uid, gid);
  // Every parent folder must be enterable by that user.
  for (let dir = path.dirname(dataDir); dir !== path.dirname(dir); dir = path.dirname(dir)) {
    const mode = statSync(dir).mode;
    if ((mode & 0o001) === 0) chmodSync(dir, mode | 0o001);
  }
}

/**
 * Starts (initialising on first use) a private PostgreSQL cluster under `dataDir`, listening on
 * 127.0.0.1:`port`. A cluster already running there is reused and left running.
 */
export async function startPostgres(dataDir: string, port: number): Promise<PostgresHandle> {
  const bin = binDir();
  const tool = (name: string) => (bin ? path.join(bin, name) : name);
  const asUser = isRoot ? 'postgres' : undefined;
  const pgData = path.join(dataDir, 'pg');
  const logFile = path.join(dataDir, 'postgres.log');
  mkdirSync(dataDir, { recursive: true });

  if (!existsSync(path.join(pgData, 'PG_VERSION'))) {
    console.log(`Initialising a PostgreSQL cluster in ${pgData}…`);
    mkdirSync(pgData, { recursive: true, mode: 0o700 });
    prepareOwnership(dataDir);
    prepareOwnership(pgData);
    run(tool('initdb'), ['-D', pgData, '-U', 'postgres', '--auth=trust', '-E', 'UTF8', '--locale=C.UTF-8'], { asUser });
    appendFileSync(
      path.join(pgData, 'postgresql.conf'),
      [
        '',
        '# Waterline: a private cluster on loopback only',
        "listen_addresses = '127.0.0.1'",
        `port = ${port}`,
        `unix_socket_directories = '${pgData}'`,
        'fsync = off',
        'synchronous_commit = off',
        '',
      ].join('\n'),
    );
  } else {
    prepareOwnership(dataDir);
  }

  // A cluster of this checkout left running (after a crash or a forced stop) is reused as it is.
  const running = (() => {
    try {
      run(tool('pg_ctl'), ['-D', pgData, 'status'], { asUser });
      return true;
    } catch {
      return false;
    }
  })();
  const claim = running ? claimRunning(dataDir, 'postgres') : null;
  if (claim === 'adopted')
    console.log(`Found this checkout's PostgreSQL left running on port ${port}: using it, and stopping it at the end.`);
  if (!running) {
    // pg_ctl only says "could not start server" when the port is taken: name the holder instead.
    if (portInUse(port)) throw portTakenError('PostgreSQL', port, 'WATERLINE_PG_PORT');
    if (isRoot) {
      run('touch', [logFile]);
      chownSync(logFile, Number(run('id', ['-u', 'postgres']).trim()), Number(run('id', ['-g', 'postgres']).trim()));
    }
    run(tool('pg_ctl'), ['-D', pgData, '-l', logFile, '-w', '-t', '30', '-o', `-p ${port}`, 'start'], { asUser });
    claimStarted(dataDir, 'postgres');
  }
  const ours = !running || claim === 'adopted';
  return {
    port,
    startedHere: ours,
    stop() {
      if (!ours) return;
      try {
        run(tool('pg_ctl'), ['-D', pgData, '-m', 'fast', '-w', 'stop'], { asUser, ownSession: true });
      } catch (error) {
        console.error(String(error));
      }
      releaseClaim(dataDir, 'postgres');
    },
  };
}

/** Creates the database when it does not exist yet. */
export async function ensureDatabase(port: number, name: string): Promise<void> {
  const client = new pg.Client({ host: '127.0.0.1', port, user: 'postgres', database: 'postgres' });
  await client.connect();
  try {
    const found = await client.query('SELECT 1 FROM pg_database WHERE datname = $1', [name]);
    if (found.rowCount === 0) await client.query(`CREATE DATABASE "${name.replace(/"/g, '')}"`);
  } finally {
    await client.end();
  }
}
