import { and, asc, count, desc, eq, ilike, inArray, notInArray, or, sql } from 'drizzle-orm';
import { pitchMmOf, type ScrewInput } from '@/lib/fleet/footprint';
import type { MachineInput, MachinePatch } from '@/lib/fleet/machines';
import { likePattern, type ListQuery, type Page } from '@/lib/list-query';
import type { Db } from '../client';
import { customers, machines, screws, sites } from '../schema';
import type { Tx } from './events';

type Org = { organisationId: string };

export type MachineRow = { id: string; model: string; serial: string; customerName: string; siteName: string; screwCount: number; checkIntervalMonths: number };

const screwCount = sql<number>`(select count(*)::int from ${screws} where ${screws.machineId} = ${machines.id})`;

const sortColumns = {
  model: machines.model,
  serial: machines.serial,
  customer: customers.name,
  site: sites.name,
  screws: screwCount,
} as const;

/** One page of the organisation's machines, filtered, sorted and counted in PostgreSQL. */
export async function listMachines(db: Db, { organisationId, q, sort, dir, page, pageSize }: Org & ListQuery<keyof typeof sortColumns>): Promise<Page<MachineRow>> {
  const pattern = likePattern(q);
  const where = and(
    eq(machines.organisationId, organisationId),
    q ? or(ilike(machines.model, pattern), ilike(machines.serial, pattern), ilike(customers.name, pattern), ilike(sites.name, pattern)) : undefined,
  );
  const order = dir === 'desc' ? desc(sortColumns[sort]) : asc(sortColumns[sort]);
  const [rows, [total]] = await Promise.all([
    db
      .select({ id: machines.id, model: machines.model, serial: machines.serial, customerName: customers.name, siteName: sites.name, screwCount, checkIntervalMonths: machines.checkIntervalMonths })
      .from(machines)
      .innerJoin(sites, eq(sites.id, machines.siteId))
      .innerJoin(customers, eq(customers.id, sites.customerId))
      .where(where)
      .orderBy(order, asc(machines.serial))
      .limit(pageSize)
      .offset((page - 1) * pageSize),
    db.select({ n: count() }).from(machines).innerJoin(sites, eq(sites.id, machines.siteId)).innerJoin(customers, eq(customers.id, sites.customerId)).where(where),
  ]);
  return { rows, total: total?.n ?? 0, page, pageSize };
}

/** A machine with its footprint, site and customer; null when absent or another organisation's. */
export async function getMachine(db: Db, { organisationId, id }: Org & { id: string }) {
  const machine = await db.query.machines.findFirst({
    where: and(eq(machines.id, id), eq(machines.organisationId, organisationId)),
    with: { screws: { orderBy: [asc(screws.label)] }, site: { with: { customer: true } } },
  });
  return machine ?? null;
}

export type MachineDetail = NonNullable<Awaited<ReturnType<typeof getMachine>>>;

/** The screw row for a footprint entry (thread kept as given: pitch in mm, or tpi with its pitch). */
export function screwRow(machineId: string, s: ScrewInput) {
  return {
    machineId,
    label: s.label,
    kind: s.kind,
    xMm: s.xMm,
    yMm: s.yMm,
    pitchMm: pitchMmOf(s.thread),
    threadTpi: s.thread.unit === 'tpi' ? s.thread.value : null,
    liftPerTurnMm: s.liftPerTurnMm ?? null,
    specHeightMm: s.specHeightMm ?? null,
  };
}

/** Replaces a machine's footprint, keeping each screw's id where its label stays (history refers to screws). */
async function writeFootprint(tx: Tx, machineId: string, footprint: ScrewInput[]) {
  const labels = footprint.map((s) => s.label);
  await tx.delete(screws).where(and(eq(screws.machineId, machineId), notInArray(screws.label, labels)));
  for (const s of footprint) {
    const row = screwRow(machineId, s);
    await tx.insert(screws).values(row).onConflictDoUpdate({ target: [screws.machineId, screws.label], set: row });
  }
}

function machineColumns(input: MachinePatch) {
  const { screws: _footprint, ...rest } = input;
  return rest;
}

/** Whether a site is the organisation's. */
export async function siteBelongs(db: Db | Tx, { organisationId, siteId }: Org & { siteId: string }): Promise<boolean> {
  const [row] = await db.select({ id: sites.id }).from(sites).where(and(eq(sites.id, siteId), eq(sites.organisationId, organisationId)));
  return Boolean(row);
}

export async function findMachineBySerial(db: Db | Tx, { organisationId, serial }: Org & { serial: string }) {
  const [row] = await db.select({ id: machines.id }).from(machines).where(and(eq(machines.organisationId, organisationId), eq(machines.serial, serial)));
  return row ?? null;
}

/** Inserts a machine with its footprint in one transaction. */
export async function insertMachine(db: Db | Tx, { organisationId, input }: Org & { input: MachineInput }) {
  const run = async (tx: Tx) => {
    const [row] = await tx.insert(machines).values({ organisationId, ...machineColumns(input) } as typeof machines.$inferInsert).returning();
    await writeFootprint(tx, row!.id, input.screws);
    return row!;
  };
  // Inside a caller's transaction this nests as a savepoint.
  return (db as Db).transaction(run);
}

/** Updates a machine (and its footprint when given) in one transaction; null when not the organisation's. */
export async function updateMachine(db: Db | Tx, { organisationId, id, input }: Org & { id: string; input: MachinePatch }) {
  const run = async (tx: Tx) => {
    const columns = machineColumns(input);
    const [row] =
      Object.keys(columns).length > 0
        ? await tx.update(machines).set(columns).where(and(eq(machines.id, id), eq(machines.organisationId, organisationId))).returning()
        : await tx.select().from(machines).where(and(eq(machines.id, id), eq(machines.organisationId, organisationId)));
    if (!row) return null;
    if (input.screws) await writeFootprint(tx, id, input.screws);
    return row;
  };
  return (db as Db).transaction(run);
}

/** Every machine of the organisation with its footprint, for the CSV export (ordered by serial, then screw label). */
export async function listMachinesForExport(db: Db, { organisationId }: Org) {
  return db
    .select({ machine: machines, screw: screws, siteName: sites.name, customerName: customers.name })
    .from(machines)
    .innerJoin(sites, eq(sites.id, machines.siteId))
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .innerJoin(screws, eq(screws.machineId, machines.id))
    .where(eq(machines.organisationId, organisationId))
    .orderBy(asc(machines.serial), asc(screws.label));
}

/** Site ids by "customer name / site name" for the organisation (the CSV names sites that way). */
export async function siteIdsByName(db: Db | Tx, { organisationId }: Org) {
  const rows = await db
    .select({ id: sites.id, site: sites.name, customer: customers.name })
    .from(sites)
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .where(eq(sites.organisationId, organisationId));
  return new Map(rows.map((r) => [siteKey(r.customer, r.site), r.id]));
}

export const siteKey = (customer: string, site: string) => `${customer.trim().toLowerCase()}\u0000${site.trim().toLowerCase()}`;

export async function machineIdsBySerial(db: Db | Tx, { organisationId, serials }: Org & { serials: string[] }) {
  if (serials.length === 0) return new Map<string, string>();
  const rows = await db.select({ id: machines.id, serial: machines.serial }).from(machines).where(and(eq(machines.organisationId, organisationId), inArray(machines.serial, serials)));
  return new Map(rows.map((r) => [r.serial, r.id]));
}
