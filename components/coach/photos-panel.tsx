'use client';

import { useRef, useState } from 'react';
import type { PhotoState } from '@/lib/session/fold';
import { STAGE_GUIDES } from '@/lib/session/stages';
import { clock } from './format';

/** The technician's photos as thumbnails; a click shows the full photo. */
export function PhotosPanel({ sessionId, photos }: { sessionId: string; photos: PhotoState[] }) {
  const dialog = useRef<HTMLDialogElement>(null);
  const [open, setOpen] = useState<PhotoState | null>(null);
  const src = (p: PhotoState, size?: 'thumb') => `/api/sessions/${sessionId}/photos/${p.photoId}${size ? `?size=${size}` : ''}`;
  return (
    <section aria-labelledby="photos-h" className="grid content-start gap-2 self-start rounded-2xl border-2 border-rule bg-card p-3 text-sm">
      <h2 id="photos-h" className="text-lg font-bold">
        Photos
      </h2>
      {photos.length === 0 ? (
        <p className="text-ink-soft">No photos yet.</p>
      ) : (
        <ul className="grid grid-cols-3 gap-2 xl:grid-cols-4">
          {photos.map((p) => (
            <li key={p.photoId} data-testid="photo">
              <button
                type="button"
                className="grid w-full gap-1 rounded-lg text-left hover:bg-paper"
                onClick={() => {
                  setOpen(p);
                  dialog.current?.showModal();
                }}
              >
                <img src={src(p, 'thumb')} alt={p.caption || `Photo at ${STAGE_GUIDES[p.stage].title}`} className="aspect-square w-full rounded object-cover" loading="lazy" />
                <span className="truncate text-xs">
                  <b>{STAGE_GUIDES[p.stage].title}</b> · {clock(p.at).slice(0, 5)}
                </span>
                {p.caption && <span className="truncate text-xs text-ink-soft">{p.caption}</span>}
              </button>
            </li>
          ))}
        </ul>
      )}
      <dialog ref={dialog} className="m-auto max-h-[90vh] max-w-[90vw] rounded-xl p-3 backdrop:bg-ink/60" onClose={() => setOpen(null)}>
        {open && (
          <figure className="grid gap-2">
            <img src={src(open)} alt={open.caption || 'Photo'} className="max-h-[75vh] max-w-full object-contain" />
            <figcaption className="flex items-center justify-between gap-4">
              <span>
                <b>{STAGE_GUIDES[open.stage].title}</b> · {clock(open.at)} {open.caption && `· ${open.caption}`}
              </span>
              <button type="button" className="min-h-10 rounded-lg border-2 border-ink px-4 font-semibold" onClick={() => dialog.current?.close()}>
                Close
              </button>
            </figcaption>
          </figure>
        )}
      </dialog>
    </section>
  );
}
