'use client';

import { useQuery, useQueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, useMemo } from 'react';
import type { SessionEvent } from '@/lib/session/events';
import { mergeEvents } from '@/lib/session/merge';
import { buildReplayIndex } from '@/lib/session/replay';
import { apiFetch } from '@/components/session/api';

/** While the record can still change (not approved), newer events are looked for this often. */
const FOLLOW_EVERY_MS = 5_000;

/** The log after `after`, every page of it: the events route returns a bounded page, so ask again until none come. */
async function fetchAfter(sessionId: string, after: number): Promise<SessionEvent[]> {
  const out: SessionEvent[] = [];
  for (let from = after; ; ) {
    const { events } = await apiFetch<{ events: SessionEvent[] }>(`/api/sessions/${sessionId}/events?after=${from}`);
    if (events.length === 0) return out;
    out.push(...events);
    from = events[events.length - 1]!.seq;
  }
}

/**
 * The whole log of a session for its replay, loaded once and indexed once (buildReplayIndex: one fold, snapshots for
 * seeking). Until the record is approved (it can still change) newer events are fetched now and then, when the
 * window regains focus, and on `refresh()`; the index is rebuilt only when some arrive.
 */
export function useReplayLog(sessionId: string) {
  const queryClient = useQueryClient();
  const key = useMemo(() => ['replay', sessionId, 'events'] as const, [sessionId]);
  const { data: events, error, isPending } = useQuery({
    queryKey: key,
    queryFn: () => fetchAfter(sessionId, 0),
    staleTime: Infinity,
    refetchOnWindowFocus: false,
  });

  const refresh = useCallback(async () => {
    const log = queryClient.getQueryData<SessionEvent[]>(key);
    if (!log) return;
    const newer = await fetchAfter(sessionId, log.at(-1)?.seq ?? 0);
    if (newer.length === 0) return;
    queryClient.setQueryData<SessionEvent[]>(key, (before) => mergeEvents(before ?? [], newer));
  }, [key, queryClient, sessionId]);

  const index = useMemo(() => (events ? buildReplayIndex(events) : null), [events]);
  const follow = index !== null && index.final.status !== 'approved';

  useEffect(() => {
    if (!follow) return;
    const timer = setInterval(() => void refresh().catch(() => undefined), FOLLOW_EVERY_MS);
    const onFocus = () => void refresh().catch(() => undefined);
    window.addEventListener('focus', onFocus);
    return () => {
      clearInterval(timer);
      window.removeEventListener('focus', onFocus);
    };
  }, [follow, refresh]);

  return { index, error: error as Error | null, loading: isPending, refresh };
}
