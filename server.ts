// Levelwire's process: Next.js and socket.io on one HTTP server. Handlers live in lib/realtime.
import { createServer } from 'node:http';
import next from 'next';
import { createDb, db } from './db/client';
import { pinClientAddress } from './lib/auth/client-address';
import { assertProductionSecrets, env } from './lib/env';
import { SOCKET_PATH } from './lib/realtime/contract';
import { attachRealtime } from './lib/realtime/server';
import { startReminderTimer } from './lib/fleet/reminder-timer';
import { startVirtualTechnician } from './lib/session/virtual-technician';

const config = env();
assertProductionSecrets(config);
const dev = config.NODE_ENV !== 'production';
const app = next({ dev, hostname: config.HOST, port: config.PORT });
await app.prepare();

const handle = app.getRequestHandler();
const httpServer = createServer((req, res) => {
  // Sign-in limits count by client address; a client's own X-Forwarded-For is believed only behind TRUSTED_PROXIES.
  pinClientAddress(req, config.TRUSTED_PROXIES);
  void handle(req, res);
});
// Several processes behind a load balancer share rooms through PostgreSQL; the adapter gets its own pool: one
// connection holds LISTEN, the others send each broadcast's NOTIFY. The adapter delivers a broadcast even to this
// process's own sockets only once its NOTIFY has gone, so a small pool queues every broadcast: with 3 connections
// `npm run bench:live` at 1,000 sessions saw seconds of delay to the expert, with 10 about a tenth of a second.
const clusterDb = config.REALTIME_ADAPTER === 'postgres' ? createDb(config.DATABASE_URL, 10) : undefined;
const realtime = attachRealtime(httpServer, { db: db(), secret: config.NEXTAUTH_SECRET, clusterPool: clusterDb?.$client });
// Works demo sessions (a virtual seed set) through the same service as a person's commands.
const virtualTechnician = startVirtualTechnician({ db: db(), isWatched: realtime.isWatched });
const stopReminders = startReminderTimer(db(), config.REMINDER_INTERVAL_MINUTES);

if (dev) {
  const upgrade = app.getUpgradeHandler();
  httpServer.on('upgrade', (req, socket, head) => {
    if (!req.url?.startsWith(SOCKET_PATH)) void upgrade(req, socket, head);
  });
}

httpServer.listen(config.PORT, config.HOST, () => {
  console.log(`[levelwire] serving on http://${config.HOST}:${config.PORT} (${dev ? 'development' : 'production'}, realtime ${config.REALTIME_ADAPTER})`);
});

/**
 * SIGTERM (a deploy, `npm start` stopping): stop taking connections, let the commands in flight commit (new ones
 * are refused as retryable and stay in the clients' outboxes), tell the clients to reconnect, close the sockets,
 * then the database; all within SHUTDOWN_GRACE_SECONDS plus two, or the process exits anyway.
 */
let stopping = false;
async function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  const graceMs = config.SHUTDOWN_GRACE_SECONDS * 1000;
  const t0 = performance.now();
  console.log(`[levelwire] ${signal}: closing`);
  const timer = setTimeout(() => {
    console.error('[levelwire] shutdown overran its bound; exiting');
    process.exit(1);
  }, graceMs + 2_000);
  timer.unref();
  const httpClosed = new Promise<void>((resolve) => httpServer.close(() => resolve()));
  httpServer.closeIdleConnections();
  const phases: string[] = [];
  const phase = async (name: string, work: Promise<unknown>) => {
    const p0 = performance.now();
    await work;
    phases.push(`${name} ${Math.round(performance.now() - p0)} ms`);
  };
  stopReminders();
  await phase('demo runner', virtualTechnician.stop());
  let unfinished: string[] = [];
  await phase('commands in flight', realtime.drain(graceMs).then((left) => (unfinished = left)));
  if (unfinished.length) console.error(`[levelwire] still running after the grace: ${unfinished.join('; ')}`);
  await phase('sockets', realtime.close());
  // Requests already being answered finish within what is left of the grace; idle keep-alive connections go now.
  httpServer.closeIdleConnections();
  await phase('requests', Promise.race([httpClosed, new Promise((r) => setTimeout(r, Math.max(0, graceMs - (performance.now() - t0))))]));
  httpServer.closeAllConnections();
  console.log(`[levelwire] phases: ${phases.join(', ')}`);
  // A pool's end waits for every client it lent out; the adapter never gives back a LISTEN client that PostgreSQL cut,
  // so the wait is bounded (the process exits just after and the server side closes what is left).
  const pools = Promise.all([clusterDb?.$client.end().catch(() => undefined), db().$client.end().catch(() => undefined)]);
  await phase('database', Promise.race([pools, new Promise((r) => setTimeout(r, 1_000))]));
  console.log(`[levelwire] closed in ${Math.round(performance.now() - t0)} ms (${phases.join(', ')})`);
  process.exit(0);
}
process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
