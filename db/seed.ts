// The invented demo scenario, seeded once. Every name, place and serial here is made up for Levelwire's demo.
import { randomBytes } from 'node:crypto';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import bcrypt from 'bcryptjs';
import { and, eq, sql } from 'drizzle-orm';
import { footprintTemplate } from '@/lib/fleet/footprint';
import { pickDemoSeed, VIRTUAL_TECHNICIAN_NAME } from '@/lib/session/virtual-technician';
import { screwRow } from './queries/machines';
import { getMachineSnapshot, listLiveDemoSessionsOfMachine, listOrdinarySessionsOfTechnician, openSession } from './queries/sessions';
import { createDb, type Db } from './client';
import { seedDemoRecords } from './seed-records';
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

/** The demo's virtual technician: a technician account nobody signs in to (its password is random and thrown away). */
export const VIRTUAL_TECHNICIAN_EMAIL = 'virtual-technician@northmere.test';

/** Sensitivity of the demo level: 0.02 mm/m a division, 20 µrad (JIS B 7510 grade). */
const DEMO_LEVEL_DIVISION_URAD = 20;

/** Months (and days) back from today as an ISO date. */
function daysAgo(days: number, from: Date): string {
  return new Date(from.getTime() - days * 86_400_000).toISOString().slice(0, 10);
}

/** Seeds the demo organisation when it is not there yet; returns whether it wrote anything. */
export async function seedDemo(db: Db, now = new Date()): Promise<boolean> {
  const [existing] = await db.select().from(organisations).where(eq(organisations.name, DEMO_ORGANISATION));
  const wroteFleet = existing ? false : await seedFleet(db, now);
  const wroteSessions = await seedDemoSessions(db);
  return wroteFleet || wroteSessions;
}

/** A virtual technician user of an organisation (role technician, an unknowable password); found by email when there. */
export async function ensureVirtualTechnician(db: Db, { organisationId, email }: { organisationId: string; email: string }) {
  const [found] = await db.select().from(users).where(sql`lower(${users.email}) = lower(${email})`);
  if (found) return found;
  const passwordHash = await bcrypt.hash(randomBytes(32).toString('base64url'), 10);
  const [made] = await db
    .insert(users)
    .values({ organisationId, email, name: VIRTUAL_TECHNICIAN_NAME, role: 'technician', passwordHash, unitSystem: 'metric' })
    .onConflictDoNothing()
    .returning();
  if (made) return made;
  const [raced] = await db.select().from(users).where(sql`lower(${users.email}) = lower(${email})`);
  return raced!;
}

/**
 * Opens a demo session on a machine, worked by the virtual technician: its virtual seed is the first one the engine's
 * moves bring to as-left on this footprint (see pickDemoSeed), so a newcomer coaching it can finish.
 */
export async function openDemoSession(
  db: Db,
  input: { organisationId: string; machineId: string; technician: { id: string; name: string }; experts?: string[]; observers?: string[]; levelDivisionUrad?: number },
) {
  const levelDivisionUrad = input.levelDivisionUrad ?? DEMO_LEVEL_DIVISION_URAD;
  const snapshot = await getMachineSnapshot(db, { organisationId: input.organisationId, machineId: input.machineId });
  const virtualSeed = pickDemoSeed({ ...snapshot, levelDivisionUrad });
  return openSession(db, { ...input, levelDivisionUrad, virtualSeed });
}

/**
 * The demo's sessions, each made only when missing: a live demo session on the walkthrough machine worked by the
 * virtual technician (Ewan Marsh coaches; Rhea Quill and Tess Alder watch), made again when the last one has ended, so
 * `npm start` always offers one; and one ordinary session with Tess Alder as technician and Ewan Marsh as expert, for
 * trying the field view by hand (made once).
 */
export async function seedDemoSessions(db: Db): Promise<boolean> {
  const [org] = await db.select().from(organisations).where(eq(organisations.name, DEMO_ORGANISATION));
  if (!org) return false;
  const organisationId = org.id;
  const [machine] = await db.select().from(machines).where(and(eq(machines.organisationId, organisationId), eq(machines.serial, DEMO_MACHINE_SERIAL)));
  if (!machine) return false;
  const people = await db.select().from(users).where(eq(users.organisationId, organisationId));
  const byEmail = (email: string) => people.find((p) => p.email.toLowerCase() === email)!;
  const tech = byEmail('tech@northmere.test');
  const expert = byEmail('expert@northmere.test');
  const reviewer = byEmail('reviewer@northmere.test');
  if (!tech || !expert || !reviewer) return false;
  let wrote = false;

  const virtual = await ensureVirtualTechnician(db, { organisationId, email: VIRTUAL_TECHNICIAN_EMAIL });
  if ((await listLiveDemoSessionsOfMachine(db, { organisationId, machineId: machine.id })).length === 0) {
    await openDemoSession(db, {
      organisationId,
      machineId: machine.id,
      technician: { id: virtual.id, name: virtual.name },
      experts: [expert.id],
      observers: [reviewer.id, tech.id],
    });
    wrote = true;
  }
  const admin = byEmail('admin@northmere.test');
  if (admin && (await seedDemoRecords(db, { organisationId, machineId: machine.id, people: { tech, expert, reviewer, admin }, now: new Date() }))) wrote = true;
  if ((await listOrdinarySessionsOfTechnician(db, { machineId: machine.id, technicianId: tech.id })).length === 0) {
    await openSession(db, {
      organisationId,
      machineId: machine.id,
      technician: { id: tech.id, name: tech.name },
      levelDivisionUrad: DEMO_LEVEL_DIVISION_URAD,
      experts: [expert.id],
    });
    wrote = true;
  }
  return wrote;
}

/** The organisation, its people, fleet, visit and instruments. */
async function seedFleet(db: Db, now: Date): Promise<boolean> {
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
