// The bare relay `npm run bench:live` measures Levelwire against: a plain socket.io server (the same version, the same
// path and event names) that puts a socket in a session's room on `session:join` and, on `reading:submit`, sends the
// reading to the room and acknowledges it. No sign-in, no database, no checks: what any live relay costs on this machine.
// Run as a child process by bench-live.ts; tells its parent the port it listens on.
import { createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { Server } from 'socket.io';
import { SOCKET_PATH, sessionRoom } from '../lib/realtime/contract';

type Ack = (res: unknown) => void;

const httpServer = createServer();
const io = new Server(httpServer, { path: SOCKET_PATH, serveClient: false });
const seqs = new Map<string, number>();

io.on('connection', (socket) => {
  socket.on('session:join', (payload: { sessionId: string }, ack: Ack) => {
    void socket.join(sessionRoom(payload.sessionId));
    ack({ ok: true, events: [], presence: [] });
  });
  socket.on('reading:submit', (payload: { id: string; sessionId: string; clientTs: string; reading: unknown }, ack: Ack) => {
    // Broadcast before the acknowledgement, in the order Levelwire's server uses (there: after the commit).
    const seq = (seqs.get(payload.sessionId) ?? 0) + 1;
    seqs.set(payload.sessionId, seq);
    const event = { id: payload.id, sessionId: payload.sessionId, seq, type: 'reading:recorded', payload: payload.reading, clientTs: payload.clientTs, serverTs: new Date().toISOString() };
    io.to(sessionRoom(payload.sessionId)).emit('reading:recorded', event);
    ack({ ok: true, seq, duplicate: false });
  });
});

const port = Number(process.argv.find((a) => a.startsWith('--port='))?.slice('--port='.length) ?? 0);
httpServer.listen(port, '127.0.0.1', () => {
  const actual = (httpServer.address() as AddressInfo).port;
  if (process.send) process.send({ port: actual });
  else console.log(`bench relay listening on 127.0.0.1:${actual}`);
});
process.on('SIGTERM', () => {
  io.close();
  process.exit(0);
});
