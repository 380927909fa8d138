import type { Server as HttpServer } from 'node:http';
import { parse as parseCookies } from 'cookie';
import { getToken } from 'next-auth/jwt';
import { Server } from 'socket.io';
import { actorFromUserId } from '@/lib/auth/actor';
import { setBroadcaster, setUserSocketEnder } from './bus';
import { SOCKET_PATH, sessionRoom, userRoom } from './contract';
import type { IoServer, RealtimeDeps } from './handlers/define';
import { sessionCommandHandlers } from './handlers/session-commands';
import { announcePresence, linkPingHandler, sessionJoinHandler, sessionLeaveHandler } from './handlers/session-join';

const handlers = [sessionJoinHandler, sessionLeaveHandler, linkPingHandler, ...sessionCommandHandlers];

/**
 * Attaches Levelwire's socket.io server to an HTTP server. The handshake must carry a valid next-auth
 * session cookie of an active user; every command is then checked by its handler.
 */
export function attachRealtime(httpServer: HttpServer, deps: RealtimeDeps & { secret: string }) {
  const io: IoServer = new Server(httpServer, { path: SOCKET_PATH, serveClient: false });

  io.use(async (socket, next) => {
    try {
      const cookieHeader = socket.handshake.headers.cookie ?? '';
      const cookies = parseCookies(cookieHeader) as Record<string, string>;
      const token = await getToken({ req: { headers: socket.handshake.headers, cookies } as never, secret: deps.secret });
      const actor = await actorFromUserId(deps.db, token?.sub);
      if (!actor) return next(new Error('unauthorized: sign in first'));
      socket.data.actor = actor;
      socket.data.protocol = Number(socket.handshake.auth?.protocol ?? 0);
      socket.data.connectedAt = new Date().toISOString();
      socket.data.rttMs = null;
      socket.data.sessions = [];
      next();
    } catch {
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
      const sockets = await io.in(sessionRoom(sessionId)).fetchSockets();
      return sockets.some((s) => s.data.actor && s.data.actor.id !== exceptUserId);
    },
    async close() {
      setBroadcaster(undefined);
      setUserSocketEnder(undefined);
      await new Promise<void>((resolve) => io.close(() => resolve()));
    },
  };
}
