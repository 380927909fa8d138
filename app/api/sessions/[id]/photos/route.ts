import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { parseWith, route } from '@/lib/http';
import { attachPhoto, MAX_UPLOAD_BYTES } from '@/lib/session/photos';
import { photoFields, sessionParams } from '../schema';

type Ctx = { params: Promise<{ id: string }> };

/** Room for the multipart envelope and the text fields around a photo at the size cap. */
const ENVELOPE_BYTES = 64 * 1024;

/** The multipart body: the `file` and the text fields; a 400 naming the field otherwise. Oversize bodies are refused unread. */
async function photoForm(req: Request) {
  const length = Number(req.headers.get('content-length') ?? 0);
  if (length > MAX_UPLOAD_BYTES + ENVELOPE_BYTES) throw new AppError('bad_request:upload', `file: larger than ${MAX_UPLOAD_BYTES / 1024 / 1024} MB`, 'file');
  if (!(req.headers.get('content-type') ?? '').startsWith('multipart/form-data')) {
    throw new AppError('bad_request:upload', 'The body must be multipart/form-data with a "file" field', 'file');
  }
  const form = await req.formData().catch(() => {
    throw new AppError('bad_request:upload', 'The body must be multipart/form-data with a "file" field', 'file');
  });
  const fields = parseWith(
    photoFields,
    { id: form.get('id') ?? undefined, stage: form.get('stage') ?? undefined, caption: form.get('caption') ?? undefined },
    'photo',
  );
  const file = form.get('file');
  if (!(file instanceof File)) throw new AppError('bad_request:upload', 'file: must be a file', 'file');
  return { ...fields, bytes: new Uint8Array(await file.arrayBuffer()) };
}

/** Attaches a photo to a stage of the session (its technician): 201 when stored, 200 for a resend of the same id. */
export const POST = route<Ctx>('photo', async (req, { params }) => {
  const actor = await requireActor();
  const { id: sessionId } = parseWith(sessionParams, await params, 'photo');
  const upload = await photoForm(req);
  const { event, duplicate } = await attachPhoto(db(), actor, { ...upload, sessionId });
  return NextResponse.json({ seq: event.seq, duplicate, photoId: upload.id }, { status: duplicate ? 200 : 201 });
});
