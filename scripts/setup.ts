// Shared steps of `npm start`, `npm run dev` and `npm test`: database up and migrated, build when stale.
import { execSync, type ChildProcess } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { migrateDatabase } from '../db/migrate';
import { startCluster, type Cluster } from './postgres';

export const log = (msg: string) => console.log(`[levelwire] ${msg}`);

/** Starts the cluster (fresh for tests) and applies the migrations. */
export async function prepareDatabase(opts: { name: string; port: number; database: string; fresh?: boolean }): Promise<Cluster> {
  const t0 = performance.now();
  const cluster = await startCluster(opts);
  await migrateDatabase(cluster.url);
  log(`PostgreSQL ready on 127.0.0.1:${cluster.port} (${opts.database}), migrated in ${Math.round(performance.now() - t0)} ms`);
  return cluster;
}

const BUILD_INPUTS = ['app', 'components', 'lib', 'db', 'types', 'server.ts', 'next.config.mjs', 'postcss.config.mjs', 'tsconfig.json', 'package-lock.json', 'proxy.ts'];

function hashInputs(): string {
  const h = createHash('sha256');
  const walk = (p: string) => {
    if (!existsSync(p)) return;
    if (statSync(p).isDirectory()) {
      for (const name of readdirSync(p).sort()) walk(path.join(p, name));
    } else {
      h.update(p).update(readFileSync(p));
    }
  };
  BUILD_INPUTS.forEach(walk);
  return h.digest('hex');
}

/** Runs `next build` and bundles server.ts unless the last build came from the same sources. */
export function buildIfStale(): void {
  const stamp = '.next/levelwire-build-hash';
  const want = hashInputs();
  const fresh = existsSync('.next/BUILD_ID') && existsSync('dist/server.js') && existsSync(stamp) && readFileSync(stamp, 'utf8') === want;
  if (fresh) {
    log('build is up to date');
    return;
  }
  log('building (next build + server bundle) ...');
  const t0 = performance.now();
  execSync('npm run build', { stdio: 'inherit', env: { ...process.env, NEXT_TELEMETRY_DISABLED: '1' } });
  writeFileSync(stamp, want);
  log(`built in ${Math.round((performance.now() - t0) / 1000)} s`);
}

/** A random next-auth secret kept in .data, so sign-ins survive a restart of `npm start`. */
export function localSecret(): string {
  const file = '.data/nextauth-secret';
  mkdirSync('.data', { recursive: true });
  if (!existsSync(file)) writeFileSync(file, randomBytes(32).toString('hex'), { mode: 0o600 });
  return readFileSync(file, 'utf8').trim();
}

/** Waits until the server answers /api/health, failing early if it exits. */
export async function waitForHealth(baseUrl: string, server: ChildProcess, timeoutMs = 60_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (server.exitCode !== null) throw new Error(`the server exited with code ${server.exitCode}`);
    try {
      if ((await fetch(`${baseUrl}/api/health`)).ok) return;
    } catch {
      /* not listening yet */
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`the server did not answer ${baseUrl}/api/health within ${timeoutMs / 1000} s`);
}
