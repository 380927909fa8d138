import { db } from '@/db/client';
import { requireActor } from '@/lib/auth/session';
import { parseWith, route } from '@/lib/http';
import { readPhoto } from '@/lib/session/photos';
import { photoParams, photoQuery } from '../../schema';

type Ctx = { params: Promise<{ id: string; photoId: string }> };

/** A photo's bytes (`?size=thumb` for the 320 px WebP), with the type it was stored as; never sniffed, never scripted. */
export const GET = route<Ctx>('photo', async (req, { params }) => {
  const actor = await requireActor();
  const { id, photoId } = parseWith(photoParams, await params, 'photo');
  const { size } = parseWith(photoQuery, Object.fromEntries(new URL(req.url).searchParams), 'photo');
  const photo = await readPhoto(db(), actor, { sessionId: id, photoId, size });
  return new Response(Buffer.from(photo.bytes), {
    status: 200,
    headers: {
      'content-type': photo.contentType,
      'content-length': String(photo.bytes.byteLength),
      // Shown in <img> and opened in a tab as a picture; nosniff and the sandbox keep it from ever being a page.
      'content-disposition': 'inline',
      'x-content-type-options': 'nosniff',
      'content-security-policy': "default-src 'none'; sandbox",
      // A photo never changes under its id; only the signed-in browser keeps it.
      'cache-control': 'private, max-age=86400',
    },
  });
});
