import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { getSessionForExport } from '@/db/queries/transfer';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { parseWith, route } from '@/lib/http';
import type { SessionOpenedPayload } from '@/lib/session/events';
import { accessSession } from '@/lib/session/service';
import { exportFilename, readingsCsv, sessionFileOf } from '@/lib/session/transfer';
import { sessionParams } from '../schema';
import { exportQuery } from './schema';

type Ctx = { params: Promise<{ id: string }> };

/**
 * The session's record as a file, for anyone who may read the session: `?format=json` (default) the whole event log
 * with a header (import verifies it with the hash chain), `?format=csv` one row per reading.
 */
export const GET = route<Ctx>('session', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(sessionParams, await params, 'session');
  const { format } = parseWith(exportQuery, Object.fromEntries(new URL(req.url).searchParams), 'session');
  await accessSession(db(), actor, id);
  const found = await getSessionForExport(db(), { sessionId: id, organisationId: actor.organisationId });
  if (!found) throw new AppError('not_found:session', 'No such session');
  const { session, events } = found;
  const opened = events[0]?.type === 'session:opened' ? (events[0].payload as SessionOpenedPayload) : null;
  const filename = exportFilename({ serial: session.serial, openedAt: events[0]?.serverTs ?? null, sessionId: id }, format);
  const headers = { 'content-disposition': `attachment; filename="${filename}"`, 'cache-control': 'private, no-store' };
  if (format === 'csv') return new Response(readingsCsv(events), { headers: { ...headers, 'content-type': 'text/csv; charset=utf-8' } });
  const file = sessionFileOf(
    { id, state: session.state, machine: { id: session.machineId, label: opened?.machineLabel ?? null, model: session.model, serial: session.serial } },
    events,
    new Date(),
  );
  return NextResponse.json(file, { headers });
});
