// `npm run test:faults`: a scripted technician streams readings (and answers moves) to real production server
// processes while this harness cuts the network, kills a server, restarts PostgreSQL, and runs two processes
// joined by the PostgreSQL adapter, one fault at a time and then all together. After each run it checks the
// stored log: every reading exactly once and in the technician's order, the expert holding every event (after
// catch-up), the hash chain whole. `--short` is the form `npm test` runs; `--json=<file>` writes the tally; `--no-build` uses the build in place.
import { writeFileSync } from 'node:fs';
import { eq } from 'drizzle-orm';
import { createDb, type Db } from '../db/client';
import { listEventsBySession } from '../db/queries/events';
import { screws } from '../db/schema';
import { verifyChain } from '../lib/session/hash-chain';
import { ScriptedExpert, ScriptedTechnician } from '../tests/faults/clients';
import { startForwarder, type Forwarder } from '../tests/faults/forwarder';
import { ServerProcess } from '../tests/faults/servers';
import { makeOrganisation, type OrgFixture } from '../tests/integration/helpers/fixtures';
import { signInOverHttp } from '../tests/integration/helpers/http';
import { startFakes } from './fakes';
import { buildIfStale, log, prepareDatabase } from './setup';

const args = process.argv.slice(2);
const short = args.includes('--short');
const jsonOut = args.find((a) => a.startsWith('--json='))?.slice('--json='.length);
const only = args.find((a) => a.startsWith('--only='))?.slice('--only='.length);
/** `--ports=<pg>,<server a>,<server b>` to run beside another run of the suite (`npm test` runs it on the defaults). */
const [PG_PORT, PORT_A, PORT_B] = (args.find((a) => a.startsWith('--ports='))?.slice('--ports='.length) ?? '54379,3301,3302').split(',').map(Number) as [number, number, number];
const READINGS = Number(args.find((a) => a.startsWith('--readings='))?.slice('--readings='.length) ?? (short ? 300 : 3000));
/** A move from the expert after this many readings seen. */
const MOVE_EVERY = 25;
const SECRET = 'levelwire-faults-secret-0123456789abcdef';
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

type Ctx = {
  a: ServerProcess;
  b: ServerProcess;
  tech: ScriptedTechnician;
  expert: ScriptedExpert;
  toA: Forwarder;
  toB: Forwarder;
  /** Resolves once the technician's acknowledged readings reach this share of the run. */
  at: (share: number) => Promise<void>;
  streaming: () => boolean;
  /** Records a fault at this moment; it has recovered when a command sent after it is acknowledged and reaches the expert. */
  mark: (what: string) => number;
  restartDatabase: () => Promise<void>;
};

type Scenario = { name: string; cluster: boolean; run: (ctx: Ctx) => Promise<void> };

async function dropsEvery(ctx: Ctx, minMs: number, maxMs: number) {
  while (ctx.streaming()) {
    await sleep(minMs + Math.random() * (maxMs - minMs));
    if (!ctx.streaming()) break;
    ctx.mark('connection cut');
    ctx.toA.cut();
    ctx.toB.cut();
  }
}

async function killAndRestart(ctx: Ctx, server: ServerProcess, signal: NodeJS.Signals) {
  ctx.mark(`${server.name} ${signal}`);
  const ms = await server.stop(signal);
  if (signal === 'SIGTERM') shutdownTimes.push(ms);
  await server.start();
}
const shutdownTimes: number[] = [];

const scenarios: Scenario[] = [
  { name: 'no fault (control)', cluster: false, run: async () => undefined },
  { name: 'connection drops', cluster: false, run: (ctx) => dropsEvery(ctx, short ? 600 : 2_000, short ? 1_200 : 4_000) },
  {
    name: 'server SIGKILL',
    cluster: false,
    run: async (ctx) => {
      await ctx.at(0.3);
      await killAndRestart(ctx, ctx.a, 'SIGKILL');
      await ctx.at(0.65);
      await killAndRestart(ctx, ctx.a, 'SIGKILL');
    },
  },
  {
    name: 'server SIGTERM (graceful)',
    cluster: false,
    run: async (ctx) => {
      await ctx.at(0.5);
      await killAndRestart(ctx, ctx.a, 'SIGTERM');
    },
  },
  {
    name: 'PostgreSQL restart',
    cluster: false,
    run: async (ctx) => {
      await ctx.at(0.4);
      ctx.mark('PostgreSQL restart');
      await ctx.restartDatabase();
    },
  },
  {
    name: 'two processes, one killed',
    cluster: true,
    run: async (ctx) => {
      await ctx.at(0.35);
      await killAndRestart(ctx, ctx.b, 'SIGKILL'); // the expert's process
      await ctx.at(0.7);
      await killAndRestart(ctx, ctx.a, 'SIGKILL'); // the technician's
    },
  },
  {
    name: 'all together',
    cluster: true,
    run: async (ctx) => {
      const drops = dropsEvery(ctx, short ? 800 : 2_500, short ? 1_600 : 5_000);
      await ctx.at(0.25);
      await killAndRestart(ctx, ctx.b, 'SIGKILL');
      await ctx.at(0.45);
      ctx.mark('PostgreSQL restart');
      await ctx.restartDatabase();
      await ctx.at(0.65);
      await killAndRestart(ctx, ctx.a, 'SIGKILL');
      await ctx.at(0.85);
      await killAndRestart(ctx, ctx.b, 'SIGTERM');
      await drops;
    },
  },
];

type Result = {
  name: string;
  sent: number;
  stored: number;
  duplicated: number;
  lost: number;
  inOrder: boolean;
  expertMissing: number;
  expertLive: number;
  expertCaughtUp: number;
  movesSent: number;
  movesStored: number;
  answersStored: number;
  refused: string[];
  chain: string;
  faults: number;
  recoveryMs: number[];
  resentAnswered: number;
  /** Commands refused as retryable (server closing, database away) and sent again. */
  retried: number;
  /** Commands whose acknowledgement never came (connection lost with it in flight), sent again. */
  unanswered: number;
  reconnects: number;
  seconds: number;
  /** From opening the session to the last check, without the server (re)starts before it. */
  streamSeconds: number;
  ok: boolean;
  problem?: string;
};

async function runScenario(s: Scenario, env: { db: Db; org: OrgFixture; cookies: { tech: string; expert: string }; a: ServerProcess; b: ServerProcess; toA: Forwarder; toB: Forwarder; restartDatabase: () => Promise<void> }) {
  const t0 = performance.now();
  const { a, b, toA, toB } = env;
  // Single-process runs use the default (no adapter); the two-process runs join both through PostgreSQL.
  const mode = s.cluster ? 'postgres' : 'local';
  for (const server of [a, b]) {
    const wanted = server === a || s.cluster;
    if (server.running && (!wanted || server.env.REALTIME_ADAPTER !== mode)) await server.stop('SIGTERM');
    server.env.REALTIME_ADAPTER = mode;
    if (wanted && !server.running) await server.start();
  }

  const tStream = performance.now();
  const res = await fetch(`${a.url}/api/sessions`, {
    method: 'POST',
    headers: { cookie: env.cookies.tech, 'content-type': 'application/json' },
    body: JSON.stringify({ machineId: env.org.machineId, experts: [env.org.users.expert.id] }),
  });
  if (res.status !== 201) throw new Error(`opening a session answered ${res.status}: ${await res.text()}`);
  const sessionId = ((await res.json()) as { session: { id: string } }).session.id;
  const screwIds = (await env.db.select({ id: screws.id }).from(screws).where(eq(screws.machineId, env.org.machineId))).map((r) => r.id);

  // The technician reaches the servers through one forwarder (its own process first), the expert through the other.
  const tech = new ScriptedTechnician(`http://127.0.0.1:${toA.port}`, env.cookies.tech, sessionId);
  const expert = new ScriptedExpert(`http://127.0.0.1:${toB.port}`, env.cookies.expert, sessionId);
  const marks: { what: string; at: number }[] = [];
  let generating = true;
  const readingsAcked = () => tech.acks.length - tech.movesAnswered; // close enough for pacing the faults
  const ctx: Ctx = {
    a,
    b,
    tech,
    expert,
    toA,
    toB,
    at: async (share) => {
      while (readingsAcked() < share * READINGS) await sleep(20);
    },
    streaming: () => generating || tech.pending > 0,
    mark: (what) => {
      marks.push({ what, at: Date.now() });
      return marks.length;
    },
    restartDatabase: env.restartDatabase,
  };

  // The expert sends a move each time it has seen MOVE_EVERY more readings.
  let movesDue = 0;
  const coach = setInterval(() => {
    let readingsSeen = 0;
    for (const e of expert.seen.values()) if (e.type === 'reading:recorded') readingsSeen += 1;
    while (movesDue < Math.floor(readingsSeen / MOVE_EVERY)) {
      expert.sendMove(screwIds[movesDue % screwIds.length]!, 'rough-level');
      movesDue += 1;
    }
  }, 200);

  let problem: string | undefined;
  const faults = s.run(ctx).catch((e: unknown) => {
    problem = `the fault script failed: ${e instanceof Error ? e.message : String(e)}`;
  });
  for (let i = 0; i < READINGS; i += 1) {
    tech.addReading(i);
    if (i % 10 === 9) await sleep(40); // about 250 readings a second offered; the outbox paces the rest
  }
  generating = false;
  try {
    await tech.drained(60_000);
    await faults;
    clearInterval(coach);
    await expert.drained(60_000);
    // The technician answers each move as it sees it; the last moves' broadcasts may still be on their way (or, after a
    // reconnect, wait for the next event to reveal the gap, as in a view): catch up until every move is taken up,
    // then wait for those answers to be stored.
    const answering = Date.now() + 20_000;
    while (tech.movesAnswered < expert.movesSent && Date.now() < answering) {
      await tech.join();
      await sleep(200);
    }
    await tech.drained(60_000);
  } catch (e) {
    problem ??= e instanceof Error ? e.message : String(e);
  }
  clearInterval(coach);

  // The expert catches up with everything stored (a last join, as a view does on its next event or reconnect).
  const stored = await listEventsBySession(env.db, { sessionId });
  const lastSeq = stored.at(-1)?.seq ?? 0;
  const deadline = Date.now() + 20_000;
  while (expert.contiguous() < lastSeq && Date.now() < deadline) {
    await expert.join();
    await sleep(200);
  }
  tech.close();
  expert.close();

  const readings = stored.filter((e) => e.type === 'reading:recorded').map((e) => e.id);
  const unique = new Set(readings);
  const wanted = new Set(tech.readingIds);
  const firstSeen = readings.filter((id, i) => readings.indexOf(id) === i);
  const inOrder = firstSeen.length === tech.readingIds.length && firstSeen.every((id, i) => id === tech.readingIds[i]);
  const expertMissing = stored.filter((e) => expert.seen.get(e.seq)?.id !== e.id).length;
  const verdict = verifyChain(stored);
  const moveIds = stored.filter((e) => e.type === 'move:sent').map((e) => e.id);
  const answers = stored.filter((e) => e.type === 'move:answered').map((e) => (e.payload as { moveId: string }).moveId);
  // Recovered when a command the technician sends after the fault is acknowledged and its event has reached the expert.
  const recoveryMs = marks.map((m) => {
    const ack = tech.firstAckSentAfter(m.at);
    const seen = ack && expert.arrivalOf(ack.seq);
    return ack === undefined || seen === undefined ? Number.NaN : Math.max(ack.at, seen) - m.at;
  });
  const result: Result = {
    name: s.name,
    sent: tech.readingIds.length,
    stored: readings.length,
    duplicated: readings.length - unique.size,
    lost: tech.readingIds.filter((id) => !unique.has(id)).length + [...unique].filter((id) => !wanted.has(id)).length,
    inOrder,
    expertMissing,
    expertLive: expert.live,
    expertCaughtUp: expert.caughtUp,
    movesSent: expert.movesSent,
    movesStored: moveIds.length,
    answersStored: answers.length,
    refused: [...tech.refused, ...expert.refused].map((e) => `${e.code}: ${e.message}`),
    chain: verdict.ok ? `verifies (${verdict.count} events)` : `broken at seq ${verdict.brokenAtSeq}: ${verdict.reason}`,
    faults: marks.length,
    recoveryMs,
    resentAnswered: tech.acks.filter((x) => x.duplicate).length + expert.acks.filter((x) => x.duplicate).length,
    retried: tech.retryableRefusals + expert.retryableRefusals,
    unanswered: tech.timeouts + expert.timeouts,
    reconnects: tech.reconnects + expert.reconnects - 2,
    seconds: (performance.now() - t0) / 1000,
    streamSeconds: (performance.now() - tStream) / 1000,
    ok: false,
    problem,
  };
  result.ok =
    !problem &&
    result.sent === READINGS &&
    result.duplicated === 0 &&
    result.lost === 0 &&
    result.inOrder &&
    result.expertMissing === 0 &&
    result.refused.length === 0 &&
    verdict.ok &&
    new Set(moveIds).size === moveIds.length &&
    result.movesStored === result.movesSent &&
    new Set(answers).size === answers.length &&
    answers.length === moveIds.length &&
    recoveryMs.every(Number.isFinite);
  return result;
}

const median = (xs: number[]) => {
  const s = [...xs].sort((p, q) => p - q);
  return s.length ? s[Math.floor((s.length - 1) / 2)]! : Number.NaN;
};

/** Recovery times as "median / max", or "–" for a run without faults. */
const recoveryOf = (r: Result, unit = '') => (r.recoveryMs.length ? `${Math.round(median(r.recoveryMs))} / ${Math.round(Math.max(...r.recoveryMs))}${unit}` : '–');

async function main() {
  const t0 = performance.now();
  // `--no-build`: use the build in place (while sources change under you); otherwise build when stale.
  if (!args.includes('--no-build')) buildIfStale();
  const cluster = await prepareDatabase({ name: 'pg-faults', port: PG_PORT, database: 'levelwire_faults', fresh: true });
  const fakes = await startFakes('.data/faults-fakes');
  const db = createDb(cluster.url, 3);
  const org = await makeOrganisation(db, 'Faults');
  const logDir = '.data/faults-logs';
  const serverEnv = { ...fakes.env, DATABASE_URL: cluster.url, NEXTAUTH_SECRET: SECRET, SHUTDOWN_GRACE_SECONDS: '5', REALTIME_ADAPTER: 'local' };
  const a = new ServerProcess('server-a', PORT_A, { ...serverEnv }, logDir);
  const b = new ServerProcess('server-b', PORT_B, { ...serverEnv }, logDir);
  const toA = await startForwarder([a.port, b.port]);
  const toB = await startForwarder([b.port, a.port]);
  const dbRestarts: number[] = [];
  const restartDatabase = async () => {
    const s0 = performance.now();
    await cluster.restart();
    dbRestarts.push(performance.now() - s0);
  };
  const stopAll = async () => {
    for (const s of [a, b]) if (s.running) await s.stop('SIGKILL');
    await toA.close();
    await toB.close();
    await db.$client.end().catch(() => undefined);
    await fakes.stop();
    cluster.stop();
  };
  process.once('SIGINT', () => void stopAll().then(() => process.exit(130)));

  const results: Result[] = [];
  try {
    await a.start();
    const cookies = { tech: await signInOverHttp(org.users.technician.email, undefined, a.url), expert: await signInOverHttp(org.users.expert.email, undefined, a.url) };
    for (const s of scenarios) {
      if (only && !s.name.includes(only)) continue;
      log(`faults: ${s.name} (${READINGS} readings) ...`);
      let r: Result;
      try {
        r = await runScenario(s, { db, org, cookies, a, b, toA, toB, restartDatabase });
      } catch (e) {
        r = { name: s.name, ok: false, problem: e instanceof Error ? e.message : String(e) } as Result;
      }
      results.push(r);
      log(
        r.sent === undefined
          ? `  FAILED: ${r.problem}`
          : `  ${r.ok ? 'ok' : 'FAILED'}: sent ${r.sent}, stored ${r.stored}, duplicated ${r.duplicated}, lost ${r.lost}, ${r.inOrder ? 'in order' : 'OUT OF ORDER'}; ` +
              `expert missing ${r.expertMissing} (live ${r.expertLive}, caught up ${r.expertCaughtUp}); moves ${r.movesSent} sent / ${r.movesStored} stored / ${r.answersStored} answered; ` +
              `chain ${r.chain}; ${r.faults} faults, recovery median / max ${recoveryOf(r, ' ms')}; ` +
              `reconnects ${r.reconnects}, unanswered ${r.unanswered}, refused as retryable ${r.retried}, resends answered as already stored ${r.resentAnswered}; ${r.streamSeconds.toFixed(1)} s streaming, ${r.seconds.toFixed(1)} s in all` +
              (r.refused.length ? `; refused: ${r.refused.slice(0, 3).join(' | ')}` : '') +
              (r.problem ? `; problem: ${r.problem}` : ''),
      );
    }
  } finally {
    await stopAll();
  }

  console.log('\nFault suite (counts of readings; recovery = from the fault until a reading sent after it is acknowledged to the technician and delivered to the expert)');
  console.log('| fault | sent | stored | duplicated | lost | order | expert missing | chain | faults | recovery median / max ms | result |');
  console.log('|---|---|---|---|---|---|---|---|---|---|---|');
  for (const r of results) {
    if (r.sent === undefined) {
      console.log(`| ${r.name} | | | | | | | | | | FAILED: ${r.problem} |`);
      continue;
    }
    console.log(`| ${r.name} | ${r.sent} | ${r.stored} | ${r.duplicated} | ${r.lost} | ${r.inOrder ? 'kept' : 'broken'} | ${r.expertMissing} | ${r.chain.startsWith('verifies') ? 'verifies' : 'BROKEN'} | ${r.faults} | ${recoveryOf(r)} | ${r.ok ? 'ok' : 'FAILED'} |`);
  }
  if (shutdownTimes.length) console.log(`SIGTERM to exit: ${shutdownTimes.map((t) => Math.round(t)).join(', ')} ms`);
  if (dbRestarts.length) console.log(`PostgreSQL restart (pg_ctl -m fast): ${dbRestarts.map((t) => Math.round(t)).join(', ')} ms`);
  const passed = results.filter((r) => r.ok).length;
  const failed = results.length - passed;
  console.log(`faults: ${passed} passed, ${failed} failed in ${Math.round((performance.now() - t0) / 1000)} s`);
  if (jsonOut) writeFileSync(jsonOut, JSON.stringify({ passed, failed, results }, null, 2));
  process.exit(failed > 0 || results.length === 0 ? 1 : 0);
}

await main();
