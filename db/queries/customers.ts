import { and, asc, count, eq, ilike, or } from 'drizzle-orm';
import type { z } from 'zod';
import type { contactInput, customerInput, siteInput } from '@/lib/fleet/customers';
import { likePattern } from '@/lib/list-query';
import type { Db } from '../client';
import { contacts, customers, machines, sites } from '../schema';

type Org = { organisationId: string };

export async function listCustomers(db: Db, { organisationId, q = '' }: Org & { q?: string }) {
  const siteCount = db.$count(sites, eq(sites.customerId, customers.id));
  return db
    .select({ id: customers.id, name: customers.name, notes: customers.notes, siteCount })
    .from(customers)
    .where(and(eq(customers.organisationId, organisationId), q ? ilike(customers.name, likePattern(q)) : undefined))
    .orderBy(asc(customers.name))
    .limit(500);
}

/** A customer with its contacts and sites (and each site's machine count); null outside the organisation. */
export async function getCustomer(db: Db, { organisationId, id }: Org & { id: string }) {
  const customer = await db.query.customers.findFirst({
    where: and(eq(customers.id, id), eq(customers.organisationId, organisationId)),
    with: { contacts: { orderBy: [asc(contacts.name)] }, sites: { orderBy: [asc(sites.name)] } },
  });
  if (!customer) return null;
  const counts = await db
    .select({ siteId: machines.siteId, n: count() })
    .from(machines)
    .where(eq(machines.organisationId, organisationId))
    .groupBy(machines.siteId);
  const bySite = new Map(counts.map((c) => [c.siteId, c.n]));
  return { ...customer, sites: customer.sites.map((s) => ({ ...s, machineCount: bySite.get(s.id) ?? 0 })) };
}

export async function insertCustomer(db: Db, { organisationId, input }: Org & { input: z.output<typeof customerInput> }) {
  const [row] = await db.insert(customers).values({ organisationId, ...input }).returning();
  return row!;
}

export async function updateCustomer(db: Db, { organisationId, id, input }: Org & { id: string; input: Partial<z.output<typeof customerInput>> }) {
  const [row] = await db.update(customers).set(input).where(and(eq(customers.id, id), eq(customers.organisationId, organisationId))).returning();
  return row ?? null;
}

export async function insertContact(db: Db, { organisationId, customerId, input }: Org & { customerId: string; input: z.output<typeof contactInput> }) {
  const [row] = await db.insert(contacts).values({ organisationId, customerId, ...input }).returning();
  return row!;
}

export async function updateContact(db: Db, { organisationId, id, input }: Org & { id: string; input: Partial<z.output<typeof contactInput>> }) {
  const [row] = await db.update(contacts).set(input).where(and(eq(contacts.id, id), eq(contacts.organisationId, organisationId))).returning();
  return row ?? null;
}

export async function deleteContact(db: Db, { organisationId, id }: Org & { id: string }) {
  const rows = await db.delete(contacts).where(and(eq(contacts.id, id), eq(contacts.organisationId, organisationId))).returning({ id: contacts.id });
  return rows.length > 0;
}

export async function listSites(db: Db, { organisationId, q = '' }: Org & { q?: string }) {
  return db
    .select({ id: sites.id, name: sites.name, address: sites.address, customerId: customers.id, customerName: customers.name })
    .from(sites)
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .where(and(eq(sites.organisationId, organisationId), q ? or(ilike(sites.name, likePattern(q)), ilike(customers.name, likePattern(q))) : undefined))
    .orderBy(asc(customers.name), asc(sites.name))
    .limit(500);
}

export async function getSite(db: Db, { organisationId, id }: Org & { id: string }) {
  const site = await db.query.sites.findFirst({ where: and(eq(sites.id, id), eq(sites.organisationId, organisationId)), with: { customer: true } });
  return site ?? null;
}

/** Inserts a site for a customer of the same organisation; null when the customer is not the organisation's. */
export async function insertSite(db: Db, { organisationId, input }: Org & { input: z.output<typeof siteInput> }) {
  const [customer] = await db.select({ id: customers.id }).from(customers).where(and(eq(customers.id, input.customerId), eq(customers.organisationId, organisationId)));
  if (!customer) return null;
  const [row] = await db.insert(sites).values({ organisationId, ...input }).returning();
  return row!;
}

export async function updateSite(db: Db, { organisationId, id, input }: Org & { id: string; input: Partial<Omit<z.output<typeof siteInput>, 'customerId'>> }) {
  const [row] = await db.update(sites).set(input).where(and(eq(sites.id, id), eq(sites.organisationId, organisationId))).returning();
  return row ?? null;
}
