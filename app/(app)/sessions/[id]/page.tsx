import { redirect } from 'next/navigation';
import { requirePageActor } from '@/lib/auth/session';

/** Sends each role to its own view of the session. */
export default async function SessionPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePageActor(`/sessions/${id}`);
  redirect(actor.role === 'technician' ? `/sessions/${id}/field` : `/sessions/${id}/coach`);
}
