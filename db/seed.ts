// The invented demo scenario, seeded once. Every name, place and serial here is made up for Levelwire's demo.
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import bcrypt from 'bcryptjs';
import { eq } from 'drizzle-orm';
import { footprintTemplate } from '@/lib/fleet/footprint';
import { screwRow } from './queries/machines';
import { createDb, type Db } from './client';
import { contacts, customers, instruments, machines, organisations, screws, sites, users, visits } from './schema';

export const DEMO_PASSWORD = 'level-demo-2026';
export const DEMO_ORGANISATION = 'Northmere Field Service (demo)';
/** The machine the walkthrough and the browser tests use. */
export const DEMO_MACHINE_SERIAL = 'DEMO-VX8-0417';

export const DEMO_USERS = [
  { email: 'tech@northmere.test', name: 'Tess Alder', role: 'technician' },
  { email: 'expert@northmere.test', name: 'Ewan Marsh', role: 'expert' },
  { email: 'reviewer@northmere.test', name: 'Rhea Quill', role: 'reviewer' },
  { email: 'admin@northmere.test', name: 'Nora Vale', role: 'admin' },
] as const;

const CUSTOMERS = [
  {
    name: 'Ashgrove Tooling Co-op (demo)',
    contact: { name: 'Mara Linden', email: 'maintenance@ashgrove.test', position: 'Maintenance lead' },
    sites: [
      { name: 'Ashgrove works, bay C', address: '4 Quarry Lane, Ashgrove', floorNotes: '300 mm reinforced slab, no isolation pads; machines on steel pads, not anchored.', accessNotes: 'Sign in at gate 2; lockout held by the maintenance lead.' },
      { name: 'Ashgrove annexe', address: '11 Quarry Lane, Ashgrove', floorNotes: 'New 250 mm slab poured this spring: re-check early for settling.', accessNotes: 'Forklift aisle closes at 14:00.' },
    ],
  },
  {
    name: 'Brindlemoor Marine Castings (demo)',
    contact: { name: 'Ivo Stenning', email: 'ivo.stenning@brindlemoor.test', position: 'Works engineer' },
    sites: [
      { name: 'Brindlemoor foundry machine shop', address: 'Dockside Road 7, Brindlemoor', floorNotes: 'Isolated foundation block 600 mm, grouted pads.', accessNotes: 'Safety boots and hearing protection; escort required.' },
      { name: 'Brindlemoor finishing hall', address: 'Dockside Road 9, Brindlemoor', floorNotes: 'Old slab with a known crack along column line 4.', accessNotes: 'Access from the north door only.' },
    ],
  },
  {
    name: 'Quillon Ridge Aero Parts (demo)',
    contact: { name: 'Sefa Orrin', email: 'sefa.orrin@quillonridge.test', position: 'Quality manager' },
    sites: [
      { name: 'Quillon Ridge cell 1', address: 'Hangar Row 2, Quillon Ridge', floorNotes: 'Anchored machines on epoxy grout; temperature held at 20 ± 1 °C.', accessNotes: 'Visitor badge from reception; cleanroom shoe covers.' },
      { name: 'Quillon Ridge cell 2', address: 'Hangar Row 3, Quillon Ridge', floorNotes: 'Isolation pads under every machine.', accessNotes: 'Night shift only on Fridays.' },
    ],
  },
];

/** Months (and days) back from today as an ISO date. */
function daysAgo(days: number, from: Date): string {
  return new Date(from.getTime() - days * 86_400_000).toISOString().slice(0, 10);
}

/** Seeds the demo organisation when it is not there yet; returns whether it wrote anything. */
export async function seedDemo(db: Db, now = new Date()): Promise<boolean> {
  const [existing] = await db.select().from(organisations).where(eq(organisations.name, DEMO_ORGANISATION));
  if (existing) return false;
  await db.transaction(async (tx) => {
    const [org] = await tx.insert(organisations).values({ name: DEMO_ORGANISATION }).returning();
    const organisationId = org!.id;
    const passwordHash = await bcrypt.hash(DEMO_PASSWORD, 10);
    const people = await tx.insert(users).values(DEMO_USERS.map((u) => ({ ...u, organisationId, passwordHash }))).returning();
    const byRole = (role: string) => people.find((p) => p.role === role)!.id;

    const siteIds: string[] = [];
    for (const c of CUSTOMERS) {
      const [customer] = await tx.insert(customers).values({ organisationId, name: c.name }).returning();
      await tx.insert(contacts).values({ organisationId, customerId: customer!.id, ...c.contact, receivesReports: true });
      for (const s of c.sites) {
        const [site] = await tx.insert(sites).values({ organisationId, customerId: customer!.id, ...s }).returning();
        siteIds.push(site!.id);
      }
    }

    // 25 machines: the walkthrough's 4-screw VX-800 first, then a mix of 4-, 6- and 8-screw frames.
    const models = [
      { model: 'Vertical machining centre VX-800 (demo)', table: [1000, 500], travel: [800, 500, 550], screws: 4 as const, span: [1800, 1500] },
      { model: 'Vertical machining centre VX-1250 (demo)', table: [1400, 650], travel: [1250, 650, 600], screws: 6 as const, span: [2600, 1900] },
      { model: 'Bridge mill BR-3020 (demo)', table: [3200, 2000], travel: [3000, 2000, 800], screws: 8 as const, span: [4200, 3000] },
      { model: 'Compact drill-tap DT-500 (demo)', table: [650, 400], travel: [500, 400, 300], screws: 4 as const, span: [1300, 1100] },
      { model: 'Horizontal machining centre HX-630 (demo)', table: [630, 630], travel: [1050, 900, 980], screws: 6 as const, span: [2800, 2200] },
    ];
    for (let i = 0; i < 25; i++) {
      const m = models[i % models.length]!;
      const threadUnit = i % 3 === 2 ? 'tpi' : 'mm';
      const thread = threadUnit === 'tpi' ? { unit: 'tpi' as const, value: 8 } : { unit: 'mm' as const, value: 3 };
      // Last leveled 2 to 14 months ago, so the due list has overdue, due-soon and fine machines.
      const priorLeveledOn = daysAgo(60 + ((i * 53) % 365), now);
      const [machine] = await tx
        .insert(machines)
        .values({
          organisationId,
          siteId: siteIds[i % siteIds.length]!,
          model: m.model,
          serial: i === 0 ? DEMO_MACHINE_SERIAL : `DEMO-${String(1000 + i * 37)}`,
          tableLengthMm: m.table[0]!,
          tableWidthMm: m.table[1]!,
          travelXMm: m.travel[0]!,
          travelYMm: m.travel[1]!,
          travelZMm: m.travel[2]!,
          checkIntervalMonths: [9, 6, 12][i % 3]!,
          priorLeveledOn,
        })
        .returning();
      await tx.insert(screws).values(footprintTemplate(m.screws, m.span[0]!, m.span[1]!, thread).map((s) => screwRow(machine!.id, { ...s, specHeightMm: 80 })));
      if (i === 0) {
        await tx.insert(visits).values({
          organisationId,
          machineId: machine!.id,
          technicianId: byRole('technician'),
          expertId: byRole('expert'),
          scheduledFor: new Date(now.getTime() + 3 * 86_400_000),
          notes: 'Re-level after the annexe slab work; customer reports a taper on long bores.',
          createdById: byRole('admin'),
        });
      }
    }

    // Instruments: one level whose calibration runs out in 10 days, one indicator already past due.
    const due = (days: number) => daysAgo(-days, now);
    await tx.insert(instruments).values([
      { organisationId, kind: 'level', model: 'Precision level 200 mm, 0.02 mm/m (demo)', serial: 'LV-2207', sensitivityValue: 0.02, sensitivityUnit: 'mm/m', vialCount: 2, calibratedOn: daysAgo(355, now), calibrationDue: due(10) },
      { organisationId, kind: 'level', model: 'Machinist level 12 in, 0.0005 in/10 in (demo)', serial: 'LV-3141', sensitivityValue: 0.0005, sensitivityUnit: 'in/10in', vialCount: 2, calibratedOn: daysAgo(100, now), calibrationDue: due(265) },
      { organisationId, kind: 'indicator', model: 'Lever test indicator 0.0001 in (demo)', serial: 'TI-0042', resolutionUm: 2.54, rangeMm: 0.5, calibratedOn: daysAgo(385, now), calibrationDue: due(-20) },
      { organisationId, kind: 'indicator', model: 'Lever test indicator 0.002 mm (demo)', serial: 'TI-0077', resolutionUm: 2, rangeMm: 0.4, calibratedOn: daysAgo(30, now), calibrationDue: due(335) },
    ]);
  });
  return true;
}

if (process.argv[1] && fileURLToPath(import.meta.url) === path.resolve(process.argv[1])) {
  const db = createDb(process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:54329/levelwire', 2);
  const wrote = await seedDemo(db);
  console.log(wrote ? '[levelwire] demo data seeded' : '[levelwire] demo data already there');
  await db.$client.end();
}
