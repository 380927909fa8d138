import { listEventsBySession } from '@/db/queries/events';
import { loadSessionFor } from '@/lib/session/service';
import { sessionRoom } from '../contract';
import { defineHandler } from './define';

/** Joins a session's room (own organisation only) and returns the events after `afterSeq` to catch up. */
export const sessionJoinHandler = defineHandler('session:join', async ({ socket, deps }, { sessionId, afterSeq }) => {
  await loadSessionFor(deps.db, socket.data.actor, sessionId);
  await socket.join(sessionRoom(sessionId));
  const events = await listEventsBySession(deps.db, { sessionId, afterSeq });
  return { events };
});

export const sessionLeaveHandler = defineHandler('session:leave', async ({ socket }, { sessionId }) => {
  await socket.leave(sessionRoom(sessionId));
  return {} as Record<string, never>;
});
