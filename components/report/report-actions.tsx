'use client';

import { useMutation, useQuery } from '@tanstack/react-query';
import { apiFetch } from '@/components/session/api';
import type { SessionStatus } from '@/lib/session/fold';

type Recipient = { name: string; email: string };
type Sent = { to: Recipient; expiresAt: string; fileName: string };

const stateWords: Record<SessionStatus, string> = { live: 'live', ended: 'ended', in_review: 'in review', returned: 'returned', approved: 'approved' };

/**
 * The report's actions: download the PDF (once the session has ended), and for reviewers and admins, once the record
 * is approved, e-mail it to the customer's contact with a read-only link; after sending, the address and the link's expiry.
 */
export function ReportActions({ sessionId, status, canSend }: { sessionId: string; status: SessionStatus; canSend: boolean }) {
  const approved = status === 'approved';
  const recipient = useQuery({
    queryKey: ['report-recipient', sessionId],
    queryFn: () => apiFetch<{ recipient: Recipient | null; linkDays: number }>(`/api/sessions/${sessionId}/report/send`),
    enabled: canSend && approved,
  });
  const send = useMutation({
    mutationFn: () => apiFetch<{ sent: Sent }>(`/api/sessions/${sessionId}/report/send`, { method: 'POST', body: {} }),
  });
  const to = recipient.data?.recipient ?? null;

  return (
    <section aria-label="Report" data-testid="report-actions" className="flex flex-wrap items-center gap-3">
      {status === 'live' ? (
        <span className="text-sm text-ink-soft">The report is made once the session has ended.</span>
      ) : (
        <a
          href={`/api/sessions/${sessionId}/report`}
          target="_blank"
          rel="noreferrer"
          className="inline-flex min-h-12 items-center rounded-lg border-2 border-ink bg-card px-5 text-lg font-semibold hover:bg-paper"
          data-testid="report-download"
        >
          Download PDF{approved ? '' : ' (draft)'}
        </a>
      )}
      {canSend && !approved && status !== 'live' && <span className="text-sm text-ink-soft">The record is {stateWords[status]}: it can be e-mailed to the customer once approved.</span>}
      {canSend && approved && (
        <>
          {recipient.isPending && <span className="text-sm text-ink-soft">Finding the customer’s contact…</span>}
          {recipient.isSuccess && !to && <span role="alert" className="text-sm font-semibold text-fail">No contact of the customer has an e-mail address; add one on the customer’s page.</span>}
          {to && !send.isSuccess && (
            <button
              type="button"
              onClick={() => send.mutate()}
              disabled={send.isPending}
              data-testid="report-send"
              className="inline-flex min-h-12 items-center rounded-lg bg-spirit px-5 text-lg font-semibold text-white hover:bg-spirit-deep disabled:bg-ink-soft/40"
            >
              {send.isPending ? 'Sending…' : `E-mail the report to ${to.name || to.email}`}
            </button>
          )}
          {to && !send.isSuccess && (
            <span className="text-sm text-ink-soft">
              {to.email} · with a read-only link for {recipient.data?.linkDays} days
            </span>
          )}
          {send.isSuccess && (
            <span role="status" data-testid="report-sent" className="rounded-lg bg-pass/10 px-3 py-2 text-sm">
              Sent to <b>{send.data.sent.to.name}</b> &lt;{send.data.sent.to.email}&gt;; the link works until{' '}
              <b>{new Date(send.data.sent.expiresAt).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short' })}</b>.
            </span>
          )}
          {(send.error || recipient.error) && (
            <span role="alert" className="text-sm font-semibold text-fail">
              {(send.error ?? recipient.error)!.message}
            </span>
          )}
        </>
      )}
    </section>
  );
}
