import { db } from '@/db/client';
import { requireActor } from '@/lib/auth/session';
import { parseWith, route } from '@/lib/http';
import { pdfResponse } from '@/lib/report/http';
import { reportForReader } from '@/lib/report/service';
import { sessionParams } from '../schema';
import { reportQuery } from './schema';

type Ctx = { params: Promise<{ id: string }> };

/**
 * The session's service report as a PDF, for anyone who may read the session, in the reader's units (or
 * `?units=`). A live session has none yet (409 naming its state); before approval it says "not yet approved".
 */
export const GET = route<Ctx>('report', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(sessionParams, await params, 'report');
  const { units } = parseWith(reportQuery, Object.fromEntries(new URL(req.url).searchParams), 'report');
  return pdfResponse(await reportForReader(db(), actor, id, { units }));
});
