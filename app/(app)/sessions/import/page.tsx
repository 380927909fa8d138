import type { Metadata } from 'next';
import { ImportForm } from '@/components/session/import-form';
import { can } from '@/lib/auth/policy';
import { requirePageActor } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Import a session' };
export const dynamic = 'force-dynamic';

export default async function ImportSessionPage() {
  const actor = await requirePageActor('/sessions/import');
  return (
    <main className="mx-auto grid max-w-5xl grid-cols-[minmax(0,1fr)] gap-4 p-4 sm:p-6">
      <div>
        <h1 className="text-2xl font-bold">Import a session’s record</h1>
        <p className="mt-1 max-w-3xl text-ink-soft">
          A session exported from Levelwire as JSON holds its whole log. Levelwire recomputes the log’s hash chain before it stores anything: a file changed
          after it was written is refused, naming the first event that no longer matches.
        </p>
      </div>
      {can(actor, 'session:import') ? (
        <ImportForm />
      ) : (
        <p role="alert" className="rounded-lg bg-fail/10 p-4 font-semibold text-fail">
          Only an admin imports session records. Ask your service manager.
        </p>
      )}
    </main>
  );
}
