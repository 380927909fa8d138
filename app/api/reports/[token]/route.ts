import { db } from '@/db/client';
import { env } from '@/lib/env';
import { AppError } from '@/lib/errors';
import { route } from '@/lib/http';
import { pdfResponse } from '@/lib/report/http';
import { verifyReportLink } from '@/lib/report/link';
import { reportForLink } from '@/lib/report/service';

type Ctx = { params: Promise<{ token: string }> };

/**
 * The read-only copy of a report behind the signed link e-mailed to the customer: no sign-in, the link is the key.
 * An expired link is a 410 saying when it expired; a changed or made-up one is a 403, never another session's report.
 */
export const GET = route<Ctx>('report_link', async (_req, { params }) => {
  const { token } = await params;
  const now = new Date();
  const check = verifyReportLink(token, env().NEXTAUTH_SECRET, now);
  if (!check.ok && check.problem === 'expired') {
    const when = check.expiredAt.toISOString().slice(0, 16).replace('T', ' ');
    throw new AppError('gone:report_link', `This report link expired on ${when} UTC; ask the service company to send the report again`);
  }
  if (!check.ok) throw new AppError('forbidden:report_link', 'This report link is not valid; check it was copied whole');
  return pdfResponse(await reportForLink(db(), check.claims, now));
});
