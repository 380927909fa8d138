'use client';

import { useRef, useState, type FormEvent } from 'react';
import type { PhotoState } from '@/lib/session/fold';
import { STAGE_GUIDES, type SessionStage } from '@/lib/session/stages';
import { Button } from '@/components/ui/button';

type Props = { sessionId: string; stage: SessionStage; photos: PhotoState[]; online: boolean; disabled: boolean };

const photoUrl = (sessionId: string, photoId: string, size: 'thumb' | 'full') => `/api/sessions/${sessionId}/photos/${photoId}?size=${size}`;

/**
 * Photos of the current stage (bubble, decal, pads, indicator): taken with the phone's camera and uploaded at once.
 * They are not queued offline: a photo is only kept once the server has it.
 */
export function PhotoPanel({ sessionId, stage, photos, online, disabled }: Props) {
  const [caption, setCaption] = useState('');
  const [status, setStatus] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  const fileRef = useRef<HTMLInputElement>(null);

  async function upload(e: FormEvent) {
    e.preventDefault();
    setStatus(null);
    const file = fileRef.current?.files?.[0];
    if (!file) return setStatus({ tone: 'error', text: 'file: take or choose a photo first' });
    const form = new FormData();
    form.set('file', file);
    form.set('stage', stage);
    form.set('caption', caption.trim());
    form.set('id', crypto.randomUUID());
    setBusy(true);
    try {
      const res = await fetch(`/api/sessions/${sessionId}/photos`, { method: 'POST', body: form, credentials: 'same-origin' });
      const data = (await res.json().catch(() => null)) as { seq?: number; detail?: string; field?: string } | null;
      if (!res.ok) {
        setStatus({ tone: 'error', text: data?.detail ? `${data.field && !data.detail.startsWith(data.field) ? `${data.field}: ` : ''}${data.detail}` : `Upload refused (${res.status})` });
        return;
      }
      setStatus({ tone: 'ok', text: `Photo stored as #${data?.seq ?? '?'}` });
      setCaption('');
      if (fileRef.current) fileRef.current.value = '';
    } catch {
      setStatus({ tone: 'error', text: 'The upload did not get through; the photo was not kept. Try again when the link is back.' });
    } finally {
      setBusy(false);
    }
  }

  const ordered = [...photos].sort((a, b) => Number(b.stage === stage) - Number(a.stage === stage) || b.seq - a.seq);
  return (
    <section aria-labelledby="photos-h" className="grid grid-cols-[minmax(0,1fr)] gap-3 rounded-2xl border-2 border-rule bg-card p-4">
      <h2 id="photos-h" className="text-xl font-bold">
        Photos
      </h2>
      {!online && <p className="rounded-lg bg-steel p-2 text-paper">Offline: photos are not kept on this device. Take them when the link is back.</p>}
      <form onSubmit={upload} noValidate className="grid gap-2">
        <label className="grid gap-1 font-semibold">
          Photo for {STAGE_GUIDES[stage].title}
          <input ref={fileRef} type="file" name="file" accept="image/*" capture="environment" className="min-h-12 w-full min-w-0 text-base file:mr-3 file:min-h-12 file:rounded-lg file:border-2 file:border-ink file:bg-card file:px-3 file:font-semibold" />
        </label>
        <label className="grid gap-1 font-semibold">
          Caption
          <input name="caption" value={caption} onChange={(e) => setCaption(e.target.value)} placeholder="e.g. bubble at the front station" className="min-h-12 rounded-lg border-2 border-ink px-3 text-lg" />
        </label>
        <Button type="submit" tone="plain" disabled={busy || disabled || !online}>
          {busy ? 'Uploading…' : 'Attach photo'}
        </Button>
        {status && (
          <p role={status.tone === 'error' ? 'alert' : 'status'} className={`font-semibold ${status.tone === 'error' ? 'text-fail' : 'text-pass'}`}>
            {status.text}
          </p>
        )}
      </form>
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
