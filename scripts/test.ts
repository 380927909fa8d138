// `npm test`: a throwaway PostgreSQL, a production build served on :3100, then every test layer.
// Ends with one plain line, `N passed, N failed`, totalled over the layers (CI reads that line).
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs';
import path from 'node:path';
import { createDb } from '../db/client';
import { seedDemo } from '../db/seed';
import { ensureChromium } from './apt';
import { startFakes, type Fakes } from './fakes';
import { buildIfStale, log, prepareDatabase, waitForHealth } from './setup';

type Tally = { layer: string; passed: number; failed: number; skipped: number };
const only = process.argv.includes('--only') ? process.argv[process.argv.indexOf('--only') + 1] : undefined;
const wants = (layer: string) => !only || only === layer;
const PORT = 3100;
const APP_URL = `http://127.0.0.1:${PORT}`;
const SECRET = 'levelwire-test-secret-0123456789abcdef';
const tallies: Tally[] = [];
const reports = '.data/test-reports';
rmSync(reports, { recursive: true, force: true });
mkdirSync(reports, { recursive: true });

function readJson<T>(file: string): T | null {
  try {
    return JSON.parse(readFileSync(file, 'utf8')) as T;
  } catch {
    return null;
  }
}

/**
 * Runs a command to its end without blocking this process: the mail and object-store fakes live in this
 * process's event loop and must keep answering while the tests run.
 */
function run(cmd: string, args: string[], env: Record<string, string>): Promise<{ status: number | null }> {
  return new Promise((resolve) => {
    const child = spawn(cmd, args, { stdio: 'inherit', env: { ...process.env, ...env } });
    child.on('exit', (status) => resolve({ status }));
  });
}

/** Runs vitest for one project; counts from its JSON report (a crash without a report counts as one failure). */
async function runVitest(project: string, env: Record<string, string>): Promise<void> {
  const out = `${reports}/${project}.json`;
  const res = await run('npx', ['vitest', 'run', '--project', project, '--reporter=default', '--reporter=json', `--outputFile.json=${out}`], env);
  const r = readJson<{ numPassedTests: number; numFailedTests: number; numPendingTests: number; numTodoTests: number }>(out);
  if (!r) tallies.push({ layer: project, passed: 0, failed: 1, skipped: 0 });
  else {
    const crashed = res.status !== 0 && r.numFailedTests === 0 ? 1 : 0;
    tallies.push({ layer: project, passed: r.numPassedTests, failed: r.numFailedTests + crashed, skipped: r.numPendingTests + r.numTodoTests });
  }
}

async function runPlaywright(env: Record<string, string>): Promise<void> {
  const out = `${reports}/e2e.json`;
  const res = await run('npx', ['playwright', 'test', '--config', 'tests/e2e/playwright.config.ts'], { ...env, PLAYWRIGHT_JSON_OUTPUT_NAME: path.resolve(out) });
  const r = readJson<{ stats: { expected: number; unexpected: number; flaky: number; skipped: number } }>(out);
  if (!r) tallies.push({ layer: 'e2e', passed: 0, failed: 1, skipped: 0 });
  else {
    const crashed = res.status !== 0 && r.stats.unexpected === 0 ? 1 : 0;
    tallies.push({ layer: 'e2e', passed: r.stats.expected + r.stats.flaky, failed: r.stats.unexpected + crashed, skipped: r.stats.skipped });
  }
}

/** `scripts/faults.ts --short`: each fault scenario counts as one test. */
async function runFaults(): Promise<void> {
  const out = `${reports}/faults.json`;
  const res = await run('npx', ['tsx', 'scripts/faults.ts', '--short', `--json=${out}`], {});
  const r = readJson<{ passed: number; failed: number }>(out);
  if (!r) tallies.push({ layer: 'faults', passed: 0, failed: 1, skipped: 0 });
  else tallies.push({ layer: 'faults', passed: r.passed, failed: r.failed + (res.status !== 0 && r.failed === 0 ? 1 : 0), skipped: 0 });
}

/** `scripts/budgets.ts` against the production build: each budget checked counts as one test. */
async function runBudgets(): Promise<void> {
  const out = `${reports}/budgets.json`;
  const res = await run('npx', ['tsx', 'scripts/budgets.ts', `--json=${out}`], {});
  const r = readJson<{ passed: number; failed: number }>(out);
  if (!r) tallies.push({ layer: 'budgets', passed: 0, failed: 1, skipped: 0 });
  else tallies.push({ layer: 'budgets', passed: r.passed, failed: r.failed + (res.status !== 0 && r.failed === 0 ? 1 : 0), skipped: 0 });
}

// Interrupted (Ctrl-C, CI's end): stop what this run started before leaving.
for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.once(signal, () => {
    server?.kill('SIGKILL');
    cluster?.stop();
    process.exit(130);
  });
}

const t0 = performance.now();
let server: ChildProcess | undefined;
let cluster: Awaited<ReturnType<typeof prepareDatabase>> | undefined;
let fakes: Fakes | undefined;
let setupFailed = false;
try {
  if (wants('unit')) await runVitest('unit', {});
  if (only === 'budgets') {
    buildIfStale();
    await runBudgets();
  }
  if (wants('integration') || wants('e2e')) {
    cluster = await prepareDatabase({ name: 'pg-test', port: 54339, database: 'levelwire_test', fresh: true });
    const db = createDb(cluster.url, 2);
    await seedDemo(db);
    await db.$client.end();
    buildIfStale();
    if (wants('budgets')) await runBudgets();
    rmSync('.data/test-fakes', { recursive: true, force: true });
    fakes = await startFakes('.data/test-fakes');
    const chromium = wants('e2e') ? ensureChromium() : '';
    server = spawn(process.execPath, ['dist/server.js'], {
      stdio: ['ignore', 'inherit', 'inherit'],
      env: { ...process.env, ...fakes.env, NODE_ENV: 'production', NEXT_TELEMETRY_DISABLED: '1', REMINDER_INTERVAL_MINUTES: '0', DATABASE_URL: cluster.url, PORT: String(PORT), HOST: '127.0.0.1', NEXTAUTH_URL: APP_URL, NEXTAUTH_SECRET: SECRET },
    });
    await waitForHealth(APP_URL, server);
    const env = { ...fakes.env, DATABASE_URL: cluster.url, APP_URL, NEXTAUTH_SECRET: SECRET, CHROMIUM_PATH: chromium };
    if (wants('integration')) await runVitest('integration', env);
    if (wants('e2e') && existsSync('tests/e2e/playwright.config.ts')) await runPlaywright(env);
  }
  // The fault suite's short form: its own PostgreSQL and server processes (killed and restarted on purpose).
  if (wants('faults')) await runFaults();
} catch (e) {
  setupFailed = true;
  console.error('[levelwire] test set-up failed:', e instanceof Error ? e.message : e);
} finally {
  if (server && server.exitCode === null) {
    server.kill('SIGTERM');
    await new Promise((r) => server!.once('exit', r));
  }
  await fakes?.stop();
  cluster?.stop();
}

const total = tallies.reduce((a, t) => ({ passed: a.passed + t.passed, failed: a.failed + t.failed, skipped: a.skipped + t.skipped }), { passed: 0, failed: setupFailed ? 1 : 0, skipped: 0 });
for (const t of tallies) log(`${t.layer.padEnd(12)} ${t.passed} passed, ${t.failed} failed${t.skipped ? `, ${t.skipped} skipped` : ''}`);
log(`all layers in ${Math.round((performance.now() - t0) / 1000)} s`);
console.log(`${total.passed} passed, ${total.failed} failed${total.skipped ? `, ${total.skipped} skipped` : ''}`);
process.exit(total.failed > 0 || tallies.length === 0 ? 1 : 0);
