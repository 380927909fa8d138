'use client';

import { useQuery, useQueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { io, type Socket } from 'socket.io-client';
import { EVENT_TYPES, PROTOCOL_VERSION, SOCKET_PATH, type ClientToServerEvents, type ServerToClientEvents, type SubmitAck } from '@/lib/realtime/contract';
import type { LevelReadingInput } from '@/lib/session/commands';
import type { SessionEvent } from '@/lib/session/events';
import { foldEvents } from '@/lib/session/fold';
import { firstGap, mergeEvents } from '@/lib/session/merge';
import { apiFetch } from './api';

type LevelwireSocket = Socket<ServerToClientEvents, ClientToServerEvents>;
export type Link = 'connecting' | 'live' | 'offline';

/**
 * A session's log, loaded through the events route and kept current by the socket: joins the
 * session's room, catches up after a reconnect, and folds the log into the session state.
 */
export function useSessionLog(sessionId: string) {
  const queryClient = useQueryClient();
  const key = useMemo(() => ['session', sessionId, 'events'] as const, [sessionId]);
  const { data: events = [], error } = useQuery({
    queryKey: key,
    queryFn: () => apiFetch<{ events: SessionEvent[] }>(`/api/sessions/${sessionId}/events?after=0`).then((r) => r.events),
    staleTime: Infinity,
  });
  const [link, setLink] = useState<Link>('connecting');
  const socketRef = useRef<LevelwireSocket | null>(null);

  useEffect(() => {
    const socket: LevelwireSocket = io({ path: SOCKET_PATH, auth: { protocol: PROTOCOL_VERSION }, withCredentials: true });
    socketRef.current = socket;
    const merge = (incoming: SessionEvent[]) =>
      queryClient.setQueryData<SessionEvent[]>(key, (log = []) => mergeEvents(log, incoming));
    const join = () => {
      const log = queryClient.getQueryData<SessionEvent[]>(key) ?? [];
      const gap = firstGap(log);
      const afterSeq = gap === null ? (log.at(-1)?.seq ?? 0) : gap - 1;
      socket.emit('session:join', { sessionId, afterSeq }, (res) => {
        if (res.ok) {
          merge(res.events);
          setLink('live');
        } else setLink('offline');
      });
    };
    const onEvent = (event: SessionEvent) => {
      if (event.sessionId !== sessionId) return;
      merge([event]);
      const log = queryClient.getQueryData<SessionEvent[]>(key) ?? [];
      if (firstGap(log) !== null) join();
    };
    socket.on('connect', join);
    socket.on('disconnect', () => setLink('offline'));
    socket.on('connect_error', () => setLink('offline'));
    for (const type of EVENT_TYPES) socket.on(type, onEvent);
    return () => {
      socket.disconnect();
      socketRef.current = null;
    };
  }, [key, queryClient, sessionId]);

  const state = useMemo(() => foldEvents(events), [events]);

  const submitReading = useCallback(
    async (reading: LevelReadingInput): Promise<SubmitAck> => {
      const socket = socketRef.current;
      if (!socket?.connected) return { ok: false, error: { code: 'offline:socket', message: 'Not connected: the reading was not sent' } };
      try {
        return await socket
          .timeout(8_000)
          .emitWithAck('reading:submit', { id: crypto.randomUUID(), sessionId, clientTs: new Date().toISOString(), reading });
      } catch {
        return { ok: false, error: { code: 'offline:timeout', message: 'No answer from the server within 8 s' } };
      }
    },
    [sessionId],
  );

  return { events, state, link, error, submitReading };
}
