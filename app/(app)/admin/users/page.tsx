import type { Metadata } from 'next';
import { UsersPanel } from '@/components/admin/users-panel';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Users' };
export const dynamic = 'force-dynamic';

export default async function UsersPage() {
  const actor = await requirePageActor('/admin/users');
  return (
    <main className="mx-auto grid max-w-5xl grid-cols-[minmax(0,1fr)] gap-4 p-4 sm:p-6">
      <h1 className="text-2xl font-bold">Users and invitations</h1>
      {can(actor, 'user:manage') ? (
        <UsersPanel actorId={actor.id} />
      ) : (
        <p role="alert" className="rounded-lg bg-fail/10 p-4 font-semibold text-fail">
          Only an admin manages users. Ask your service manager.
        </p>
      )}
    </main>
  );
}
