import { notFound, redirect } from 'next/navigation';
import { z } from 'zod';
import { db } from '@/db/client';
import type { Actor } from '@/lib/auth/actor';
import { AppError } from '@/lib/errors';
import type { SessionScrew } from '@/lib/session/events';
import { loadSessionFor } from '@/lib/session/service';

/**
 * The session for a page, or the not-found page (absent, another organisation's, or not a UUID). Someone who does not
 * take part is sent to the session's own page, which says so.
 */
export async function loadSessionForPage(actor: Actor, id: string) {
  if (!z.uuid().safeParse(id).success) notFound();
  try {
    return await loadSessionFor(db(), actor, id);
  } catch (e) {
    if (e instanceof AppError && e.status === 404) notFound();
    if (e instanceof AppError && e.status === 403) redirect(`/sessions/${id}`);
    throw e;
  }
}

/** The machine's footprint now, as a session records screws: for views of sessions whose log carries none. */
export function currentFootprint(session: Awaited<ReturnType<typeof loadSessionFor>>): SessionScrew[] {
  return session.machine.screws.map((s) => ({
    id: s.id,
    label: s.label,
    kind: s.kind,
    xMm: s.xMm,
    yMm: s.yMm,
    liftPerTurnMm: s.liftPerTurnMm ?? s.pitchMm,
    specifiedHeightMm: s.specHeightMm,
  }));
}
