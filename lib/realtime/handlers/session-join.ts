import { listEventsBySession } from '@/db/queries/events';
import { accessSession } from '@/lib/session/service';
import { sessionJoined } from '../bus';
import { sessionRoom, type Presence } from '../contract';
import { defineHandler, type IoServer } from './define';

/** How long a cluster-wide lookup waits for the other processes' answers. */
const CLUSTER_LOOKUP_MS = 1_500;

/**
 * The sockets in a room across every process (with the adapter); when another process does not answer in time
 * (it just died), this process's own sockets, so a join or presence update is never held up by a dead peer.
 */
export async function roomSockets(io: IoServer, room: string) {
  try {
    return await io.in(room).timeout(CLUSTER_LOOKUP_MS).fetchSockets();
  } catch {
    return io.local.in(room).fetchSockets();
  }
}

/** Who is connected to a session's room now, one entry per user (across processes with the adapter). */
export async function presenceOf(io: IoServer, sessionId: string): Promise<Presence[]> {
  const sockets = await roomSockets(io, sessionRoom(sessionId));
  const byUser = new Map<string, Presence>();
  for (const s of sockets) {
    const { actor, connectedAt, rttMs } = s.data;
    if (!actor) continue;
    const seen = byUser.get(actor.id);
    if (!seen) byUser.set(actor.id, { userId: actor.id, name: actor.name, role: actor.role, since: connectedAt, rttMs, sockets: 1 });
    else {
      seen.sockets += 1;
      if (connectedAt < seen.since) seen.since = connectedAt;
      if (rttMs !== null && (seen.rttMs === null || rttMs < seen.rttMs)) seen.rttMs = rttMs;
    }
  }
  return [...byUser.values()].sort((a, b) => a.since.localeCompare(b.since));
}

/** Tells a session's room who is connected now. */
export async function announcePresence(io: IoServer, sessionId: string): Promise<void> {
  const presence = await presenceOf(io, sessionId);
  io.to(sessionRoom(sessionId)).emit('presence:changed', { sessionId, presence });
}

/** Joins a session's room (participants and readers of the organisation) and returns the events after `afterSeq`. */
export const sessionJoinHandler = defineHandler('session:join', async ({ socket, io, deps }, { sessionId, afterSeq }) => {
  await accessSession(deps.db, socket.data.actor, sessionId);
  await socket.join(sessionRoom(sessionId));
  if (!socket.data.sessions.includes(sessionId)) socket.data.sessions.push(sessionId);
  const events = await listEventsBySession(deps.db, { sessionId, afterSeq });
  // One look at the room: the same list goes to everyone in it and back to the joiner.
  const presence = await presenceOf(io, sessionId);
  io.to(sessionRoom(sessionId)).emit('presence:changed', { sessionId, presence });
  sessionJoined(sessionId, socket.data.actor.id);
  return { events, presence };
});

/**
 * Leaves a session's room. Answers ok for any session, but only a socket that joined it announces anything: a stranger's
 * leave must not stir presence in a room it was never in.
 */
export const sessionLeaveHandler = defineHandler('session:leave', async ({ socket, io }, { sessionId }) => {
  if (!socket.data.sessions.includes(sessionId)) return {} as Record<string, never>;
  await socket.leave(sessionRoom(sessionId));
  socket.data.sessions = socket.data.sessions.filter((s) => s !== sessionId);
  void announcePresence(io, sessionId);
  return {} as Record<string, never>;
});

/** A client's round-trip probe: answered at once; the round trip it measured last time is kept for presence. */
export const linkPingHandler = defineHandler('link:ping', async ({ socket, io }, { sessionId, rttMs }) => {
  if (rttMs !== undefined && socket.data.sessions.includes(sessionId)) {
    const changed = socket.data.rttMs === null || Math.abs(socket.data.rttMs - rttMs) > 20;
    socket.data.rttMs = rttMs;
    if (changed) void announcePresence(io, sessionId);
  }
  return { serverTs: new Date().toISOString() };
});
