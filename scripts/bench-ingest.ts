// `npm run bench:ingest`: readings per second durably stored through the real append path (`recordReading`: group
// commit, lib/session/group-append.ts: the caller's access and the session rows locked, the hash chained, committed
// before each caller is answered), with 1 to 500 sessions taking readings at once, each session's readings one after
// another as the field view's outbox sends them, against raw batched inserts of the same rows (the baseline, measured
// in the same run). Also measured: the single append (one transaction per reading, as height readings, moves and
// checks are stored) and, for diagnosis only, synchronous_commit off. A throwaway cluster on :54399, restarted with
// fsync on so that a commit is on disk when it is acknowledged. `-- --readings=N --runs=N --sessions=1,10,50,200,500`.
import { performance } from 'node:perf_hooks';
import { and, eq, sql } from 'drizzle-orm';
import pg from 'pg';
import { createDb } from '../db/client';
import { getMachineSnapshot, openSession } from '../db/queries/sessions';
import { levelingSessions, machines, organisations, users } from '../db/schema';
import { DEMO_ORGANISATION, seedDemo } from '../db/seed';
import type { Actor } from '../lib/auth/actor';
import { readingToSlopeUrad } from '../lib/leveling/level';
import { seededRandom } from '../lib/leveling';
import type { LevelReadingInput } from '../lib/session/commands';
import { appendChecked, listEventsBySession } from '../db/queries/events';
import type { SessionEvent } from '../lib/session/events';
import { eventHash, verifyChain } from '../lib/session/hash-chain';
import { groupAppender } from '../lib/session/group-append';
import { accessForCommand, recordReading } from '../lib/session/service';
import { startCluster } from './postgres';
import { prepareDatabase } from './setup';

const arg = (name: string, fallback: number) => Number(process.argv.find((a) => a.startsWith(`--${name}=`))?.split('=')[1] ?? fallback);
const READINGS = arg('readings', 3_000);
const RUNS = arg('runs', 3);
const CONCURRENCY = (process.argv.find((a) => a.startsWith('--sessions='))?.split('=')[1] ?? '1,10,50,200,500').split(',').map(Number);
const BATCH = 500;
/** The server's pool size (db/client.ts's default): the real path shares it as the running process would. */
const POOL = 10;
const DIVISION_URAD = 20;

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const random = seededRandom(20261202);
/** A level reading as the field view sends it: rough level, X or Y, one of three stations, a bubble within ±6 div. */
const reading = (): LevelReadingInput => ({
  kind: 'level',
  stage: 'rough-level',
  axis: random() < 0.5 ? 'x' : 'y',
  positionMm: [-400, 0, 400][Math.floor(random() * 3)]!,
  divisions: Math.round((random() - 0.5) * 24) / 2,
});

let cluster = await prepareDatabase({ name: 'pg-bench-ingest', port: 54399, database: 'levelwire_bench_ingest', fresh: true });
// A fresh cluster starts with fsync off (scripts/postgres.ts, for the tests' speed); started again without `fresh`,
// the same data folder runs with fsync on, as production does.
cluster.stop();
cluster = await startCluster({ name: 'pg-bench-ingest', port: 54399, database: 'levelwire_bench_ingest' });
const db = createDb(cluster.url, POOL);
// A diagnostic pool for the widest case, same path: synchronous_commit off returns a commit before its WAL is flushed
// (NOT durable: a crash may lose the last acknowledged readings), measured only to show what the flush costs.
const withOption = (o: string) => createDb(`${cluster.url}?options=${encodeURIComponent(o)}`, POOL);
const diagnostics = [{ name: 'synchronous_commit off (not durable; diagnosis only)', db: withOption('-c synchronous_commit=off') }];
const WIDEST = Math.max(...CONCURRENCY);
try {
  const settings = await db.execute<{ name: string; setting: string }>(sql`select name, setting from pg_settings where name in ('fsync', 'synchronous_commit', 'wal_sync_method', 'commit_delay', 'server_version')`);
  const setting = Object.fromEntries(settings.rows.map((r) => [r.name, r.setting]));
  if (setting.fsync !== 'on') throw new Error('the benchmark cluster runs with fsync off: commits would not be durable');
  await seedDemo(db);
  const [org] = await db.select().from(organisations).where(eq(organisations.name, DEMO_ORGANISATION));
  const [machine] = await db.select().from(machines).where(and(eq(machines.organisationId, org!.id), sql`${machines.model} like 'Vertical machining centre VX-1250%'`)).limit(1);
  const [tech] = await db.select().from(users).where(eq(users.email, 'tech@northmere.test'));
  const actor: Actor = { id: tech!.id, name: tech!.name, role: tech!.role, organisationId: org!.id, unitSystem: tech!.unitSystem };
  await getMachineSnapshot(db, { organisationId: org!.id, machineId: machine!.id });
  const opened: string[] = [];
  const open = async () => {
    const { session } = await openSession(db, { organisationId: org!.id, machineId: machine!.id, technician: { id: tech!.id, name: tech!.name }, levelDivisionUrad: DIVISION_URAD });
    opened.push(session.id);
    return session.id;
  };

  /** The real path: each session's readings one after another (acknowledged before the next), the sessions at once. */
  async function realPath(sessions: number, via = db): Promise<{ rate: number; meanBatch: number; cpuUs: number; cpuShare: number }> {
    const ids = await Promise.all(Array.from({ length: sessions }, open));
    const per = ids.map((_, i) => Math.floor(READINGS / sessions) + (i < READINGS % sessions ? 1 : 0));
    const work = per.map((n) => Array.from({ length: n }, reading));
    const stats = groupAppender(via).stats;
    const before = { ...stats };
    const cpu = process.cpuUsage();
    const t = performance.now();
    await Promise.all(
      ids.map(async (sessionId, i) => {
        for (const r of work[i]!) await recordReading(via, actor, { id: crypto.randomUUID(), sessionId, reading: r });
      }),
    );
    const wall = performance.now() - t;
    const used = process.cpuUsage(cpu);
    const rate = READINGS / (wall / 1000);
    // CPU of this process (the appender and the callers) per reading, in µs, and as a share of the wall time.
    const cpuUs = (used.user + used.system) / READINGS;
    return { rate, meanBatch: (stats.appends - before.appends) / Math.max(1, stats.batches - before.batches), cpuUs, cpuShare: (used.user + used.system) / 1000 / wall };
  }

  /** The single append for comparison: the caller's access, then one transaction per reading (appendChecked). */
  async function singlePath(sessions: number): Promise<number> {
    const ids = await Promise.all(Array.from({ length: sessions }, open));
    const per = ids.map((_, i) => Math.floor(READINGS / sessions) + (i < READINGS % sessions ? 1 : 0));
    const work = per.map((n) => Array.from({ length: n }, reading));
    const t = performance.now();
    await Promise.all(
      ids.map(async (sessionId, i) => {
        for (const r of work[i]!) {
          const { session } = await accessForCommand(db, actor, sessionId, 'reading:submit');
          const id = crypto.randomUUID();
          await appendChecked(db, { sessionId, id, type: 'reading:recorded' }, async () => ({
            sessionId,
            id,
            type: 'reading:recorded',
            payload: { ...r, slopeUrad: readingToSlopeUrad(r.divisions, session.levelDivisionUrad) },
            actorId: actor.id,
            actorRole: actor.role,
          }));
        }
      }),
    );
    return READINGS / ((performance.now() - t) / 1000);
  }
  const SINGLE_AT = Math.min(50, Math.max(...CONCURRENCY));

  /** The baseline: the same rows, hashes chained beforehand, as multi-row INSERTs of BATCH rows, each statement its own commit. */
  async function baseline(): Promise<number> {
    const sessionId = await open();
    const [head] = await db.select({ lastSeq: levelingSessions.lastSeq, lastHash: levelingSessions.lastHash }).from(levelingSessions).where(eq(levelingSessions.id, sessionId));
    let prev = head!.lastHash;
    const rows = Array.from({ length: READINGS }, (_, k) => {
      const r = reading();
      const e = {
        seq: head!.lastSeq + k + 1,
        id: crypto.randomUUID(),
        type: 'reading:recorded' as const,
        payload: { ...r, slopeUrad: readingToSlopeUrad(r.divisions, DIVISION_URAD) },
        actorId: actor.id,
        actorRole: actor.role,
        serverTs: new Date().toISOString(),
      };
      const hash = eventHash(prev, e);
      const row = [sessionId, e.seq, e.id, e.type, JSON.stringify(e.payload), e.actorId, e.actorRole, null, e.serverTs, prev, hash];
      prev = hash;
      return row;
    });
    const client = new pg.Client({ connectionString: cluster.url });
    await client.connect();
    try {
      const t = performance.now();
      for (let i = 0; i < rows.length; i += BATCH) {
        const chunk = rows.slice(i, i + BATCH);
        const values = chunk.map((_, j) => `(${Array.from({ length: 11 }, (_, c) => `$${j * 11 + c + 1}`).join(', ')})`).join(', ');
        await client.query(
          `insert into session_events (session_id, seq, id, type, payload, actor_id, actor_role, client_ts, server_ts, prev_hash, hash) values ${values}`,
          chunk.flat(),
        );
      }
      return READINGS / ((performance.now() - t) / 1000);
    } finally {
      await client.end();
    }
  }

  console.log(
    `${READINGS.toLocaleString('en')} readings a run, ${RUNS} runs; pool of ${POOL}; PostgreSQL ${setting.server_version}, fsync ${setting.fsync}, synchronous_commit ${setting.synchronous_commit}, wal_sync_method ${setting.wal_sync_method}\n`,
  );
  const base: number[] = [];
  const real = new Map<number, { rate: number; meanBatch: number; cpuUs: number; cpuShare: number }[]>(CONCURRENCY.map((c) => [c, []]));
  const single: number[] = [];
  const diag = diagnostics.map(() => [] as number[]);
  // Runs interleave the baseline and the real path, so a slow minute of the shared machine falls on both.
  for (let run = 0; run < RUNS; run++) {
    base.push(await baseline());
    for (const c of CONCURRENCY) real.get(c)!.push(await realPath(c));
    single.push(await singlePath(SINGLE_AT));
    for (const [i, d] of diagnostics.entries()) diag[i]!.push((await realPath(WIDEST, d.db)).rate);
    console.log(
      `run ${run + 1}: baseline ${base.at(-1)!.toFixed(0)} rows/s; ${CONCURRENCY.map((c) => `${c} session${c > 1 ? 's' : ''} ${real.get(c)!.at(-1)!.rate.toFixed(0)}/s`).join(', ')}; single append ${single.at(-1)!.toFixed(0)}/s; ${diagnostics.map((d, i) => `${d.name.split(' (')[0]} ${diag[i]!.at(-1)!.toFixed(0)}/s`).join(', ')}`,
    );
  }
  const b = median(base);
  console.log('\n| path | sessions at once | readings/s (median of runs) | runs | mean batch | Node CPU µs a reading (share of wall) | against the baseline |');
  console.log('|---|---|---|---|---|---|---|');
  console.log(`| baseline: multi-row INSERT of ${BATCH}, hashes precomputed | — | ${b.toFixed(0)} | ${base.map((x) => x.toFixed(0)).join(', ')} | ${BATCH} | | 1.00 |`);
  for (const c of CONCURRENCY) {
    const xs = real.get(c)!;
    const m = median(xs.map((x) => x.rate));
    const cpuUs = median(xs.map((x) => x.cpuUs));
    const share = median(xs.map((x) => x.cpuShare));
    console.log(`| real: recordReading (group commit) | ${c} | ${m.toFixed(0)} | ${xs.map((x) => x.rate.toFixed(0)).join(', ')} | ${median(xs.map((x) => x.meanBatch)).toFixed(1)} | ${cpuUs.toFixed(0)} (${(share * 100).toFixed(0)} %) | ${(m / b).toFixed(3)} |`);
  }
  console.log(`| single append, one transaction per reading | ${SINGLE_AT} | ${median(single).toFixed(0)} | ${single.map((x) => x.toFixed(0)).join(', ')} | 1 | | ${(median(single) / b).toFixed(3)} |`);
  for (const [i, d] of diagnostics.entries()) {
    const m = median(diag[i]!);
    console.log(`| real, ${d.name} | ${WIDEST} | ${m.toFixed(0)} | ${diag[i]!.map((x) => x.toFixed(0)).join(', ')} | | | ${(m / b).toFixed(3)} |`);
  }
  const chains = await Promise.all(opened.map(async (sessionId) => verifyChain((await listEventsBySession(db, { sessionId })) as SessionEvent[])));
  console.log(`hash chains intact and gapless: ${chains.filter((v) => v.ok).length} of ${chains.length} sessions`);
  const best = Math.max(...CONCURRENCY.map((c) => median(real.get(c)!.map((x) => x.rate))));
  console.log(`\nbest real path ${best.toFixed(0)} readings/s = ${(best / b).toFixed(3)} of the baseline; target at least 0.5: ${best / b >= 0.5 ? 'met' : 'NOT met'}; ${(best / median(single)).toFixed(1)}x the single append`);
  const [{ count }] = (await db.execute<{ count: string }>(sql`select count(*)::text as count from session_events where type = 'reading:recorded' and session_id = any(${sql.raw(`array[${opened.map((id) => `'${id}'`).join(',')}]::uuid[]`)})`)).rows as [{ count: string }];
  const expected = RUNS * (CONCURRENCY.length + diagnostics.length + 2) * READINGS;
  console.log(`readings stored by the benchmark: ${Number(count).toLocaleString('en')} of ${expected.toLocaleString('en')} sent`);
} finally {
  for (const d of diagnostics) await d.db.$client.end();
  await db.$client.end();
  cluster.stop();
}

