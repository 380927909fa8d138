import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { cappedForm, parseWith, route } from '@/lib/http';
import { attachPhoto, MAX_UPLOAD_BYTES } from '@/lib/session/photos';
import { photoFields, sessionParams } from '../schema';

type Ctx = { params: Promise<{ id: string }> };

/** The multipart body: the `file` and the text fields; a 400 naming the field otherwise. Oversize bodies are refused unread. */
async function photoForm(req: Request) {
  const form = await cappedForm(req, MAX_UPLOAD_BYTES, 'upload');
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
