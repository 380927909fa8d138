import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { RunRemindersButton } from '@/components/visits/run-reminders-button';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';
import { listCapturedMail, mailboxEnabled } from '@/lib/mailbox';

export const metadata: Metadata = { title: 'Mailbox' };
export const dynamic = 'force-dynamic';

/** What the loopback mail fake caught: exists only in development and tests. */
export default async function MailboxPage({ searchParams }: { searchParams: Promise<{ to?: string }> }) {
  const actor = await requirePageActor('/admin/mailbox');
  if (!mailboxEnabled()) notFound();
  if (!can(actor, 'mailbox:read')) {
    return (
      <main className="mx-auto max-w-3xl p-4 sm:p-6">
        <h1 className="text-2xl font-bold">Mailbox</h1>
        <p role="alert" className="mt-3 font-semibold text-fail">
          Only an admin may read the development mailbox.
        </p>
      </main>
    );
  }
  const { to } = await searchParams;
  const filter = to?.trim() || undefined;
  const mails = await listCapturedMail({ to: filter, limit: 100 });
  return (
    <main className="mx-auto grid max-w-5xl grid-cols-[minmax(0,1fr)] gap-4 p-4 sm:p-6">
      <div>
        <h1 className="text-2xl font-bold">Mailbox</h1>
        <p className="rounded-lg border-2 border-bubble bg-bubble/15 p-3">
          This page exists only in development and tests: it shows the e-mail Levelwire sent to its loopback mail fake, newest first. In production, mail goes to real inboxes and this
          page does not exist.
        </p>
      </div>
      <div className="flex flex-wrap items-end justify-between gap-3">
        <form method="get" className="flex flex-wrap items-end gap-2">
          <label className="grid gap-1 font-semibold">
            Only mail to
            <input
              type="search"
              name="to"
              defaultValue={filter ?? ''}
              placeholder="someone@example.test"
              className="min-h-12 w-72 max-w-full rounded-lg border-2 border-ink bg-card px-3 text-lg font-normal"
            />
          </label>
          <button type="submit" className="min-h-12 rounded-lg border-2 border-ink bg-card px-4 font-semibold hover:bg-paper">
            Filter
          </button>
        </form>
        <RunRemindersButton refresh />
      </div>
      <p className="text-ink-soft" role="status">
        {mails.length === 0 ? 'No mail caught yet.' : `${mails.length} message${mails.length === 1 ? '' : 's'}${mails.length === 100 ? ' (the newest 100)' : ''}${filter ? ` to ${filter}` : ''}.`}
      </p>
      <ol className="grid gap-3">
        {mails.map((m, i) => (
          <li key={m.id} className="rounded-xl border-2 border-rule bg-card" data-testid="mail">
            <details open={i < 5}>
              <summary className="grid min-h-12 cursor-pointer gap-1 p-3">
                <span className="font-bold">{m.subject || '(no subject)'}</span>
                <span className="flex flex-wrap gap-x-4 text-sm text-ink-soft">
                  <span>To: {m.to.join(', ')}</span>
                  <time dateTime={m.receivedAt} className="tabular">
                    {m.receivedAt.slice(0, 19).replace('T', ' ')} UTC
                  </time>
                </span>
              </summary>
              <pre className="overflow-x-auto border-t border-rule p-3 font-mono text-sm whitespace-pre-wrap">{m.text}</pre>
            </details>
          </li>
        ))}
      </ol>
    </main>
  );
}
