import type { Server, Socket } from 'socket.io';
import type * as z from 'zod/mini';
import type { Db } from '@/db/client';
import { fromZod, toAppError } from '@/lib/errors';
import { commands, type ClientToServerEvents, type CommandName, type CommandResults, type ServerToClientEvents, type SocketData } from '../contract';

export type RealtimeDeps = { db: Db };
export type IoServer = Server<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;
export type IoSocket = Socket<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;

/**
 * One handler per command: the payload is parsed against the contract's schema, errors become an
 * error acknowledgement naming the problem, and a missing ack function is tolerated.
 */
export function defineHandler<N extends CommandName>(
  name: N,
  run: (ctx: { socket: IoSocket; io: IoServer; deps: RealtimeDeps }, payload: z.output<(typeof commands)[N]>) => Promise<CommandResults[N]>,
) {
  return (ctx: { socket: IoSocket; io: IoServer; deps: RealtimeDeps }) => {
    ctx.socket.on(name, (async (raw: unknown, ack?: unknown) => {
      const reply = typeof ack === 'function' ? (ack as (r: unknown) => void) : () => undefined;
      const parsed = commands[name].safeParse(raw);
      if (!parsed.success) {
        const err = fromZod(parsed.error, name.split(':')[0]!);
        reply({ ok: false, error: { code: err.code, message: err.message, field: err.field } });
        return;
      }
      try {
        const result = await run(ctx, parsed.data as z.output<(typeof commands)[N]>);
        reply({ ok: true, ...result });
      } catch (e) {
        const err = toAppError(e, name);
        reply({ ok: false, error: { code: err.code, message: err.message, field: err.field } });
      }
    }) as never);
  };
}
