import { NextResponse } from 'next/server';
import * as z from 'zod/mini';
import { db } from '@/db/client';
import { requireActor } from '@/lib/auth/session';
import { jsonBody, parseWith, route } from '@/lib/http';
import { reviewApprove, reviewComment, reviewReturn } from '@/lib/session/commands';
import { approveRecord, commentOnRecord, returnRecord } from '@/lib/session/service';
import { sessionParams } from '../schema';

type Ctx = { params: Promise<{ id: string }> };

/** One body per review act, told apart by `kind`; each is the command without its session id (that is the path's). */
const body = z.discriminatedUnion(
  'kind',
  [
    z.extend(z.omit(reviewComment, { sessionId: true }), { kind: z.literal('comment') }),
    z.extend(z.omit(reviewReturn, { sessionId: true }), { kind: z.literal('return') }),
    z.extend(z.omit(reviewApprove, { sessionId: true }), { kind: z.literal('approve') }),
  ],
  { error: 'must be "comment", "return" or "approve"' },
);
export type ReviewPostBody = z.input<typeof body>;

/**
 * A reviewer's act on an ended session's record: a comment pinned to a moment, a return for rework with reasons, or
 * the approval with a typed name and a drawn signature. Each is an event in the log (idempotent by its id).
 */
export const POST = route<Ctx>('review', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(sessionParams, await params, 'review');
  const cmd = parseWith(body, await jsonBody(req, 'review'), 'review');
  const { event, duplicate } =
    cmd.kind === 'comment'
      ? await commentOnRecord(db(), actor, { ...cmd, sessionId: id })
      : cmd.kind === 'return'
        ? await returnRecord(db(), actor, { ...cmd, sessionId: id })
        : await approveRecord(db(), actor, { ...cmd, sessionId: id });
  return NextResponse.json({ seq: event.seq, duplicate, event }, { status: duplicate ? 200 : 201 });
});
