import type { Server as HttpServer } from 'node:http';
import { parse as parseCookies } from 'cookie';
import { getToken } from 'next-auth/jwt';
import { createAdapter } from '@socket.io/postgres-adapter';
import type pg from 'pg';
import { Server } from 'socket.io';
import { actorFromToken } from '@/lib/auth/actor';
import { isDatabaseUnavailable } from '@/lib/errors';
import { setBroadcaster, setUserSocketEnder } from './bus';
import { SOCKET_PATH, sessionRoom, userRoom } from './contract';
import { CommandGate, type IoServer, type RealtimeDeps } from './handlers/define';
import { sessionCommandHandlers } from './handlers/session-commands';
import { announcePresence, linkPingHandler, roomSockets, sessionJoinHandler, sessionLeaveHandler } from './handlers/session-join';

const handlers = [sessionJoinHandler, sessionLeaveHandler, linkPingHandler, ...sessionCommandHandlers];

/**
 * Attaches Levelwire's socket.io server to an HTTP server. The handshake must carry a valid next-auth
 * session cookie of an active user; every command is then checked by its handler. With `clusterPool`, several
 * processes share rooms and broadcasts through PostgreSQL (LISTEN/NOTIFY, @socket.io/postgres-adapter).
 */
export function attachRealtime(httpServer: HttpServer, options: RealtimeDeps & { secret: string; clusterPool?: pg.Pool }) {
  const gate = new CommandGate();
  const deps: RealtimeDeps = { db: options.db, gate };
  const io: IoServer = new Server(httpServer, { path: SOCKET_PATH, serveClient: false });
  if (options.clusterPool) {
    // Heartbeats every 2 s and a node counted gone after 5 s: a killed process stops delaying cluster-wide
    // lookups (presence) soon after it dies.
    io.adapter(
      createAdapter(options.clusterPool, {
        heartbeatInterval: 2_000,
        heartbeatTimeout: 5_000,
        errorHandler: (err) => console.error('[realtime] cluster adapter:', err.message),
      }),
    );
  }

  io.use(async (socket, next) => {
    try {
      const cookieHeader = socket.handshake.headers.cookie ?? '';
      const cookies = parseCookies(cookieHeader) as Record<string, string>;
      const token = await getToken({ req: { headers: socket.handshake.headers, cookies } as never, secret: options.secret });
      const actor = await actorFromToken(options.db, token);
      if (!actor) return next(new Error('unauthorized: sign in first'));
      socket.data.actor = actor;
      socket.data.protocol = Number(socket.handshake.auth?.protocol ?? 0);
      socket.data.connectedAt = new Date().toISOString();
      socket.data.rttMs = null;
      socket.data.sessions = [];
      next();
    } catch (e) {
      // A database outage is not a sign-out: the client is told to try again (it would not reconnect on its own).
      if (isDatabaseUnavailable(e)) return next(Object.assign(new Error('offline:database'), { data: { retryable: true } }));
      next(new Error('unauthorized: sign in first'));
    }
  });

  io.on('connection', (socket) => {
    void socket.join(userRoom(socket.data.actor.id));
    for (const attach of handlers) attach({ socket, io, deps });
    socket.on('disconnect', () => {
      for (const sessionId of socket.data.sessions) void announcePresence(io, sessionId).catch(() => undefined);
    });
  });

  setBroadcaster((event) => io.to(sessionRoom(event.sessionId)).emit(event.type, event));
  setUserSocketEnder((userId) => io.in(userRoom(userId)).disconnectSockets(true));

  return {
    io,
    /** Whether anyone besides `exceptUserId` has a socket in the session's room, in any process (with the adapter). */
    async isWatched(sessionId: string, exceptUserId: string): Promise<boolean> {
      const sockets = await roomSockets(io, sessionRoom(sessionId));
      return sockets.some((s) => s.data.actor && s.data.actor.id !== exceptUserId);
    },
    /** Refuses new commands as retryable (clients keep them) and waits up to `ms` for those running; returns those still running. */
    async drain(ms: number): Promise<string[]> {
      gate.closing = true;
      return gate.idle(ms);
    },
    /**
     * Tells every client the server is restarting, then closes the sockets from the server's side of the
     * transport, which socket.io clients answer by reconnecting (a socket-level disconnect would not).
     */
    async close() {
      gate.closing = true;
      io.local.emit('server:restarting', { message: 'The server is restarting; reconnecting by itself.' });
      // The engine discards what it has not written yet when it closes: let the last acknowledgements go out first.
      const deadline = Date.now() + 500;
      // engine.io keeps its clients and their write buffers internal (typed private); read, never written.
      const clients = (io.engine as unknown as { clients: Record<string, { writeBuffer: unknown[] }> }).clients;
      const unsent = () => Object.values(clients).some((c) => c.writeBuffer.length > 0);
      while (unsent() && Date.now() < deadline) await new Promise((r) => setTimeout(r, 20));
      setBroadcaster(undefined);
      setUserSocketEnder(undefined);
      await new Promise<void>((resolve) => io.close(() => resolve()));
    },
  };
}
