// Levelwire's own PostgreSQL cluster: Debian's binaries, a data folder inside the
// project (or a temp folder when the postgres user cannot reach it), loopback only.
import { execFile, execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { chownSync, existsSync, mkdirSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { ensureDebianPackage } from './apt';

export type Cluster = { url: string; port: number; dataDir: string; stop: () => void; restart: () => Promise<void> };

/** The newest installed PostgreSQL version's bin folder (installs Debian's package when missing). */
export function binDir(): string {
  const base = '/usr/lib/postgresql';
  const find = () =>
    existsSync(base)
      ? readdirSync(base)
          .filter((v) => existsSync(path.join(base, v, 'bin', 'initdb')))
          .sort((a, b) => Number(b) - Number(a))
      : [];
  ensureDebianPackage('postgresql', () => find().length > 0);
  const versions = find();
  if (versions.length === 0) throw new Error('PostgreSQL server binaries not found under /usr/lib/postgresql');
  return path.join(base, versions[0]!, 'bin');
}

const isRoot = process.getuid?.() === 0;

/** The command line for a PostgreSQL program: as the postgres user when this process is root (PostgreSQL refuses root). */
function commandOf(bin: string, args: string[]): [string, string[]] {
  return isRoot ? ['runuser', ['-u', 'postgres', '--', bin, ...args]] : [bin, args];
}

function run(bin: string, args: string[], opts: { quiet?: boolean } = {}): string {
  const [cmd, full] = commandOf(bin, args);
  return execFileSync(cmd, full, { encoding: 'utf8', stdio: opts.quiet ? 'pipe' : ['ignore', 'pipe', 'inherit'] });
}

/** True when the postgres user can enter every folder on the way to dir. */
function reachableByPostgres(dir: string): boolean {
  if (!isRoot) return true;
  try {
    execFileSync('runuser', ['-u', 'postgres', '--', 'test', '-x', dir], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
}

/** Chooses the data folder: `<project>/.data/<name>` when reachable, else a temp folder keyed by the project path. */
function placeFor(name: string): string {
  const local = path.resolve('.data');
  mkdirSync(local, { recursive: true });
  if (reachableByPostgres(local)) return path.join(local, name);
  const key = createHash('sha256').update(local).digest('hex').slice(0, 10);
  return path.join(tmpdir(), `levelwire-${key}`, name);
}

function own(dir: string): void {
  mkdirSync(dir, { recursive: true, mode: 0o700 });
  if (isRoot) {
    const uid = Number(execFileSync('id', ['-u', 'postgres'], { encoding: 'utf8' }).trim());
    const gid = Number(execFileSync('id', ['-g', 'postgres'], { encoding: 'utf8' }).trim());
    chownSync(dir, uid, gid);
  }
}

async function ensureDatabase(port: number, database: string): Promise<void> {
  const admin = new pg.Client({ host: '127.0.0.1', port, user: 'postgres', database: 'postgres' });
  await admin.connect();
  try {
    const found = await admin.query('select 1 from pg_database where datname = $1', [database]);
    if (found.rowCount === 0) await admin.query(`create database "${database.replace(/"/g, '')}"`);
  } finally {
    await admin.end();
  }
}

/**
 * Starts (initialising when new) a cluster named `name` on 127.0.0.1:port and makes `database`.
 * `fresh` wipes the data folder first: the test runs use a throwaway cluster.
 */
export async function startCluster(opts: { name: string; port: number; database: string; fresh?: boolean }): Promise<Cluster> {
  const bin = binDir();
  const dataDir = placeFor(opts.name);
  const sockDir = path.join(path.dirname(dataDir), `${opts.name}-run`);
  const pgctl = path.join(bin, 'pg_ctl');
  const stop = () => {
    try {
      run(pgctl, ['-D', dataDir, '-m', 'fast', '-w', 'stop'], { quiet: true });
    } catch {
      /* already stopped */
    }
  };
  if (opts.fresh && existsSync(dataDir)) {
    stop();
    rmSync(dataDir, { recursive: true, force: true });
  }
  own(path.dirname(dataDir));
  own(sockDir);
  if (!existsSync(path.join(dataDir, 'PG_VERSION'))) {
    own(dataDir);
    run(path.join(bin, 'initdb'), ['-D', dataDir, '-U', 'postgres', '--auth=trust', '-E', 'UTF8', '--locale=C.UTF-8'], { quiet: true });
  }
  let running = false;
  try {
    run(pgctl, ['-D', dataDir, 'status'], { quiet: true });
    running = true;
  } catch {
    running = false;
  }
  if (!running) {
    const o = `-p ${opts.port} -c listen_addresses=127.0.0.1 -k ${sockDir} -c fsync=${opts.fresh ? 'off' : 'on'}`;
    run(pgctl, ['-D', dataDir, '-l', path.join(path.dirname(dataDir), `${opts.name}.log`), '-w', '-t', '60', '-o', o, 'start'], { quiet: true });
  }
  await ensureDatabase(opts.port, opts.database);
  /** A fast restart with the options it was started with, without blocking this process (the fault suite's clients keep sending meanwhile). */
  const restart = () =>
    new Promise<void>((resolve, reject) => {
      const [cmd, full] = commandOf(pgctl, ['-D', dataDir, '-l', path.join(path.dirname(dataDir), `${opts.name}.log`), '-m', 'fast', '-w', '-t', '60', 'restart']);
      execFile(cmd, full, (err) => (err ? reject(err) : resolve()));
    });
  return { url: `postgres://postgres@127.0.0.1:${opts.port}/${opts.database}`, port: opts.port, dataDir, stop, restart };
}
