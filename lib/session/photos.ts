import type { Db } from '@/db/client';
import { appendChecked } from '@/db/queries/events';
import { getSessionEventById } from '@/db/queries/sessions';
import type { Actor } from '@/lib/auth/actor';
import { AppError } from '@/lib/errors';
import { broadcast } from '@/lib/realtime/bus';
import { checkUpload, getObject, MAX_UPLOAD_BYTES, putObject, type UploadType } from '@/lib/storage';
import type { PhotoAttachedPayload, SessionEvent } from './events';
import { accessForCommand, accessSession, assertLive } from './service';
import type { SessionStage } from './stages';

/** What a photo may be: images only (a certificate's PDF is not a photo). */
export const PHOTO_TYPES = ['image/png', 'image/jpeg', 'image/webp'] as const satisfies readonly UploadType[];
export type PhotoType = (typeof PHOTO_TYPES)[number];

/** Long side of a thumbnail, px (WebP). */
export const THUMB_PX = 320;

/** Checks a photo by its bytes: not empty, at most 10 MB, PNG, JPEG or WebP. A 400 naming `field` otherwise. */
export async function checkPhoto(bytes: Uint8Array, field = 'file'): Promise<PhotoType> {
  const type = await checkUpload(bytes, field);
  if (!(PHOTO_TYPES as readonly string[]).includes(type)) {
    throw new AppError('bad_request:upload', `${field}: must be a PNG, JPEG or WebP photo (found ${type})`, field);
  }
  return type as PhotoType;
}

/** A 320 px WebP thumbnail, turned upright by its EXIF orientation; a 400 naming `field` when the image cannot be read. */
export async function makeThumbnail(bytes: Uint8Array, field = 'file'): Promise<Uint8Array> {
  const { default: sharp } = await import('sharp');
  try {
    const out = await sharp(bytes, { limitInputPixels: 100_000_000 })
      .rotate()
      .resize(THUMB_PX, THUMB_PX, { fit: 'inside', withoutEnlargement: true })
      .webp({ quality: 75 })
      .toBuffer();
    return new Uint8Array(out);
  } catch {
    throw new AppError('bad_request:upload', `${field}: the image could not be read (damaged or cut short)`, field);
  }
}

export type PhotoUpload = { id: string; sessionId: string; stage: SessionStage; caption: string; bytes: Uint8Array };

/**
 * Attaches a photo to a session (the technician, while it is live): checks the content, stores the image and its
 * thumbnail under random keys, then appends `photo:attached` and broadcasts it after the commit. A resent id answers
 * the stored event and stores nothing more.
 */
export async function attachPhoto(db: Db, actor: Actor, upload: PhotoUpload): Promise<{ event: SessionEvent; duplicate: boolean }> {
  const type = await checkPhoto(upload.bytes);
  const access = await accessForCommand(db, actor, upload.sessionId, 'photo:attach');
  const stored = await getSessionEventById(db, { sessionId: upload.sessionId, id: upload.id });
  if (stored) {
    if (stored.type !== 'photo:attached') throw new AppError('conflict:event', 'That event id is already used by another event', 'id');
    return { event: stored, duplicate: true };
  }
  assertLive(access.session); // before anything is stored; checked again under the lock
  const thumb = await makeThumbnail(upload.bytes);
  const folder = `sessions/${upload.sessionId}/photos`;
  const key = await putObject(folder, upload.bytes, type);
  const thumbKey = await putObject(folder, thumb, 'image/webp');
  const result = await appendChecked(db, { sessionId: upload.sessionId, id: upload.id, type: 'photo:attached' }, async (_tx, head) => {
    assertLive(head);
    const payload: PhotoAttachedPayload = {
      photoId: upload.id,
      stage: upload.stage,
      caption: upload.caption,
      contentType: type,
      bytes: upload.bytes.byteLength,
      key,
      thumbKey,
    };
    return { sessionId: upload.sessionId, id: upload.id, type: 'photo:attached', payload, actorId: actor.id, actorRole: actor.role, clientTs: null };
  });
  if (!result.duplicate) broadcast(result.event);
  return result;
}

/** A photo's bytes and type, full size or thumbnail, for anyone who may see the session; 404 when absent. */
export async function readPhoto(db: Db, actor: Actor, { sessionId, photoId, size }: { sessionId: string; photoId: string; size: 'thumb' | 'full' }) {
  await accessSession(db, actor, sessionId);
  const event = await getSessionEventById(db, { sessionId, id: photoId });
  if (!event || event.type !== 'photo:attached') throw new AppError('not_found:photo', 'No such photo in this session');
  const photo = event.payload as PhotoAttachedPayload;
  const thumb = size === 'thumb' && photo.thumbKey !== null;
  const bytes = await getObject(thumb ? photo.thumbKey! : photo.key);
  return { bytes, contentType: thumb ? 'image/webp' : photo.contentType };
}

export { MAX_UPLOAD_BYTES };
