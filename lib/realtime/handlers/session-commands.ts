import type { Db } from '@/db/client';
import type { Actor } from '@/lib/auth/actor';
import { answerMove, endSession, enterStage, markCheck, postNote, recordReading, sendMove } from '@/lib/session/service';
import type { SessionEvent } from '@/lib/session/events';
import type { AppendingCommand } from '../contract';
import { defineHandler } from './define';

type Run<C> = (db: Db, actor: Actor, cmd: C) => Promise<{ event: SessionEvent; duplicate: boolean }>;

/** A command that appends one event: run by the session service, acknowledged with the seq after the commit. */
function appending<N extends AppendingCommand>(name: N, run: Run<never>) {
  return defineHandler(name, async ({ socket, deps }, cmd) => {
    const { event, duplicate } = await (run as Run<typeof cmd>)(deps.db, socket.data.actor, cmd);
    return { seq: event.seq, duplicate };
  });
}

export const sessionCommandHandlers = [
  appending('reading:submit', recordReading),
  appending('stage:enter', enterStage),
  appending('check:mark', markCheck),
  appending('move:send', sendMove),
  appending('move:answer', answerMove),
  appending('note:post', postNote),
  appending('session:end', endSession),
];
