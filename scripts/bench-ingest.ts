// `npm run bench:ingest`: readings per second durably stored through the real append path (`recordReading`: the
// caller's access, the session row locked, the hash chained, one commit per reading), with 1, 10 and 50 sessions
// taking readings at once, against raw batched inserts of the same rows (the baseline, measured in the same run).
// A throwaway cluster on :54399, restarted with fsync on so that a commit is on disk when it is acknowledged.
// Also measured, not shipped: PostgreSQL's commit_delay, synchronous_commit off (diagnosis only) and a prototype of
// group commit in the append path. `-- --readings=N --runs=N --sessions=1,10,50` change the sizes.
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
import { listEventsBySession } from '../db/queries/events';
import type { SessionEvent } from '../lib/session/events';
import { eventHash, verifyChain } from '../lib/session/hash-chain';
import { accessForCommand, recordReading } from '../lib/session/service';
import { startCluster } from './postgres';
import { prepareDatabase } from './setup';

const arg = (name: string, fallback: number) => Number(process.argv.find((a) => a.startsWith(`--${name}=`))?.split('=')[1] ?? fallback);
const READINGS = arg('readings', 3_000);
const RUNS = arg('runs', 3);
const CONCURRENCY = (process.argv.find((a) => a.startsWith('--sessions='))?.split('=')[1] ?? '1,10,50').split(',').map(Number);
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
// Two diagnostic pools for the widest case, same path, one setting changed per connection:
// - commit_delay: PostgreSQL's own group commit (a committing backend waits this long, in µs, for others to join
//   its WAL flush when at least commit_siblings transactions are open); every commit still waits for its flush.
// - synchronous_commit off: the commit returns before its WAL is flushed (NOT durable: a crash may lose the last
//   acknowledged readings), measured only to show what the flush costs.
const withOption = (o: string) => createDb(`${cluster.url}?options=${encodeURIComponent(o)}`, POOL);
const diagnostics = [
  { name: 'commit_delay 1000 µs, commit_siblings 5 (durable)', db: withOption('-c commit_delay=1000 -c commit_siblings=5') },
  { name: 'synchronous_commit off (not durable; diagnosis only)', db: withOption('-c synchronous_commit=off') },
];
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
  async function realPath(sessions: number, via = db): Promise<number> {
    const ids = await Promise.all(Array.from({ length: sessions }, open));
    const per = ids.map((_, i) => Math.floor(READINGS / sessions) + (i < READINGS % sessions ? 1 : 0));
    const work = per.map((n) => Array.from({ length: n }, reading));
    const t = performance.now();
    await Promise.all(
      ids.map(async (sessionId, i) => {
        for (const r of work[i]!) await recordReading(via, actor, { id: crypto.randomUUID(), sessionId, reading: r });
      }),
    );
    return READINGS / ((performance.now() - t) / 1000);
  }

  /**
   * A prototype of group commit, measured, not shipped: each command is checked as recordReading checks it (the
   * caller's access), then waits in one queue; whatever waits when the previous batch has committed goes in the
   * next transaction: every session's row locked at once (in id order, so two batches cannot deadlock), resent ids
   * looked up at once, each reading chained to its session's head in arrival order, one multi-row INSERT, one UPDATE
   * of the heads, one commit; each caller is answered after that commit. With one reading in flight per session
   * (each waits for its acknowledgement), a batch holds at most one reading of each session.
   */
  function groupCommitter() {
    type Waiting = { sessionId: string; id: string; reading: LevelReadingInput; done: (seq: number) => void; fail: (e: unknown) => void };
    let queue: Waiting[] = [];
    let running = false;
    const batches: number[] = [];
    async function flush(): Promise<void> {
      running = true;
      while (queue.length > 0) {
        const batch = queue;
        queue = [];
        batches.push(batch.length);
        const client = await db.$client.connect();
        try {
          await client.query('begin');
          const ids = [...new Set(batch.map((w) => w.sessionId))].sort();
          const heads = new Map(
            (
              await client.query<{ id: string; last_seq: string; last_hash: string; state: string; level_division_urad: number }>(
                'select id, last_seq, last_hash, state, level_division_urad from leveling_sessions where id = any($1::uuid[]) order by id for update',
                [ids],
              )
            ).rows.map((r) => [r.id, { seq: Number(r.last_seq), hash: r.last_hash, state: r.state, division: r.level_division_urad }]),
          );
          const resent = new Set((await client.query<{ id: string }>('select id from session_events where id = any($1::uuid[])', [batch.map((w) => w.id)])).rows.map((r) => r.id));
          const rows: unknown[][] = [];
          const seqs: number[] = [];
          for (const w of batch) {
            const head = heads.get(w.sessionId)!;
            if (head.state !== 'live' || resent.has(w.id)) throw new Error('the prototype takes live sessions and new ids only');
            const serverTs = new Date();
            const content = {
              seq: head.seq + 1,
              id: w.id,
              type: 'reading:recorded' as const,
              payload: { ...w.reading, slopeUrad: readingToSlopeUrad(w.reading.divisions, head.division) },
              actorId: actor.id,
              actorRole: actor.role,
              serverTs: serverTs.toISOString(),
            };
            const hash = eventHash(head.hash, content);
            rows.push([w.sessionId, content.seq, w.id, content.type, JSON.stringify(content.payload), actor.id, actor.role, null, serverTs, head.hash, hash]);
            seqs.push(content.seq);
            head.seq = content.seq;
            head.hash = hash;
          }
          const values = rows.map((_, j) => `(${Array.from({ length: 11 }, (_, c) => `$${j * 11 + c + 1}`).join(', ')})`).join(', ');
          await client.query(`insert into session_events (session_id, seq, id, type, payload, actor_id, actor_role, client_ts, server_ts, prev_hash, hash) values ${values}`, rows.flat());
          const touched = [...heads.entries()];
          await client.query(
            'update leveling_sessions s set last_seq = v.seq, last_hash = v.hash from (select unnest($1::uuid[]) as id, unnest($2::bigint[]) as seq, unnest($3::text[]) as hash) v where s.id = v.id',
            [touched.map(([id]) => id), touched.map(([, h]) => h.seq), touched.map(([, h]) => h.hash)],
          );
          await client.query('commit');
          batch.forEach((w, k) => w.done(seqs[k]!));
        } catch (e) {
          await client.query('rollback').catch(() => undefined);
          batch.forEach((w) => w.fail(e));
        } finally {
          client.release();
        }
      }
      running = false;
    }
    return {
      batches,
      async submit(sessionId: string, reading: LevelReadingInput): Promise<number> {
        await accessForCommand(db, actor, sessionId, 'reading:submit');
        const seq = new Promise<number>((done, fail) => queue.push({ sessionId, id: crypto.randomUUID(), reading, done, fail }));
        if (!running) void flush();
        return seq;
      },
    };
  }

  const groupedSessions: string[] = [];
  async function groupCommitPath(sessions: number): Promise<{ rate: number; meanBatch: number }> {
    const ids = await Promise.all(Array.from({ length: sessions }, open));
    groupedSessions.push(...ids);
    const per = ids.map((_, i) => Math.floor(READINGS / sessions) + (i < READINGS % sessions ? 1 : 0));
    const work = per.map((n) => Array.from({ length: n }, reading));
    const committer = groupCommitter();
    const t = performance.now();
    await Promise.all(
      ids.map(async (sessionId, i) => {
        for (const r of work[i]!) await committer.submit(sessionId, r);
      }),
    );
    const rate = READINGS / ((performance.now() - t) / 1000);
    return { rate, meanBatch: committer.batches.reduce((a, b) => a + b, 0) / committer.batches.length };
  }

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
  const real = new Map<number, number[]>(CONCURRENCY.map((c) => [c, []]));
  const diag = diagnostics.map(() => [] as number[]);
  const grouped = new Map<number, { rate: number; meanBatch: number }[]>(CONCURRENCY.filter((c) => c > 1).map((c) => [c, []]));
  // Runs interleave the baseline and the real path, so a slow minute of the shared machine falls on both.
  for (let run = 0; run < RUNS; run++) {
    base.push(await baseline());
    for (const c of CONCURRENCY) real.get(c)!.push(await realPath(c));
    for (const [i, d] of diagnostics.entries()) diag[i]!.push(await realPath(WIDEST, d.db));
    for (const [c, xs] of grouped) xs.push(await groupCommitPath(c));
    console.log(
      `run ${run + 1}: baseline ${base.at(-1)!.toFixed(0)} rows/s; ${CONCURRENCY.map((c) => `${c} session${c > 1 ? 's' : ''} ${real.get(c)!.at(-1)!.toFixed(0)}/s`).join(', ')}; ${diagnostics.map((d, i) => `${d.name.split(' (')[0]} ${diag[i]!.at(-1)!.toFixed(0)}/s`).join(', ')}`,
    );
  }
  const b = median(base);
  console.log('\n| path | sessions at once | readings/s (median of runs) | runs | against the baseline |');
  console.log('|---|---|---|---|---|');
  console.log(`| baseline: multi-row INSERT of ${BATCH}, hashes precomputed | — | ${b.toFixed(0)} | ${base.map((x) => x.toFixed(0)).join(', ')} | 1.00 |`);
  for (const c of CONCURRENCY) {
    const m = median(real.get(c)!);
    console.log(`| real: recordReading, one commit each | ${c} | ${m.toFixed(0)} | ${real.get(c)!.map((x) => x.toFixed(0)).join(', ')} | ${(m / b).toFixed(3)} |`);
  }
  for (const [i, d] of diagnostics.entries()) {
    const m = median(diag[i]!);
    console.log(`| real, ${d.name} | ${WIDEST} | ${m.toFixed(0)} | ${diag[i]!.map((x) => x.toFixed(0)).join(', ')} | ${(m / b).toFixed(3)} |`);
  }
  for (const [c, xs] of grouped) {
    const m = median(xs.map((x) => x.rate));
    console.log(`| prototype: group commit (not shipped), mean batch ${median(xs.map((x) => x.meanBatch)).toFixed(1)} | ${c} | ${m.toFixed(0)} | ${xs.map((x) => x.rate.toFixed(0)).join(', ')} | ${(m / b).toFixed(3)} |`);
  }
  const chains = await Promise.all(groupedSessions.map(async (sessionId) => verifyChain((await listEventsBySession(db, { sessionId })) as SessionEvent[])));
  console.log(`group commit prototype: ${chains.filter((v) => v.ok).length} of ${chains.length} sessions' hash chains intact and gapless`);
  const best = Math.max(...CONCURRENCY.map((c) => median(real.get(c)!)));
  console.log(`\nbest real path ${best.toFixed(0)} readings/s = ${(best / b).toFixed(3)} of the baseline; target at least 0.5: ${best / b >= 0.5 ? 'met' : 'NOT met'}`);
  if (grouped.size > 0) {
    const proto = Math.max(...[...grouped.values()].map((xs) => median(xs.map((x) => x.rate))));
    console.log(`group commit prototype at best ${proto.toFixed(0)} readings/s = ${(proto / b).toFixed(3)} of the baseline, ${(proto / best).toFixed(1)}x the real path`);
  }
  const [{ count }] = (await db.execute<{ count: string }>(sql`select count(*)::text as count from session_events where type = 'reading:recorded' and session_id = any(${sql.raw(`array[${opened.map((id) => `'${id}'`).join(',')}]::uuid[]`)})`)).rows as [{ count: string }];
  const expected = RUNS * (CONCURRENCY.length + diagnostics.length + grouped.size + 1) * READINGS;
  console.log(`readings stored by the benchmark: ${Number(count).toLocaleString('en')} of ${expected.toLocaleString('en')} sent`);
} finally {
  for (const d of diagnostics) await d.db.$client.end();
  await db.$client.end();
  cluster.stop();
}

