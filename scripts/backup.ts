// `npm run db:backup -- [file]` and `npm run db:restore -- <file> [--into=<database>]`: the whole database with
// Debian's pg_dump (custom format) and pg_restore. A restore goes into a new database on the same cluster and never
// over an existing one, so nothing is lost by restoring the wrong file. DATABASE_URL names the source (backup) or the
// cluster (restore); default: the development cluster.
import { execFile } from 'node:child_process';
import { mkdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import pg from 'pg';
import { binDir } from './postgres';

const run = promisify(execFile);
const DEFAULT_URL = 'postgres://postgres@127.0.0.1:54329/levelwire';

/** Dumps the database at `url` into `file` (pg_dump custom format: compressed, restorable table by table). */
export async function backupDatabase(url: string, file: string): Promise<{ file: string; bytes: number }> {
  mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  await run(path.join(binDir(), 'pg_dump'), ['--format=custom', '--no-owner', `--file=${file}`, `--dbname=${url}`]);
  return { file, bytes: statSync(file).size };
}

/** The URL of another database on the same cluster. */
export function databaseUrl(url: string, database: string): string {
  const u = new URL(url);
  u.pathname = `/${database}`;
  return u.toString();
}

/**
 * Restores `file` into a new database `database` on the cluster of `url`: refused when that database exists already.
 * pg_restore stops at the first error (--exit-on-error, one transaction), so a failed restore leaves an empty database.
 */
export async function restoreDatabase(file: string, url: string, database: string): Promise<{ url: string }> {
  if (!/^[a-z_][a-z0-9_]{0,62}$/.test(database)) throw new Error(`--into: "${database}" is not a plain database name (lowercase letters, digits, _)`);
  statSync(file);
  const admin = new pg.Client({ connectionString: databaseUrl(url, 'postgres') });
  await admin.connect();
  try {
    const { rowCount } = await admin.query('select 1 from pg_database where datname = $1', [database]);
    if (rowCount) throw new Error(`--into: database "${database}" exists already; restore into a new one`);
    await admin.query(`create database "${database}"`);
  } finally {
    await admin.end();
  }
  const target = databaseUrl(url, database);
  await run(path.join(binDir(), 'pg_restore'), ['--no-owner', '--exit-on-error', '--single-transaction', `--dbname=${target}`, file]);
  return { url: target };
}

if (process.argv[1] && fileURLToPath(import.meta.url) === path.resolve(process.argv[1])) {
  const [command, ...args] = process.argv.slice(2);
  const url = process.env.DATABASE_URL ?? DEFAULT_URL;
  const stamp = new Date().toISOString().replace(/[:.]/g, '-');
  if (command === 'backup') {
    const file = args.find((a) => !a.startsWith('--')) ?? `.data/backups/levelwire-${stamp}.dump`;
    const done = await backupDatabase(url, file);
    console.log(`[levelwire] backed up to ${done.file} (${(done.bytes / 1024).toFixed(0)} KiB)`);
  } else if (command === 'restore') {
    const file = args.find((a) => !a.startsWith('--'));
    if (!file) throw new Error('restore: name the backup file: npm run db:restore -- <file> [--into=<database>]');
    const into = args.find((a) => a.startsWith('--into='))?.slice('--into='.length) ?? `levelwire_restored_${stamp.slice(0, 19).replace(/-/g, '_').toLowerCase()}`;
    const done = await restoreDatabase(file, url, into);
    console.log(`[levelwire] restored into ${done.url}`);
  } else {
    throw new Error('usage: tsx scripts/backup.ts backup [file] | restore <file> [--into=<database>]');
  }
}
