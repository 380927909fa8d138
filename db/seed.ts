// The invented demo scenario, seeded once. Every name here is made up for Levelwire's demo.
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import bcrypt from 'bcryptjs';
import { eq } from 'drizzle-orm';
import { createDb, type Db } from './client';
import { customers, machines, organisations, screws, sites, users } from './schema';

export const DEMO_PASSWORD = 'level-demo-2026';
export const DEMO_ORGANISATION = 'Northmere Field Service (demo)';

export const DEMO_USERS = [
  { email: 'tech@northmere.test', name: 'Tess Alder', role: 'technician' },
  { email: 'expert@northmere.test', name: 'Ewan Marsh', role: 'expert' },
  { email: 'reviewer@northmere.test', name: 'Rhea Quill', role: 'reviewer' },
  { email: 'admin@northmere.test', name: 'Nora Vale', role: 'admin' },
] as const;

/** Seeds the demo organisation when it is not there yet; returns whether it wrote anything. */
export async function seedDemo(db: Db): Promise<boolean> {
  const [existing] = await db.select().from(organisations).where(eq(organisations.name, DEMO_ORGANISATION));
  if (existing) return false;
  await db.transaction(async (tx) => {
    const [org] = await tx.insert(organisations).values({ name: DEMO_ORGANISATION }).returning();
    const passwordHash = await bcrypt.hash(DEMO_PASSWORD, 10);
    await tx.insert(users).values(DEMO_USERS.map((u) => ({ ...u, organisationId: org!.id, passwordHash })));
    const [customer] = await tx.insert(customers).values({ organisationId: org!.id, name: 'Ashgrove Tooling Co-op (demo)' }).returning();
    const [site] = await tx
      .insert(sites)
      .values({
        organisationId: org!.id,
        customerId: customer!.id,
        name: 'Ashgrove works, bay C',
        address: '4 Quarry Lane, Ashgrove (invented)',
        floorNotes: '300 mm reinforced slab, no isolation pads; machine on steel pads, not anchored.',
      })
      .returning();
    const [machine] = await tx
      .insert(machines)
      .values({
        organisationId: org!.id,
        siteId: site!.id,
        model: 'Vertical machining centre VX-800 (demo)',
        serial: 'DEMO-VX8-0417',
        tableLengthMm: 1000,
        tableWidthMm: 500,
        travelXMm: 800,
        travelYMm: 500,
        travelZMm: 550,
        checkIntervalMonths: 9,
      })
      .returning();
    // Four corner screws, M24 (ISO 261 coarse: 3 mm pitch), 80 mm specified height under the casting.
    const corner = (label: string, xMm: number, yMm: number) => ({ machineId: machine!.id, label, kind: 'corner' as const, xMm, yMm, pitchMm: 3, specHeightMm: 80 });
    await tx.insert(screws).values([corner('FL', -900, -750), corner('FR', 900, -750), corner('RL', -900, 750), corner('RR', 900, 750)]);
  });
  return true;
}

if (process.argv[1] && fileURLToPath(import.meta.url) === path.resolve(process.argv[1])) {
  const db = createDb(process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:54329/levelwire', 2);
  const wrote = await seedDemo(db);
  console.log(wrote ? '[levelwire] demo data seeded' : '[levelwire] demo data already there');
  await db.$client.end();
}
