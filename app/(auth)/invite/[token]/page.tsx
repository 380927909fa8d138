import type { Metadata } from 'next';
import Link from 'next/link';
import { db } from '@/db/client';
import { getInvitationByTokenHash, invitationProblem } from '@/db/queries/invitations';
import { Wordmark } from '@/components/ui/wordmark';
import { invitationToken } from '@/lib/fleet/invitations';
import { hashInvitationToken } from '@/lib/fleet/invitations-service';
import { AcceptInvitationForm } from './accept-form';

export const metadata: Metadata = { title: 'Join Levelwire', referrer: 'no-referrer' };
export const dynamic = 'force-dynamic';

const roleWord: Record<string, string> = { technician: 'a technician', expert: 'an expert', reviewer: 'a reviewer', admin: 'an admin' };

export default async function InvitePage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const invitation = invitationToken.safeParse(token).success ? await getInvitationByTokenHash(db(), { tokenHash: hashInvitationToken(token) }) : null;
  const problem = invitationProblem(invitation, new Date());

  return (
    <main className="grid min-h-dvh place-items-center bg-steel p-4">
      <div className="w-full max-w-md rounded-2xl bg-paper p-8 shadow-2xl">
        <Wordmark className="text-3xl text-spirit" />
        {problem || !invitation ? (
          <>
            <p role="alert" className="mt-6 rounded-lg bg-fail/10 p-3 font-semibold text-fail">
              {(problem?.message ?? '').replace(/^token: /, '').replace(/^./, (c) => c.toUpperCase())}
            </p>
            <Link href="/sign-in" className="mt-4 inline-flex min-h-12 items-center font-semibold text-spirit underline underline-offset-4">
              Go to sign-in
            </Link>
          </>
        ) : (
          <>
            <p className="mt-2 text-ink-soft">
              You are invited to <span className="font-semibold text-ink">{invitation.organisationName}</span> as {roleWord[invitation.role]}. Choose your name and password.
            </p>
            <AcceptInvitationForm token={token} email={invitation.email} />
          </>
        )}
      </div>
    </main>
  );
}
