// Levelwire's process: Next.js and socket.io on one HTTP server. Handlers live in lib/realtime.
import { createServer } from 'node:http';
import next from 'next';
import { db } from './db/client';
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
const httpServer = createServer((req, res) => void handle(req, res));
const realtime = attachRealtime(httpServer, { db: db(), secret: config.NEXTAUTH_SECRET });
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
  console.log(`[levelwire] serving on http://${config.HOST}:${config.PORT} (${dev ? 'development' : 'production'})`);
});

let stopping = false;
async function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  console.log(`[levelwire] ${signal}: closing`);
  const timer = setTimeout(() => process.exit(1), 10_000);
  timer.unref();
  stopReminders();
  await virtualTechnician.stop();
  await realtime.close();
  await db().$client.end();
  process.exit(0);
}
process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
