import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { getInstrumentForOrganisation, toInstrumentView } from '@/db/queries/instruments';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { todayUtc } from '@/lib/dates';
import { storeCertificate } from '@/lib/fleet/instruments-service';
import { cappedForm, parseWith, route } from '@/lib/http';
import { getObject, MAX_UPLOAD_BYTES } from '@/lib/storage';
import { instrumentParams } from '../../schema';

type Ctx = { params: Promise<{ id: string }> };

/** The `file` field of a multipart body; a 400 naming the problem otherwise. Oversize bodies are refused unread. */
async function uploadedFile(req: Request): Promise<File> {
  const form = await cappedForm(req, MAX_UPLOAD_BYTES, 'upload');
  const file = form.get('file');
  if (!(file instanceof File)) throw new AppError('bad_request:upload', 'file: must be a file', 'file');
  return file;
}

/** Uploads (or replaces) an instrument's calibration certificate (admin). */
export const PUT = route<Ctx>('upload', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(instrumentParams, await params, 'instrument');
  // Refuse a caller who may not upload before reading up to 10 MB from them.
  assertCan(actor, 'instrument:write');
  const file = await uploadedFile(req);
  const row = await storeCertificate(db(), { organisationId: actor.organisationId, instrumentId: id, file });
  return NextResponse.json({ instrument: toInstrumentView(row, todayUtc()) });
});

/** The certificate's bytes, always as a download (never rendered inline). */
export const GET = route<Ctx>('instrument', async (_req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(instrumentParams, await params, 'instrument');
  assertCan(actor, 'instrument:read');
  const row = await getInstrumentForOrganisation(db(), { instrumentId: id, organisationId: actor.organisationId });
  if (!row) throw new AppError('not_found:instrument', 'No such instrument');
  if (!row.certificateKey) throw new AppError('not_found:certificate', `Instrument ${row.serial} has no certificate on record`);
  const bytes = await getObject(row.certificateKey);
  return new Response(Buffer.from(bytes), {
    status: 200,
    headers: {
      'content-type': row.certificateType ?? 'application/octet-stream',
      'content-length': String(bytes.byteLength),
      'content-disposition': `attachment; filename="${(row.certificateName ?? 'certificate').replace(/["\\]/g, '')}"`,
      'x-content-type-options': 'nosniff',
      'cache-control': 'private, no-store',
      'content-security-policy': "default-src 'none'; sandbox",
    },
  });
});
