// `npm start`: PostgreSQL, migrations, demo data, build, and the production server on :3000.
import { spawn } from 'node:child_process';
import { createDb } from '../db/client';
import { DEMO_PASSWORD, DEMO_USERS, seedDemo } from '../db/seed';
import { startFakes } from './fakes';
import { buildIfStale, localSecret, log, prepareDatabase, waitForHealth } from './setup';

const t0 = performance.now();
const port = Number(process.env.PORT ?? 3000);
const cluster = await prepareDatabase({ name: 'pg', port: 54329, database: 'levelwire' });
const db = createDb(cluster.url, 2);
log((await seedDemo(db)) ? 'demo data seeded' : 'demo data already there');
await db.$client.end();
buildIfStale();
const fakes = await startFakes('.data/fakes');
log(`mail fake ${fakes.env.SMTP_URL} (messages in ${fakes.env.MAILBOX_DIR}), object store fake ${fakes.env.S3_ENDPOINT}`);

const url = `http://127.0.0.1:${port}`;
const server = spawn(process.execPath, ['dist/server.js'], {
  stdio: 'inherit',
  env: {
    ...process.env,
    ...fakes.env,
    NODE_ENV: 'production',
    NEXT_TELEMETRY_DISABLED: '1',
    DATABASE_URL: cluster.url,
    PORT: String(port),
    HOST: '127.0.0.1',
    NEXTAUTH_URL: url,
    NEXTAUTH_SECRET: process.env.NEXTAUTH_SECRET ?? localSecret(),
  },
});

server.once('spawn', async () => {
  await waitForHealth(url, server);
  log(`ready in ${Math.round((performance.now() - t0) / 1000)} s: open ${url}`);
  log(`demo sign-ins (password "${DEMO_PASSWORD}"):`);
  for (const u of DEMO_USERS) log(`  ${u.role.padEnd(10)} ${u.email}  (${u.name})`);
});

let stopping = false;
const stop = (signal: NodeJS.Signals) => {
  if (stopping) return;
  stopping = true;
  server.kill(signal);
};
process.on('SIGINT', () => stop('SIGINT'));
process.on('SIGTERM', () => stop('SIGTERM'));
server.on('exit', async (code) => {
  await fakes.stop();
  cluster.stop();
  process.exit(code ?? 0);
});
