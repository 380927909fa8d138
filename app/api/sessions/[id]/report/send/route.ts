import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { requireActor } from '@/lib/auth/session';
import { env } from '@/lib/env';
import { AppError } from '@/lib/errors';
import { parseWith, route } from '@/lib/http';
import { reportLinkDays } from '@/lib/report/link';
import { reportRecipientFor, sendReport } from '@/lib/report/service';
import { sessionParams } from '../../schema';
import { sendReportInput } from './schema';

type Ctx = { params: Promise<{ id: string }> };

/**
 * E-mails an approved session's report to the customer's contact with a signed read-only link (reviewers and
 * admins). Answers who it went to and when the link expires; the link itself is only in the e-mail.
 */
export const POST = route<Ctx>('report', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(sessionParams, await params, 'report');
  // An empty body is fine: every field has a default.
  const text = await req.text();
  let raw: unknown = {};
  if (text.trim() !== '') {
    try {
      raw = JSON.parse(text);
    } catch {
      throw new AppError('bad_request:report', 'The body must be JSON (or empty)');
    }
  }
  const input = parseWith(sendReportInput, raw, 'report');
  const baseUrl = env().NEXTAUTH_URL ?? new URL(req.url).origin;
  const sent = await sendReport(db(), actor, id, { baseUrl, days: input.days ?? reportLinkDays(), secret: env().NEXTAUTH_SECRET });
  return NextResponse.json({ sent });
});

/** Who the report would be sent to and for how many days the link works (reviewers and admins), before sending. */
export const GET = route<Ctx>('report', async (_req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(sessionParams, await params, 'report');
  const recipient = await reportRecipientFor(db(), actor, id);
  return NextResponse.json({ recipient, linkDays: reportLinkDays() });
});
