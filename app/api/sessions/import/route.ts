import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { importSessionFile } from '@/db/queries/transfer';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { AppError, nulCharacterError, problem } from '@/lib/errors';
import { cappedText, parseWith, route } from '@/lib/http';
import { checkSessionFile } from '@/lib/session/transfer';
import { importQuery } from './schema';

/** Largest file accepted: a 20,000-event session exports to a few MB. */
const MAX_BYTES = 20 * 1024 * 1024;

/**
 * Imports a session's export file (the JSON body, as GET /api/sessions/:id/export gives it; `?machineId=` to file it
 * under another machine of the organisation). Admins only. The file's shape is checked (400 naming the path), then its
 * hash chain (400 naming the first bad event: `brokenEvent` {seq, type, reason}); a good file is stored unchanged in
 * one transaction (db/queries/transfer importSessionFile says how machine, technician and participants are chosen).
 */
export const POST = route('import', async (req) => {
  const actor = await requireActor();
  // The role is known without the database: refuse before reading up to 20 MB from someone who may not import.
  assertCan(actor, 'session:import');
  const { machineId } = parseWith(importQuery, Object.fromEntries(new URL(req.url).searchParams), 'import');
  const text = await cappedText(req, MAX_BYTES, 'import');
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch {
    throw new AppError('bad_request:import', 'file: not JSON (choose a session file Levelwire exported as JSON)', 'file');
  }
  const checked = checkSessionFile(raw);
  if (!checked.ok) {
    const err = new AppError('bad_request:import', checked.problem.message, checked.problem.field);
    const extra = checked.problem.brokenEvent ? { brokenEvent: checked.problem.brokenEvent } : {};
    return NextResponse.json({ ...problem(err), ...extra }, { status: 400, headers: { 'content-type': 'application/problem+json' } });
  }
  // The file is stored as it is: a NUL character anywhere (a crafted file can keep its chain whole) cannot be.
  const nul = nulCharacterError(checked.file, 'import');
  if (nul) throw nul;
  const session = await importSessionFile(db(), {
    organisationId: actor.organisationId,
    importerId: actor.id,
    machineId: machineId ?? null,
    file: checked.file,
    state: checked.state,
    head: checked.head,
  });
  return NextResponse.json({ session, verdict: { ok: true, count: checked.count, head: checked.head.hash }, replayUrl: `/sessions/${session.id}/replay` }, { status: 201 });
});
