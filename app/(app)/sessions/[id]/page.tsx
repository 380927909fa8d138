import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound, redirect } from 'next/navigation';
import { z } from 'zod';
import { db } from '@/db/client';
import { requirePageActor } from '@/lib/auth/session';
import { can } from '@/lib/auth/policy';
import { AppError } from '@/lib/errors';
import { loadSessionFor } from '@/lib/session/service';
import { StatusChip } from '@/components/review/record-status';
import { LocalTime } from '@/components/ui/local-time';

export const metadata: Metadata = { title: 'Session' };

/**
 * A live session sends each participant to their own view: the technician to the field view, everyone else to the
 * coach view. A finished one (ended, in review, returned, approved) shows where its record stands and offers the
 * replay; a returned one is marked for its technician, who takes it up again from the field view.
 */
export default async function SessionPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePageActor(`/sessions/${id}`);
  if (!z.uuid().safeParse(id).success) notFound();
  let access: Awaited<ReturnType<typeof loadSessionFor>>;
  try {
    access = await loadSessionFor(db(), actor, id);
  } catch (e) {
    if (e instanceof AppError && e.status === 404) notFound();
    if (e instanceof AppError && e.status === 403) return <NotTakingPart />;
    throw e;
  }
  const own = access.standing === 'technician' ? `/sessions/${id}/field` : `/sessions/${id}/coach`;
  const { state, machine } = access;
  if (state === 'live' || state === 'planned') redirect(own);
  const returnedToMe = state === 'returned' && access.standing === 'technician';
  const reviews = can(actor, 'session:review') && access.standing === 'reader';
  return (
    <main className="mx-auto grid max-w-xl grid-cols-[minmax(0,1fr)] gap-4 p-6">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h1 className="text-2xl font-bold">Session record</h1>
        <StatusChip status={state} />
      </div>
      <p>
        <b>
          {machine.model} · {machine.serial}
        </b>
        <span className="block text-ink-soft">
          {machine.site.customer.name} · {machine.site.name} · technician: {access.technician.name} · opened <LocalTime iso={access.createdAt.toISOString()} />
        </span>
      </p>
      {returnedToMe && (
        <p role="alert" data-testid="returned-marker" className="rounded-xl border-4 border-fail bg-fail/5 p-4 text-lg font-bold">
          The reviewer returned this session for rework. The field view shows why; take it up again there.
        </p>
      )}
      {state === 'ended' && <p>The session has ended; its record waits for review.</p>}
      {state === 'in_review' && <p>The record is in review.</p>}
      {state === 'approved' && <p>The record is approved.</p>}
      {state === 'returned' && !returnedToMe && <p>The record was returned for rework; its technician takes it up again.</p>}
      <div className="flex flex-wrap gap-2">
        <Link href={`/sessions/${id}/replay`} className="inline-flex min-h-12 items-center rounded-lg bg-spirit px-5 text-lg font-semibold text-white hover:bg-spirit-deep">
          {reviews && (state === 'ended' || state === 'in_review') ? 'Replay and review' : 'Replay'}
        </Link>
        <Link
          href={own}
          className={`inline-flex min-h-12 items-center rounded-lg px-5 text-lg font-semibold ${returnedToMe ? 'bg-fail text-white' : 'border-2 border-ink bg-card hover:bg-paper'}`}
        >
          {returnedToMe ? 'Open the field view to take it up again' : access.standing === 'technician' ? 'Field view' : 'Coach view'}
        </Link>
      </div>
    </main>
  );
}

function NotTakingPart() {
  return (
    <main className="mx-auto grid max-w-xl grid-cols-[minmax(0,1fr)] gap-4 p-6">
      <h1 className="text-2xl font-bold">You do not take part in this session</h1>
      <p>
        Only the session’s technician, experts and observers see it, and the organisation’s reviewers and admins. Ask its technician to
        add you as an expert or an observer.
      </p>
      <Link href="/" className="font-semibold text-spirit underline underline-offset-4">
        Back to the start page
      </Link>
    </main>
  );
}
