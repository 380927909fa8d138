// `npm run dev`: the database as for `npm start`, then server.ts under tsx watch with Next in development mode.
import { spawn } from 'node:child_process';
import { createDb } from '../db/client';
import { seedDemo } from '../db/seed';
import { startFakes } from './fakes';
import { localSecret, prepareDatabase } from './setup';

const cluster = await prepareDatabase({ name: 'pg', port: 54329, database: 'levelwire' });
const db = createDb(cluster.url, 2);
await seedDemo(db);
await db.$client.end();
const fakes = await startFakes('.data/fakes');
const child = spawn('npx', ['tsx', 'watch', '--exclude', './.next/**', '--exclude', './.data/**', 'server.ts'], {
  stdio: 'inherit',
  env: { ...process.env, ...fakes.env, NODE_ENV: 'development', NEXT_TELEMETRY_DISABLED: '1', DATABASE_URL: cluster.url, NEXTAUTH_URL: 'http://127.0.0.1:3000', NEXTAUTH_SECRET: localSecret() },
});
child.on('exit', (code) => process.exit(code ?? 0));
