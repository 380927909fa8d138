// `npm run bench:fleet`: how the machine list's database work grows from the demo fleet (25 machines, the
// baseline, measured in the same run) to 10,000 machines. A throwaway cluster; nothing touches other data.
import { randomUUID } from 'node:crypto';
import { performance } from 'node:perf_hooks';
import { sql } from 'drizzle-orm';
import { createDb } from '../db/client';
import { countDueByStatus, listDueMachines } from '../db/queries/due';
import { listMachines } from '../db/queries/machines';
import { customers, machines, organisations, screws, sites } from '../db/schema';
import { DEMO_ORGANISATION, seedDemo } from '../db/seed';
import { footprintTemplate } from '../lib/fleet/footprint';
import { prepareDatabase } from './setup';

const COUNT = Number(process.argv.find((a) => a.startsWith('--machines='))?.split('=')[1] ?? 10_000);
const RUNS = 40;

const cluster = await prepareDatabase({ name: 'pg-bench', port: 54349, database: 'levelwire_bench', fresh: true });
const db = createDb(cluster.url, 4);
try {
  await seedDemo(db);
  const [demo] = await db.select().from(organisations).where(sql`${organisations.name} = ${DEMO_ORGANISATION}`);

  const t0 = performance.now();
  const [org] = await db.insert(organisations).values({ name: 'Scale bench organisation' }).returning();
  const siteIds: string[] = [];
  for (let c = 0; c < 40; c++) {
    const [customer] = await db.insert(customers).values({ organisationId: org!.id, name: `Bench customer ${c}` }).returning();
    for (let s = 0; s < 5; s++) {
      const [site] = await db.insert(sites).values({ organisationId: org!.id, customerId: customer!.id, name: `Bench site ${c}-${s}` }).returning();
      siteIds.push(site!.id);
    }
  }
  const template = footprintTemplate(4, 2000, 1600);
  for (let start = 0; start < COUNT; start += 1000) {
    const batch = Array.from({ length: Math.min(1000, COUNT - start) }, (_, k) => {
      const i = start + k;
      return { id: randomUUID(), organisationId: org!.id, siteId: siteIds[i % siteIds.length]!, model: `Bench model ${String(i % 97).padStart(2, '0')}`, serial: `BENCH-${String(i).padStart(6, '0')}`, tableLengthMm: 1000, tableWidthMm: 500, travelXMm: 800, travelYMm: 500, travelZMm: 500 };
    });
    await db.insert(machines).values(batch);
    await db.insert(screws).values(batch.flatMap((m) => template.map((s) => ({ machineId: m.id, label: s.label, kind: s.kind, xMm: s.xMm, yMm: s.yMm, pitchMm: 3 }))));
  }
  await db.execute(sql`analyze`);
  console.log(`seeded ${COUNT.toLocaleString('en')} machines (${(COUNT * 4).toLocaleString('en')} screws) in ${((performance.now() - t0) / 1000).toFixed(1)} s\n`);

  const cases = [
    { name: 'first page, by model', q: { q: '', sort: 'model', dir: 'asc', page: 1, pageSize: 25 } },
    { name: 'page 200, by customer desc', q: { q: '', sort: 'customer', dir: 'desc', page: 200, pageSize: 25 } },
    { name: 'filter "0042", by serial', q: { q: '0042', sort: 'serial', dir: 'asc', page: 1, pageSize: 25 } },
    { name: 'first page, by screw count', q: { q: '', sort: 'screws', dir: 'desc', page: 1, pageSize: 25 } },
  ] as const;

  const today = new Date().toISOString().slice(0, 10);
  const dueCases = [
    { name: 'due list: overdue first (default view)', run: (organisationId: string) => listDueMachines(db, { organisationId, today, soonDays: 14, status: 'all', q: '', sort: 'nextDue', dir: 'asc', page: 1, pageSize: 25 }) },
    { name: 'due list: page 200, by customer desc', run: (organisationId: string) => listDueMachines(db, { organisationId, today, soonDays: 14, status: 'all', q: '', sort: 'customer', dir: 'desc', page: 200, pageSize: 25 }) },
    { name: 'due counts (start page summary)', run: (organisationId: string) => countDueByStatus(db, { organisationId, today, soonDays: 14 }) },
  ];

  const sample = async (call: () => Promise<unknown>) => {
    const samples: number[] = [];
    for (let r = 0; r < RUNS + 5; r++) {
      const s = performance.now();
      await call();
      if (r >= 5) samples.push(performance.now() - s);
    }
    samples.sort((a, b) => a - b);
    return { p50: samples[Math.floor(RUNS / 2)]!, p95: samples[Math.floor(RUNS * 0.95)]! };
  };

  const time = (organisationId: string, q: (typeof cases)[number]['q']) => sample(() => listMachines(db, { organisationId, ...q } as never));

  console.log(`| query (rows + count) | ${25} machines p50 ms | ${COUNT.toLocaleString('en')} machines p50 ms | p95 ms | ratio p50 |`);
  console.log('|---|---|---|---|---|');
  for (const c of cases) {
    const base = await time(demo!.id, c.q);
    const big = await time(org!.id, c.q);
    console.log(`| machines: ${c.name} | ${base.p50.toFixed(2)} | ${big.p50.toFixed(2)} | ${big.p95.toFixed(2)} | ${(big.p50 / base.p50).toFixed(1)}x |`);
  }
  for (const c of dueCases) {
    const base = await sample(() => c.run(demo!.id));
    const big = await sample(() => c.run(org!.id));
    console.log(`| ${c.name} | ${base.p50.toFixed(2)} | ${big.p50.toFixed(2)} | ${big.p95.toFixed(2)} | ${(big.p50 / base.p50).toFixed(1)}x |`);
  }
  console.log(`\n${RUNS} timed runs per cell after 5 warm-up runs; PostgreSQL on loopback, Node ${process.version}.`);
} finally {
  await db.$client.end();
  cluster.stop();
}
