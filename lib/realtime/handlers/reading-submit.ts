import { recordReading } from '@/lib/session/service';
import { defineHandler } from './define';

/** A technician's reading: validated, authorised, stored, acknowledged with its seq; broadcast by the service. */
export const readingSubmitHandler = defineHandler('reading:submit', async ({ socket, deps }, cmd) => {
  const { event, duplicate } = await recordReading(deps.db, socket.data.actor, cmd);
  return { seq: event.seq, duplicate };
});
