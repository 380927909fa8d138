import { eq } from 'drizzle-orm';
import type { Db } from '../client';
import { machines } from '../schema';

export async function listMachinesByOrganisation(db: Db, { organisationId }: { organisationId: string }) {
  return db.query.machines.findMany({
    where: eq(machines.organisationId, organisationId),
    with: { screws: true, site: { with: { customer: true } } },
    orderBy: [machines.model],
  });
}
