'use client';

import { useQuery, useQueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { io, type Socket } from 'socket.io-client';
import type { Ack, AckError, AppendingCommand, ClientToServerEvents, Presence, ServerToClientEvents } from '@/lib/realtime/contract';
// Values from protocol.ts, not contract.ts: the contract's command schemas would bring zod into every live view's first load.
import { isRetryable, PROTOCOL_VERSION, SOCKET_PATH } from '@/lib/realtime/protocol';
import { EVENT_TYPES, type SessionEvent } from '@/lib/session/events';
import { foldEvents } from '@/lib/session/fold';
import { firstGap, mergeEvents } from '@/lib/session/merge';
import { apiFetch } from './api';
import { cacheLog, cachedLog, countAttempt, dequeue, enqueue, queued, type QueuedCommand } from './outbox';

type LevelwireSocket = Socket<ServerToClientEvents, ClientToServerEvents>;
export type Link = 'connecting' | 'live' | 'offline';

/** A command the server refused (it stays out of the log); shown to the person who sent it. */
export type Rejected = { id: string; name: AppendingCommand; error: AckError; at: number };

const ACK_TIMEOUT_MS = 8_000;
/** After a retryable refusal (server restarting, database away), the outbox goes again this soon. */
const RETRY_SOON_MS = 1_000;
const PING_EVERY_MS = 5_000;

/** Queue order: strictly increasing within this page, and after any earlier page's (wall clock). */
let lastQueuedAt = 0;
function nextQueuedAt(): number {
  lastQueuedAt = Math.max(Date.now(), lastQueuedAt + 1);
  return lastQueuedAt;
}

/** Payload of an appending command without the fields every command carries (the hook adds them). */
type CommandBody = Record<string, unknown>;

/**
 * A live session for a view: the log (loaded through the events route, kept current by the socket, cached in
 * IndexedDB for a reload without a network), its fold, presence, and `send`, which writes each command to an
 * IndexedDB outbox first and sends the outbox in order whenever the socket is connected. A command leaves the
 * outbox only when the server acknowledges it (stored, or a duplicate of one stored) or refuses it (shown in
 * `rejected`). Ids are made here, so a resend after a lost acknowledgement stores nothing twice.
 */
export function useLiveSession(sessionId: string, userId: string) {
  const queryClient = useQueryClient();
  const key = useMemo(() => ['session', sessionId, 'events'] as const, [sessionId]);
  const { data: events = [], error } = useQuery({
    queryKey: key,
    queryFn: async () => {
      try {
        return (await apiFetch<{ events: SessionEvent[] }>(`/api/sessions/${sessionId}/events?after=0`)).events;
      } catch (e) {
        const cached = await cachedLog(sessionId).catch(() => null);
        if (cached && (e instanceof TypeError || !navigator.onLine)) return cached;
        throw e;
      }
    },
    staleTime: Infinity,
    // Run even when the browser says it is offline: the query function falls back to the log cached in IndexedDB
    // (React Query's default 'online' mode would pause it, leaving an empty log after an offline reload).
    networkMode: 'always',
    retry: (count, e) => count < 2 && e instanceof TypeError,
  });
  const [link, setLink] = useState<Link>('connecting');
  const [presence, setPresence] = useState<Presence[]>([]);
  const [outbox, setOutbox] = useState<QueuedCommand[]>([]);
  const [rejected, setRejected] = useState<Rejected[]>([]);
  const [rttMs, setRttMs] = useState<number | null>(null);
  /** Seqs in the order this view first applied them: the browser tests check it runs 1, 2, 3, … with no repeat. */
  const seenRef = useRef<number[]>([]);
  const socketRef = useRef<LevelwireSocket | null>(null);
  const flushing = useRef(false);
  /** A flush was asked for while one ran: run again when it ends, so a command queued meanwhile does not wait. */
  const flushAgain = useRef(false);

  const refreshOutbox = useCallback(async () => setOutbox(await queued(sessionId, userId)), [sessionId, userId]);

  const flush = useCallback(async () => {
    const socket = socketRef.current;
    if (!socket?.connected) return;
    if (flushing.current) {
      flushAgain.current = true;
      return;
    }
    flushing.current = true;
    flushAgain.current = false;
    try {
      for (const cmd of await queued(sessionId, userId)) {
        if (!socket.connected) break;
        let ack: Ack<{ seq: number; duplicate: boolean }>;
        try {
          await countAttempt(cmd);
          ack = (await socket.timeout(ACK_TIMEOUT_MS).emitWithAck(cmd.name, cmd.payload as never)) as Ack<{ seq: number; duplicate: boolean }>;
        } catch {
          break; // no answer: keep it (and everything after it, in order) for the next connection
        }
        if (!ack.ok && isRetryable(ack.error)) {
          // The server is restarting or its database is briefly away: keep it (and what follows, in order).
          setTimeout(() => void flush(), RETRY_SOON_MS);
          break;
        }
        if (!ack.ok) {
          const refused: Rejected = { id: cmd.id, name: cmd.name, error: ack.error, at: Date.now() };
          setRejected((r) => [...r.slice(-9), refused]);
        }
        await dequeue(cmd.id);
        await refreshOutbox();
      }
    } finally {
      flushing.current = false;
      await refreshOutbox();
    }
    if (flushAgain.current && socketRef.current?.connected) void flush();
  }, [refreshOutbox, sessionId, userId]);

  useEffect(() => {
    void refreshOutbox();
    const socket: LevelwireSocket = io({ path: SOCKET_PATH, auth: { protocol: PROTOCOL_VERSION }, withCredentials: true });
    socketRef.current = socket;
    const merge = (incoming: SessionEvent[]) => {
      const before = queryClient.getQueryData<SessionEvent[]>(key) ?? [];
      const after = mergeEvents(before, incoming);
      if (after === before) return;
      queryClient.setQueryData<SessionEvent[]>(key, after);
      void cacheLog(sessionId, after).catch(() => undefined);
    };
    const join = () => {
      const log = queryClient.getQueryData<SessionEvent[]>(key) ?? [];
      const gap = firstGap(log);
      const afterSeq = gap === null ? (log.at(-1)?.seq ?? 0) : gap - 1;
      socket.timeout(ACK_TIMEOUT_MS).emit('session:join', { sessionId, afterSeq }, (err, res) => {
        if (!err && res.ok) {
          merge(res.events);
          setPresence(res.presence);
          setLink('live');
          void flush();
          return;
        }
        setLink('offline');
        // No answer, or refused while the server restarts or its database is away: not in the room yet, so no event
        // would reach this view; join again while connected (a refusal for good, such as forbidden, stays offline).
        if (err || (!res.ok && isRetryable(res.error))) setTimeout(() => socket.connected && join(), RETRY_SOON_MS);
      });
    };
    const onEvent = (event: SessionEvent) => {
      if (event.sessionId !== sessionId) return;
      const log = queryClient.getQueryData<SessionEvent[]>(key) ?? [];
      const last = log.at(-1)?.seq ?? 0;
      if (event.seq > last + 1) return join(); // a gap: catch up from the last seq held, in order
      merge([event]);
    };
    socket.on('connect', join);
    socket.on('disconnect', () => setLink('offline'));
    socket.on('server:restarting', () => setLink('offline'));
    socket.on('connect_error', (err) => {
      setLink('offline');
      // Refused at the handshake because the server's database was away: socket.io does not retry that by itself.
      if (!socket.active && (err as { data?: { retryable?: boolean } }).data?.retryable) setTimeout(() => socket.connect(), RETRY_SOON_MS * 2);
    });
    socket.on('presence:changed', (u) => u.sessionId === sessionId && setPresence(u.presence));
    for (const type of EVENT_TYPES) socket.on(type, onEvent);
    const online = () => socket.connected || socket.connect();
    const offline = () => setLink('offline');
    window.addEventListener('online', online);
    window.addEventListener('offline', offline);
    let lastRtt: number | undefined;
    const ping = setInterval(() => {
      if (!socket.connected) return;
      const started = performance.now();
      socket
        .timeout(ACK_TIMEOUT_MS)
        .emitWithAck('link:ping', { sessionId, ...(lastRtt !== undefined ? { rttMs: lastRtt } : {}) })
        .then(() => {
          lastRtt = Math.round(performance.now() - started);
          setRttMs(lastRtt);
        })
        .catch(() => setRttMs(null));
    }, PING_EVERY_MS);
    const retry = setInterval(() => void flush(), ACK_TIMEOUT_MS);
    return () => {
      clearInterval(ping);
      clearInterval(retry);
      window.removeEventListener('online', online);
      window.removeEventListener('offline', offline);
      socket.disconnect();
      socketRef.current = null;
    };
  }, [flush, key, queryClient, refreshOutbox, sessionId]);

  const state = useMemo(() => {
    // Record each seq the first time this view holds it, in the order it comes to hold them (initial load, catch-up or
    // broadcast alike); a late event filling a gap below the last seen seq is not recorded, so the tests would see it.
    const seen = seenRef.current;
    for (const e of events) if (e.seq > (seen.at(-1) ?? 0)) seen.push(e.seq);
    return foldEvents(events);
  }, [events]);

  /** Queues a command and sends it when it can; resolves once it is safely in the outbox, with its id. */
  const send = useCallback(
    async (name: AppendingCommand, body: CommandBody): Promise<string> => {
      const id = typeof body.id === 'string' ? body.id : crypto.randomUUID();
      const payload = { ...body, id, sessionId, clientTs: new Date().toISOString() };
      await enqueue({ id, sessionId, userId, name, payload, queuedAt: nextQueuedAt(), attempts: 0 });
      await refreshOutbox();
      void flush();
      return id;
    },
    [flush, refreshOutbox, sessionId, userId],
  );

  const dismissRejected = useCallback((id: string) => setRejected((r) => r.filter((x) => x.id !== id)), []);

  return { events, state, link, error, presence, rttMs, outbox, rejected, dismissRejected, send, seen: seenRef };
}
