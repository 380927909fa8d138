// The access matrix (issue 7, item 2), walked against the running server: first that every route handler, socket event
// and server action has its row in tests/integration/access/matrix.ts (and every row still has its route or event),
// then every row's columns as real people signed in over HTTP, on real records of their organisation and another.
import { readdir, readFile } from 'node:fs/promises';
import path from 'node:path';
import { io } from 'socket.io-client';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Role } from '@/db/schema';
import { commands, PROTOCOL_VERSION, SOCKET_PATH, type CommandName } from '@/lib/realtime/contract';
import { HANDSHAKE, ROUTES, SERVER_ACTIONS, SOCKET_EVENTS, type AckExpect, type Call, type HttpExpect } from './access/matrix';
import { buildWorld, type Column, type World } from './access/world';
import { APP_URL } from './helpers/http';
import type { TestSocket } from './helpers/realtime';

const HTTP_METHODS = ['GET', 'HEAD', 'POST', 'PUT', 'PATCH', 'DELETE', 'OPTIONS'];

async function filesUnder(dir: string, match: RegExp): Promise<string[]> {
  const entries = await readdir(dir, { recursive: true }).catch(() => [] as string[]);
  return entries.map((e) => path.join(dir, e).split(path.sep).join('/')).filter((f) => match.test(f) && !f.includes('/node_modules/'));
}

/** `app/api/sessions/[id]/route.ts` → `/api/sessions/:id`; a catch-all `[...x]` → `:x*`; route groups `(g)` drop out. */
function patternOf(file: string): string {
  const segments = path.dirname(file).split('/').slice(1);
  return `/${segments
    .filter((s) => !/^\(.*\)$/.test(s))
    .map((s) => s.replace(/^\[\[?\.\.\.(\w+)\]\]?$/, ':$1*').replace(/^\[(\w+)\]$/, ':$1'))
    .join('/')}`;
}

/** The HTTP methods a route module exports: `export const GET`, `export async function POST`, `export { h as GET }`. */
function methodsOf(source: string): string[] {
  const names = new Set<string>();
  for (const m of source.matchAll(/export\s+(?:const|let|var|(?:async\s+)?function)\s+([A-Z]+)\b/g)) names.add(m[1]!);
  for (const m of source.matchAll(/export\s*\{([^}]*)\}/g)) {
    for (const part of m[1]!.split(',')) names.add(part.trim().split(/\s+as\s+/).pop()!.trim());
  }
  return [...names].filter((n) => HTTP_METHODS.includes(n)).sort();
}

/** Server actions: the exports of a module that starts with "use server", and any function that says it inline. */
async function serverActions(): Promise<string[]> {
  const found: string[] = [];
  for (const dir of ['app', 'components', 'lib']) {
    for (const file of await filesUnder(dir, /\.(ts|tsx|js|jsx|mjs)$/)) {
      const source = await readFile(file, 'utf8');
      if (!/['"]use server['"]/.test(source)) continue;
      if (/^\s*(?:\/\/[^\n]*\n\s*|\/\*[\s\S]*?\*\/\s*)*['"]use server['"]/.test(source)) {
        for (const m of source.matchAll(/export\s+(?:const|let|(?:async\s+)?function)\s+(\w+)/g)) found.push(`${file}#${m[1]}`);
      } else {
        found.push(`${file}#(inline)`);
      }
    }
  }
  return found.sort();
}

describe('every route handler, socket event and server action has a row', () => {
  it('a row for every exported method of every app/api route file, and a route for every row', async () => {
    const handlers: string[] = [];
    for (const file of await filesUnder('app/api', /\/route\.(ts|tsx|js|mjs)$/)) {
      const methods = methodsOf(await readFile(file, 'utf8'));
      expect(methods, `${file} exports no HTTP method`).not.toEqual([]);
      for (const method of methods) handlers.push(`${method} ${patternOf(file)}`);
    }
    expect(handlers.length).toBeGreaterThan(40);
    const rows = Object.keys(ROUTES);
    expect({ withoutRow: handlers.filter((h) => !rows.includes(h)).sort(), withoutHandler: rows.filter((r) => !handlers.includes(r)).sort() }, 'tests/integration/access/matrix.ts ROUTES').toEqual({ withoutRow: [], withoutHandler: [] });
  });

  it('a row for every socket event of the contract, and an event for every row', () => {
    const events = Object.keys(commands).sort();
    const rows = Object.keys(SOCKET_EVENTS).sort();
    expect({ withoutRow: events.filter((e) => !rows.includes(e)), withoutEvent: rows.filter((r) => !events.includes(r)) }, 'tests/integration/access/matrix.ts SOCKET_EVENTS').toEqual({ withoutRow: [], withoutEvent: [] });
  });

  it('a row for every server action (there are none today), each naming the test that walks it', async () => {
    const actions = await serverActions();
    const rows = Object.keys(SERVER_ACTIONS);
    expect({ withoutRow: actions.filter((a) => !rows.includes(a)), withoutAction: rows.filter((r) => !actions.includes(r)) }, 'tests/integration/access/matrix.ts SERVER_ACTIONS').toEqual({ withoutRow: [], withoutAction: [] });
    for (const { walkedIn } of Object.values(SERVER_ACTIONS)) expect((await readFile(walkedIn, 'utf8')).length).toBeGreaterThan(0);
  });
});

describe('the matrix against the running server', () => {
  let w: World;
  const sockets = new Map<string, Promise<TestSocket>>();

  beforeAll(async () => {
    w = await buildWorld();
  }, 180_000);
  afterAll(async () => {
    for (const s of sockets.values()) (await s.catch(() => null))?.disconnect();
  });

  function cookieOf(who: Column, otherAs: Role = 'admin'): string | undefined {
    if (who === 'anonymous') return undefined;
    if (who === 'other') return w.otherCookies[otherAs];
    return w.cookies[who];
  }

  async function send(method: string, call: Call, cookie: string | undefined) {
    const headers: Record<string, string> = {};
    const jar = call.cookie ?? cookie;
    if (jar) headers.cookie = jar;
    let body: BodyInit | undefined;
    if (call.json !== undefined) {
      headers['content-type'] = 'application/json';
      body = JSON.stringify(call.json);
    } else if (call.form) body = call.form;
    else if (call.text !== undefined) {
      headers['content-type'] = call.contentType ?? 'text/plain';
      body = call.text;
    }
    const res = await fetch(`${APP_URL}${call.path}`, { method, headers, body, redirect: 'manual' });
    return { status: res.status, text: await res.text() };
  }

  const kindOf: Record<number, string> = { 400: 'bad_request', 401: 'unauthorized', 403: 'forbidden', 404: 'not_found', 409: 'conflict', 410: 'gone' };

  /** Null when the answer is what the row expects; else what went wrong, for the failure message. */
  function mismatch(expected: HttpExpect, res: { status: number; text: string }): string | null {
    const ok = res.status >= 200 && res.status < 300;
    const said = `${res.status} ${res.text.slice(0, 160)}`;
    if (expected === '2xx') return ok ? null : `expected 2xx, got ${said}`;
    if (expected === 'gate') return [401, 403, 404].includes(res.status) ? `expected to pass the gate, got ${said}` : null;
    if (expected === 'own') {
      if (!ok) return `expected 2xx with its own records only, got ${said}`;
      const leaked = w.markers.filter((m) => res.text.includes(m));
      return leaked.length ? `answered with the first organisation’s ${leaked.join(', ')}` : null;
    }
    if (res.status !== expected) return `expected ${expected}, got ${said}`;
    // A refusal speaks Levelwire's error vocabulary: problem+json whose code names the same kind as the status.
    const code = (JSON.parse(res.text || '{}') as { code?: string }).code ?? '';
    return code.startsWith(`${kindOf[expected]}:`) ? null : `expected a ${kindOf[expected]}:… code, got ${said}`;
  }

  it.each(Object.entries(ROUTES))('%s', async (key, row) => {
    const method = key.split(' ')[0]!;
    const columns = Object.entries(row.expect) as [Column, HttpExpect][];
    const problems = await Promise.all(
      columns.map(async ([who, expected]) => {
        const cookie = cookieOf(who, row.otherAs);
        const res = await send(method, await row.call({ w, who, cookie }), cookie);
        const wrong = mismatch(expected, res);
        return wrong && `${who}: ${wrong}`;
      }),
    );
    expect(problems.filter(Boolean)).toEqual([]);
  }, 120_000);

  function connect(cookie: string | undefined): Promise<TestSocket> {
    const socket: TestSocket = io(APP_URL, { path: SOCKET_PATH, auth: { protocol: PROTOCOL_VERSION }, extraHeaders: cookie ? { cookie } : {}, transports: ['websocket'], reconnection: false, forceNew: true });
    return new Promise((resolve, reject) => {
      socket.once('connect', () => resolve(socket));
      socket.once('connect_error', (err) => {
        socket.disconnect();
        reject(err);
      });
    });
  }
  /** One socket per person, kept for every event row. */
  function socketOf(cookie: string): Promise<TestSocket> {
    if (!sockets.has(cookie)) sockets.set(cookie, connect(cookie));
    return sockets.get(cookie)!;
  }

  it('the socket handshake', async () => {
    const problems = await Promise.all(
      (Object.entries(HANDSHAKE) as [Column, 'connects' | 'refused'][]).map(async ([who, expected]) => {
        const cookie = cookieOf(who);
        const got = await (cookie ? socketOf(cookie) : connect(undefined).then((s) => s.disconnect())).then(
          () => 'connects',
          () => 'refused',
        );
        return got === expected ? null : `${who}: expected the handshake to be ${expected}, it ${got}`;
      }),
    );
    expect(problems.filter(Boolean)).toEqual([]);
  }, 60_000);

  it.each(Object.entries(SOCKET_EVENTS) as [CommandName, (typeof SOCKET_EVENTS)[CommandName]][])('socket %s', async (event, row) => {
    const columns = Object.entries(row.expect) as [Column, AckExpect][];
    const problems = await Promise.all(
      columns.map(async ([who, expected]) => {
        const socket = await socketOf(cookieOf(who, row.otherAs)!);
        const ack = (await socket.timeout(30_000).emitWithAck(event, (await row.payload(w)) as never)) as { ok: boolean; error?: { code: string; message: string } };
        const got = ack.ok ? 'ok' : (ack.error?.code ?? 'no code');
        return got === expected ? null : `${who}: expected ${expected}, got ${got}${ack.error ? ` (${ack.error.message})` : ''}`;
      }),
    );
    expect(problems.filter(Boolean)).toEqual([]);
  }, 60_000);
});
