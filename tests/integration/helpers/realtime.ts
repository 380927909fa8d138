import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { encode } from 'next-auth/jwt';
import { io as connect, type Socket } from 'socket.io-client';
import type { Db } from '@/db/client';
import type { Role } from '@/db/schema';
import { PROTOCOL_VERSION, SOCKET_PATH, type ClientToServerEvents, type ServerToClientEvents } from '@/lib/realtime/contract';
import { attachRealtime } from '@/lib/realtime/server';

export const SECRET = 'levelwire-realtime-test-secret-0001';
export type TestSocket = Socket<ServerToClientEvents, ClientToServerEvents>;

/** attachRealtime on a bare HTTP server at a random loopback port: the same code server.ts runs, without Next. */
export async function bootRealtime(db: Db) {
  const http: Server = createServer((_req, res) => res.writeHead(404).end());
  const realtime = attachRealtime(http, { db, secret: SECRET });
  await new Promise<void>((resolve) => http.listen(0, '127.0.0.1', resolve));
  const url = `http://127.0.0.1:${(http.address() as AddressInfo).port}`;
  const sockets: TestSocket[] = [];

  /** A connected socket as the user (a next-auth session cookie made with the same secret), or anonymous. */
  async function as(user: { id: string; email: string; name: string; role: Role; organisationId: string } | null): Promise<TestSocket> {
    const token = user && { sub: user.id, email: user.email, name: user.name, role: user.role, organisationId: user.organisationId };
    const cookie = token ? `next-auth.session-token=${await encode({ token, secret: SECRET })}` : '';
    const socket: TestSocket = connect(url, { path: SOCKET_PATH, auth: { protocol: PROTOCOL_VERSION }, extraHeaders: cookie ? { cookie } : {}, transports: ['websocket'], reconnection: false, forceNew: true });
    sockets.push(socket);
    await new Promise<void>((resolve, reject) => {
      socket.once('connect', () => resolve());
      socket.once('connect_error', (err) => reject(err));
    });
    return socket;
  }

  return {
    url,
    as,
    async close() {
      sockets.forEach((s) => s.disconnect());
      await realtime.close();
    },
  };
}

/** Resolves with the next `event` the socket receives, or rejects after `ms`. */
export function waitFor<E extends keyof ServerToClientEvents>(socket: TestSocket, event: E, ms = 3_000) {
  return new Promise<Parameters<ServerToClientEvents[E]>[0]>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`no ${String(event)} within ${ms} ms`)), ms);
    socket.once(event, ((payload: Parameters<ServerToClientEvents[E]>[0]) => {
      clearTimeout(timer);
      resolve(payload);
    }) as never);
  });
}
