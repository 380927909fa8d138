'use client';

import { useEffect, useMemo, useRef, useState, type FormEvent } from 'react';
import type { QueuedPhoto } from '@/components/session/outbox';
import type { PhotoState } from '@/lib/session/fold';
import { STAGE_GUIDES, type SessionStage } from '@/lib/session/stages';
import { Button } from '@/components/ui/button';
import type { usePhotoQueue } from './use-photo-queue';

type Props = {
  sessionId: string;
  stage: SessionStage;
  photos: PhotoState[];
  /** The photos kept on this device until the server has them (usePhotoQueue, held by the field view). */
  queue: ReturnType<typeof usePhotoQueue>;
  online: boolean;
  disabled: boolean;
};

const photoUrl = (sessionId: string, photoId: string, size: 'thumb' | 'full') => `/api/sessions/${sessionId}/photos/${photoId}?size=${size}`;

/** Object URLs for the kept photos' images, revoked when the list changes or the panel goes. */
function useLocalUrls(photos: QueuedPhoto[]): Map<string, string> {
  const urls = useMemo(() => new Map(photos.map((p) => [p.id, URL.createObjectURL(p.file)])), [photos]);
  useEffect(() => () => urls.forEach((u) => URL.revokeObjectURL(u)), [urls]);
  return urls;
}

/**
 * Photos of the current stage (bubble, decal, pads, indicator), taken with the phone's camera. Each is kept on this
 * device first and uploaded when the link is up, so a photo taken without a network is not lost.
 */
export function PhotoPanel({ sessionId, stage, photos, queue, online, disabled }: Props) {
  const [caption, setCaption] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const fileRef = useRef<HTMLInputElement>(null);
  const localUrls = useLocalUrls(queue.waiting);

  async function attach(e: FormEvent) {
    e.preventDefault();
    setProblem(null);
    const file = fileRef.current?.files?.[0];
    if (!file) return setProblem('file: take or choose a photo first');
    setBusy(true);
    try {
      await queue.add(file, stage, caption.trim());
      setCaption('');
      if (fileRef.current) fileRef.current.value = '';
    } catch {
      setProblem('There is no link and this device could not keep the photo (its storage may be full); nothing was stored.');
    } finally {
      setBusy(false);
    }
  }

  const status = problem ? { tone: 'error' as const, text: problem } : queue.notice;
  const ordered = [...photos].sort((a, b) => Number(b.stage === stage) - Number(a.stage === stage) || b.seq - a.seq);
  return (
    <section aria-labelledby="photos-h" className="grid grid-cols-[minmax(0,1fr)] gap-3 rounded-2xl border-2 border-rule bg-card p-4">
      <h2 id="photos-h" className="text-xl font-bold">
        Photos
      </h2>
      {!online && <p className="rounded-lg bg-steel p-2 text-paper">Offline: a photo you attach is kept on this device and uploaded when the link is back.</p>}
      <form onSubmit={attach} noValidate className="grid gap-2">
        <label className="grid gap-1 font-semibold">
          Photo for {STAGE_GUIDES[stage].title}
          <input ref={fileRef} type="file" name="file" accept="image/*" capture="environment" className="min-h-12 w-full min-w-0 text-base file:mr-3 file:min-h-12 file:rounded-lg file:border-2 file:border-ink file:bg-card file:px-3 file:font-semibold" />
        </label>
        <label className="grid gap-1 font-semibold">
          Caption
          <input name="caption" value={caption} onChange={(e) => setCaption(e.target.value)} placeholder="e.g. bubble at the front station" className="min-h-12 rounded-lg border-2 border-ink px-3 text-lg" />
        </label>
        <Button type="submit" tone="plain" disabled={busy || disabled}>
          {busy ? 'Attaching…' : 'Attach photo'}
        </Button>
        {status && (
          <p role={status.tone === 'error' ? 'alert' : 'status'} className={`font-semibold ${status.tone === 'error' ? 'text-fail' : 'text-pass'}`}>
            {status.text}
          </p>
        )}
      </form>
      {queue.waiting.length > 0 && (
        <div className="grid gap-1">
          <h3 className="font-semibold">
            Waiting to upload ({queue.waiting.length}){online ? '' : ': no link'}
          </h3>
          <ul className="grid grid-cols-3 gap-2">
            {queue.waiting.map((p) => (
              <li key={p.id} data-testid="photo-waiting" className="opacity-80">
                {/* eslint-disable-next-line @next/next/no-img-element -- the image as kept on this device, not yet on the server */}
                <img src={localUrls.get(p.id)} alt={p.caption || `Photo waiting to upload, ${STAGE_GUIDES[p.stage].title}`} className="aspect-square w-full rounded-lg border-2 border-dashed border-ink object-cover" />
                <span className="block truncate text-sm">… {p.caption || STAGE_GUIDES[p.stage].title}</span>
              </li>
            ))}
          </ul>
        </div>
      )}
      {ordered.length > 0 && (
        <ul className="grid grid-cols-3 gap-2">
          {ordered.map((p) => (
            <li key={p.photoId} data-testid="photo">
              <a href={photoUrl(sessionId, p.photoId, 'full')} target="_blank" rel="noreferrer" className="block">
                {/* eslint-disable-next-line @next/next/no-img-element -- thumbnails come from our own route, sized there */}
                <img src={photoUrl(sessionId, p.photoId, 'thumb')} alt={p.caption || `Photo, ${STAGE_GUIDES[p.stage].title}`} className="aspect-square w-full rounded-lg border-2 border-rule object-cover" loading="lazy" />
                <span className="block truncate text-sm">{p.caption || STAGE_GUIDES[p.stage].title}</span>
              </a>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
