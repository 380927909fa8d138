import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound, redirect } from 'next/navigation';
import { z } from 'zod';
import { db } from '@/db/client';
import { requirePageActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { accessSession, type SessionAccess } from '@/lib/session/service';

export const metadata: Metadata = { title: 'Session' };

/** Sends each participant to their own view: the technician to the field view, everyone else to the coach view. */
export default async function SessionPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePageActor(`/sessions/${id}`);
  if (!z.uuid().safeParse(id).success) notFound();
  let access: SessionAccess;
  try {
    access = await accessSession(db(), actor, id);
  } catch (e) {
    if (e instanceof AppError && e.status === 404) notFound();
    if (e instanceof AppError && e.status === 403) return <NotTakingPart />;
    throw e;
  }
  redirect(access.standing === 'technician' ? `/sessions/${id}/field` : `/sessions/${id}/coach`);
}

function NotTakingPart() {
  return (
    <main className="mx-auto grid max-w-xl gap-4 p-6">
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
