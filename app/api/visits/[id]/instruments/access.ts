import type { Db } from '@/db/client';
import { getVisit, type VisitDetail } from '@/db/queries/visits';
import type { Actor } from '@/lib/auth/actor';
import { assertCan, can } from '@/lib/auth/policy';
import { AppError } from '@/lib/errors';

/**
 * The visit whose instruments the actor may change: an admin, or the technician the visit is assigned to.
 * Another organisation's visit is a 404; anyone else a 403; a completed or cancelled visit a 409.
 */
export async function visitForInstruments(db: Db, actor: Actor, id: string): Promise<VisitDetail> {
  assertCan(actor, 'visit:read');
  const visit = await getVisit(db, { organisationId: actor.organisationId, id });
  if (!visit) throw new AppError('not_found:visit', 'No such visit');
  if (!can(actor, 'visit:write') && actor.id !== visit.visit.technicianId) {
    throw new AppError('forbidden:visit', `A ${actor.role} may not choose instruments for this visit (only an admin or its technician)`);
  }
  if (visit.visit.state === 'completed' || visit.visit.state === 'cancelled') {
    throw new AppError('conflict:visit', `The visit is ${visit.visit.state}; its instruments can no longer change`);
  }
  return visit;
}
