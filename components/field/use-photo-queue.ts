'use client';

import { useCallback, useEffect, useRef, useState } from 'react';
import { dropPhoto, keepPhoto, keptPhotos, type QueuedPhoto } from '@/components/session/outbox';
import type { SessionStage } from '@/lib/session/stages';

export type PhotoNotice = { tone: 'ok' | 'error'; text: string };

/** What became of one upload: stored, refused for good (shown, then dropped), or kept to try again later. */
type Outcome = { done: true; notice: PhotoNotice } | { done: false; notice?: PhotoNotice };

/** How long to wait before trying again when the server was reached but could not take the photo yet (a restart). */
const RETRY_MS = 5_000;
const KEPT = 'Photo kept on this device; it uploads when the link is back.';

async function upload(photo: QueuedPhoto): Promise<Outcome> {
  const form = new FormData();
  form.set('file', photo.file, photo.fileName);
  form.set('stage', photo.stage);
  form.set('caption', photo.caption);
  form.set('id', photo.id);
  let res: Response;
  try {
    res = await fetch(`/api/sessions/${photo.sessionId}/photos`, { method: 'POST', body: form, credentials: 'same-origin' });
  } catch {
    return { done: false }; // no link: the photo stays on this device
  }
  const data = (await res.json().catch(() => null)) as { seq?: number; detail?: string; field?: string } | null;
  if (res.ok) return { done: true, notice: { tone: 'ok', text: `Photo stored as #${data?.seq ?? '?'}` } };
  if (res.status === 401) return { done: false, notice: { tone: 'error', text: 'Sign in again: the photos kept on this device upload once you are signed in.' } };
  // The database or the server is coming back, or too many requests: kept, tried again shortly.
  if (res.status >= 500 || res.status === 429) return { done: false };
  const what = photo.caption ? `The photo “${photo.caption}”` : 'A photo';
  const why = data?.detail ? `${data.field && !data.detail.startsWith(data.field) ? `${data.field}: ` : ''}${data.detail}` : `refused (${res.status})`;
  return { done: true, notice: { tone: 'error', text: `${what} was not stored: ${why}` } };
}

/**
 * The field view's photos on their way to the server: each is written to IndexedDB before its upload starts, so a lost
 * link, a reload or a closed tab loses nothing; uploads go one at a time, oldest first, whenever the link is up, with
 * the photo's own id, which the server stores once however often it arrives. A refusal (not a photo, too large, the
 * session no longer live) is shown and the photo dropped, like a refused command.
 */
export function usePhotoQueue(sessionId: string, userId: string, online: boolean) {
  const [waiting, setWaiting] = useState<QueuedPhoto[]>([]);
  const [notice, setNotice] = useState<PhotoNotice | null>(null);
  const state = useRef({ running: false, again: false, stopped: false, retry: null as ReturnType<typeof setTimeout> | null });

  const refresh = useCallback(async () => setWaiting(await keptPhotos(sessionId, userId).catch(() => [])), [sessionId, userId]);

  const drain = useCallback(async () => {
    const s = state.current;
    if (s.running) {
      s.again = true;
      return;
    }
    s.running = true;
    try {
      do {
        s.again = false;
        for (const photo of await keptPhotos(sessionId, userId).catch(() => [])) {
          const outcome = await upload(photo);
          setNotice(outcome.notice ?? { tone: 'ok', text: KEPT });
          if (!outcome.done) {
            if (navigator.onLine && !s.retry && !s.stopped) s.retry = setTimeout(() => ((s.retry = null), void drain()), RETRY_MS);
            return;
          }
          await dropPhoto(photo.id);
          await refresh();
        }
      } while (s.again);
    } finally {
      s.running = false;
      await refresh();
    }
  }, [sessionId, userId, refresh]);

  useEffect(() => {
    void refresh();
  }, [refresh]);

  useEffect(() => {
    if (online) void drain();
  }, [online, drain]);

  useEffect(() => {
    const s = state.current;
    s.stopped = false;
    return () => {
      // The view is gone: no more tries from it (a drain still running finishes its upload, then schedules none).
      s.stopped = true;
      if (s.retry) clearTimeout(s.retry);
      s.retry = null;
    };
  }, []);

  /**
   * Keeps the photo on this device first, then uploads it when the link is up. When the device cannot keep it (no
   * IndexedDB, storage full) and the link is up, it is uploaded directly; offline, that failure is thrown.
   */
  const add = useCallback(
    async (file: File, stage: SessionStage, caption: string) => {
      const photo: QueuedPhoto = { id: crypto.randomUUID(), sessionId, userId, stage, caption, file, fileName: file.name || 'photo', queuedAt: Date.now() };
      try {
        await keepPhoto(photo);
      } catch (e) {
        if (!online) throw e;
        const outcome = await upload(photo);
        setNotice(outcome.done ? outcome.notice : { tone: 'error', text: 'The upload did not get through and this device could not keep the photo; try again.' });
        return;
      }
      await refresh();
      if (online) await drain();
      else setNotice({ tone: 'ok', text: KEPT });
    },
    [sessionId, userId, online, refresh, drain],
  );

  return { waiting, notice, add };
}
