import type { Server, Socket } from 'socket.io';
import type * as z from 'zod/mini';
import type { Db } from '@/db/client';
import { fromZod, nulCharacterError, toAppError } from '@/lib/errors';
import { commands, type ClientToServerEvents, type CommandName, type CommandResults, type ServerToClientEvents, type SocketData } from '../contract';

export type RealtimeDeps = { db: Db; gate?: CommandGate };
export type IoServer = Server<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;
export type IoSocket = Socket<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;

/**
 * Commands being handled now, and whether the server is closing: on SIGTERM server.ts stops new commands (the
 * client keeps them and sends them again after reconnecting) and waits for these to finish before it closes.
 */
export class CommandGate {
  private running = new Map<number, string>();
  private nextId = 0;
  private waiters: (() => void)[] = [];
  closing = false;

  enter(name: string): number {
    this.nextId += 1;
    this.running.set(this.nextId, `${name} since ${new Date().toISOString()}`);
    return this.nextId;
  }

  leave(id: number): void {
    this.running.delete(id);
    if (this.running.size === 0) for (const w of this.waiters.splice(0)) w();
  }

  /** Resolves when no command is running, or after `ms`, with those still running (name and start). */
  async idle(ms: number): Promise<string[]> {
    if (this.running.size > 0) {
      await new Promise<void>((resolve) => {
        const timer = setTimeout(resolve, ms);
        this.waiters.push(() => {
          clearTimeout(timer);
          resolve();
        });
      });
    }
    return [...this.running.values()];
  }
}

/**
 * One handler per command: the payload is parsed against the contract's schema, errors become an
 * error acknowledgement naming the problem, and a missing ack function is tolerated.
 */
export function defineHandler<N extends CommandName>(
  name: N,
  run: (ctx: { socket: IoSocket; io: IoServer; deps: RealtimeDeps }, payload: z.output<(typeof commands)[N]>) => Promise<CommandResults[N]>,
) {
  return (ctx: { socket: IoSocket; io: IoServer; deps: RealtimeDeps }) => {
    ctx.socket.on(name, (async (...args: unknown[]) => {
      // socket.io passes the ack last: a client that sent no payload (or an extra argument) still gets its answer.
      const ack = args.at(-1);
      const reply = typeof ack === 'function' ? (ack as (r: unknown) => void) : () => undefined;
      const raw = typeof args[0] === 'function' ? undefined : args[0];
      const parsed = commands[name].safeParse(raw);
      const refused = parsed.success ? nulCharacterError(parsed.data, name.split(':')[0]!) : fromZod(parsed.error, name.split(':')[0]!);
      if (refused) {
        reply({ ok: false, error: { code: refused.code, message: refused.message, field: refused.field } });
        return;
      }
      const gate = ctx.deps.gate;
      if (gate?.closing) {
        reply({ ok: false, error: { code: 'offline:restarting', message: 'The server is restarting; the command is sent again once reconnected.' } });
        return;
      }
      const ticket = gate?.enter(name);
      try {
        const result = await run(ctx, parsed.data as z.output<(typeof commands)[N]>);
        reply({ ok: true, ...result });
      } catch (e) {
        const err = toAppError(e, name);
        reply({ ok: false, error: { code: err.code, message: err.message, field: err.field } });
      } finally {
        if (ticket !== undefined) gate?.leave(ticket);
      }
    }) as never);
  };
}
