import type { Db } from '@/db/client';
import { appendEvent } from '@/db/queries/events';
import { getSessionForOrganisation, getSessionHeader } from '@/db/queries/sessions';
import type { Actor } from '@/lib/auth/actor';
import { assertCan } from '@/lib/auth/policy';
import { AppError } from '@/lib/errors';
import { readingToSlopeUrad } from '@/lib/leveling/level';
import { broadcast } from '@/lib/realtime/bus';
import type { ReadingSubmit } from './commands';
import type { SessionEvent } from './events';

/** The session if the actor may see it; 404 when it is absent or another organisation's. */
export async function loadSessionFor(db: Db, actor: Actor, sessionId: string) {
  assertCan(actor, 'session:view');
  const session = await getSessionForOrganisation(db, { sessionId, organisationId: actor.organisationId });
  if (!session) throw new AppError('not_found:session', 'No such session');
  return session;
}

/**
 * Records a level reading: checks the actor and the session, converts divisions to slope with the
 * session's level, appends the event, then broadcasts it (after the commit). Idempotent by command id.
 */
export async function recordReading(db: Db, actor: Actor, cmd: ReadingSubmit): Promise<{ event: SessionEvent; duplicate: boolean }> {
  assertCan(actor, 'session:view');
  const session = await getSessionHeader(db, { sessionId: cmd.sessionId, organisationId: actor.organisationId });
  if (!session) throw new AppError('not_found:session', 'No such session');
  assertCan(actor, 'reading:submit');
  if (session.technicianId !== actor.id) {
    throw new AppError('forbidden:reading', 'Only the session’s technician records readings');
  }
  if (session.state !== 'live') throw new AppError('conflict:session', `The session is ${session.state}, not live`);
  const { reading } = cmd;
  const result = await appendEvent(db, {
    sessionId: session.id,
    id: cmd.id,
    type: 'reading:recorded',
    payload: { ...reading, slopeUrad: readingToSlopeUrad(reading.divisions, session.levelDivisionUrad) },
    actorId: actor.id,
    actorRole: actor.role,
    clientTs: cmd.clientTs ?? null,
  });
  if (!result.duplicate) broadcast(result.event);
  return result;
}
