// `npm run bench:live`: live sessions under load. Per session a scripted technician sends 2 level readings a second
// and a scripted expert watches (socket.io clients in this process, so send and receipt share a clock), against the
// production build on loopback at 1, 100 and 500 concurrent sessions; in the same run the same load goes to a bare
// socket.io relay (bench-relay.ts: no sign-in, no database) as the baseline. Then the scale-out: one process against
// two and three joined by the PostgreSQL adapter, clients spread round-robin. Last, one CPU profile at the top load.
// A throwaway cluster (fsync on: every event is durably committed before its broadcast, as in production).
//
// Flags: --sessions=1,100,500  --seconds=20 (measured per step, after a 3 s warm-up)  --processes=1,2,3
// --scale-sessions=200  --rate=2 (readings a second per technician)  --only=live|scale|profile  --fsync=off  --no-build
import { fork } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { monitorEventLoopDelay, performance } from 'node:perf_hooks';
import { inArray } from 'drizzle-orm';
import { io, type Socket } from 'socket.io-client';
import { createDb, type Db } from '../db/client';
import { openSession } from '../db/queries/sessions';
import { levelingSessions } from '../db/schema';
import { PROTOCOL_VERSION, SOCKET_PATH } from '../lib/realtime/contract';
import { ServerProcess } from '../tests/faults/servers';
import { makeOrganisation } from '../tests/integration/helpers/fixtures';
import { signInOverHttp } from '../tests/integration/helpers/http';
import { startFakes } from './fakes';
import { buildIfStale, log, prepareDatabase } from './setup';

const args = process.argv.slice(2);
const flag = (name: string) => args.find((a) => a.startsWith(`--${name}=`))?.slice(name.length + 3);
const list = (v: string | undefined, fallback: number[]) => (v ? v.split(',').map(Number) : fallback);
const LEVELS = list(flag('sessions'), [1, 100, 500]);
const PROCESSES = list(flag('processes'), [1, 2, 3]);
const SCALE_SESSIONS = Number(flag('scale-sessions') ?? 200);
const SECONDS = Number(flag('seconds') ?? 20);
const RATE = Number(flag('rate') ?? 2);
const ONLY = flag('only');
const FSYNC = flag('fsync') !== 'off';
const WARMUP_MS = 3_000;
/** After the window, how long answers and deliveries may still arrive before a reading counts as lost. */
const DRAIN_MS = 5_000;
const SECRET = 'levelwire-bench-live-secret-0123456789';
const TARGET_P99_MS = 50;
const TARGET_RATIO = 2;
const PORTS = [3401, 3402, 3403];
const CLK_TCK = 100; // Linux USER_HZ: /proc times are in hundredths of a second
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const wants = (part: string) => !ONLY || ONLY === part;

// ---- measuring the processes ----

/** utime + stime of a process, in ticks; 0 once it has gone. */
function cpuTicks(pid: number): number {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    return Number(fields[11]) + Number(fields[12]); // fields 14 and 15 of proc(5), counted after the name
  } catch {
    return 0;
  }
}

function rssMb(pid: number): number {
  try {
    const kb = /VmRSS:\s+(\d+)/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'))?.[1];
    return Number(kb ?? 0) / 1024;
  } catch {
    return 0;
  }
}

/** The postmaster and its backends (the benchmark's own cluster). */
function postgresPids(dataDir: string): number[] {
  const postmaster = Number(readFileSync(path.join(dataDir, 'postmaster.pid'), 'utf8').split('\n')[0]);
  const pids = [postmaster];
  for (const name of readdirSync('/proc')) {
    if (!/^\d+$/.test(name)) continue;
    try {
      const stat = readFileSync(`/proc/${name}/stat`, 'utf8');
      if (Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]) === postmaster) pids.push(Number(name));
    } catch {
      /* ended meanwhile */
    }
  }
  return pids;
}

/** CPU (% of one core, summed) of a set of processes between start() and stop(), and their peak summed RSS. */
function usageMeter(pids: () => number[]) {
  let set: number[] = [];
  let ticks0 = new Map<number, number>();
  let t0 = 0;
  let peakRss = 0;
  let timer: NodeJS.Timeout | undefined;
  const sampleRss = () => {
    peakRss = Math.max(peakRss, set.reduce((s, p) => s + rssMb(p), 0));
  };
  return {
    start() {
      set = pids();
      ticks0 = new Map(set.map((p) => [p, cpuTicks(p)]));
      t0 = performance.now();
      peakRss = 0;
      sampleRss();
      timer = setInterval(sampleRss, 1_000);
    },
    stop(): { cpuPct: number; rssMb: number } {
      clearInterval(timer);
      sampleRss();
      const seconds = (performance.now() - t0) / 1000;
      let ticks = 0;
      for (const p of set) {
        const now = cpuTicks(p);
        if (now > 0) ticks += now - ticks0.get(p)!;
      }
      return { cpuPct: (ticks / CLK_TCK / seconds) * 100, rssMb: peakRss };
    },
  };
}

// ---- the load ----

type Target = { name: string; urls: string[]; cookies?: { tech: string; expert: string }; pids: () => number[] };
/** One reading: `sentAt` is when it was taken (and sent, unless the one before it was still unanswered). */
type Rec = { sentAt: number; ackAt?: number; seenAt?: number; failed?: boolean };
type Row = {
  target: string;
  sessions: number;
  processes: number;
  delivery: Pct;
  ack: Pct;
  deliveredPerS: number;
  sent: number;
  lost: number;
  refused: number;
  /** Readings still in the outboxes when the drain ended. */
  unsent: number;
  cpuPct: number;
  rssMb: number;
  pgCpuPct: number;
  clientCpuPct: number;
  clientLagP99: number;
  /** The measured window, performance.now() ms: the profile is cut to it. */
  window: [number, number];
};
type Pct = { p50: number; p95: number; p99: number };

function percentiles(xs: number[]): Pct {
  const s = [...xs].sort((a, b) => a - b);
  const at = (p: number) => (s.length ? s[Math.min(s.length - 1, Math.ceil(s.length * p) - 1)]! : Number.NaN);
  return { p50: at(0.5), p95: at(0.95), p99: at(0.99) };
}

type ClientSocket = Socket;

function connect(url: string, cookie: string | undefined): Promise<ClientSocket> {
  const socket = io(url, {
    path: SOCKET_PATH,
    transports: ['websocket'],
    forceNew: true,
    reconnection: false,
    extraHeaders: cookie ? { cookie } : undefined,
    auth: { protocol: PROTOCOL_VERSION },
  });
  return new Promise((resolve, reject) => {
    socket.once('connect', () => resolve(socket));
    socket.once('connect_error', (e) => reject(new Error(`${url}: ${e.message}`)));
  });
}

/** Runs the load on `sessions` (technician and expert sockets spread round-robin over the target's URLs) and measures. */
async function runLoad(target: Target, sessions: { id: string; lastSeq: number }[], pgPids: () => number[]): Promise<Row> {
  const n = sessions.length;
  log(`  ${target.name}: ${n} session(s) on ${target.urls.length} process(es), connecting ${2 * n} sockets ...`);
  const pairs: { tech: ClientSocket; expert: ClientSocket }[] = [];
  let k = 0;
  const nextUrl = () => target.urls[k++ % target.urls.length]!;
  // A few handshakes at a time, as people arrive; each socket joins its session's room before the load starts.
  for (let i = 0; i < n; i += 25) {
    const batch = sessions.slice(i, i + 25).map(async (s) => {
      const techUrl = nextUrl();
      const expertUrl = nextUrl();
      const [tech, expert] = await Promise.all([connect(techUrl, target.cookies?.tech), connect(expertUrl, target.cookies?.expert)]);
      for (const socket of [tech, expert]) {
        const res = (await socket.timeout(30_000).emitWithAck('session:join', { sessionId: s.id, afterSeq: s.lastSeq })) as { ok: boolean; error?: { message: string } };
        if (!res.ok) throw new Error(`session:join refused: ${res.error?.message}`);
      }
      return { tech, expert };
    });
    pairs.push(...(await Promise.all(batch)));
  }

  const recs = new Map<string, Rec>();
  let windowStart = Number.POSITIVE_INFINITY;
  let windowEnd = Number.POSITIVE_INFINITY;
  let refused = 0;
  let receivedInWindow = 0; // every reading the experts got in the window, whenever it was taken: the throughput
  for (const { expert } of pairs) {
    expert.on('reading:recorded', (e: { id: string }) => {
      const at = performance.now();
      if (at >= windowStart && at < windowEnd) receivedInWindow += 1;
      const r = recs.get(e.id);
      if (r && r.seenAt === undefined) r.seenAt = at;
    });
  }
  const intervalMs = 1000 / RATE;
  const timers: NodeJS.Timeout[] = [];
  let taking = true;
  // Each technician takes a reading every interval (phases spread over it) into an outbox that, as the field view's,
  // sends one command at a time: past saturation readings wait in the outbox, and that wait is part of their latency.
  const outboxes = pairs.map(({ tech }, idx) => {
    const sessionId = sessions[idx]!.id;
    const queue: { id: string; rec: Rec; j: number }[] = [];
    let inFlight = false;
    let j = 0;
    const pump = () => {
      if (inFlight || queue.length === 0) return;
      const { id, rec, j: k } = queue.shift()!;
      inFlight = true;
      const reading = { kind: 'level', axis: k % 2 ? 'x' : 'y', positionMm: (k % 9) * 100 - 400, divisions: ((k * 7) % 41) / 2 - 10 };
      tech.emit('reading:submit', { id, sessionId, clientTs: new Date().toISOString(), reading }, (ack: { ok: boolean }) => {
        rec.ackAt = performance.now();
        if (!ack.ok) {
          rec.failed = true;
          refused += 1;
        }
        inFlight = false;
        pump();
      });
    };
    const take = () => {
      if (!taking) return;
      const id = crypto.randomUUID();
      const rec: Rec = { sentAt: performance.now() };
      if (rec.sentAt >= windowStart && rec.sentAt < windowEnd) recs.set(id, rec);
      queue.push({ id, rec, j: j++ });
      pump();
    };
    timers.push(
      setTimeout(() => {
        take();
        timers.push(setInterval(take, intervalMs));
      }, (intervalMs * idx) / n),
    );
    return queue;
  });

  await sleep(WARMUP_MS);
  const server = usageMeter(target.pids);
  const pg = usageMeter(pgPids);
  const lag = monitorEventLoopDelay({ resolution: 10 });
  const client0 = process.cpuUsage();
  windowStart = performance.now();
  windowEnd = windowStart + SECONDS * 1000;
  server.start();
  pg.start();
  lag.enable();
  await sleep(SECONDS * 1000);
  const serverUse = server.stop();
  const pgUse = pg.stop();
  lag.disable();
  const clientCpu = process.cpuUsage(client0);
  taking = false;
  for (const t of timers) clearInterval(t);
  const drainUntil = performance.now() + DRAIN_MS;
  const open = () => [...recs.values()].some((r) => r.ackAt === undefined || (r.seenAt === undefined && !r.failed));
  while (open() && performance.now() < drainUntil) await sleep(100);

  const unsent = outboxes.reduce((sum, q) => sum + q.length, 0);
  for (const { tech, expert } of pairs) {
    tech.disconnect();
    expert.disconnect();
  }
  const all = [...recs.values()];
  const delivered = all.filter((r) => r.seenAt !== undefined);
  return {
    target: target.name,
    sessions: n,
    processes: target.urls.length,
    delivery: percentiles(delivered.map((r) => r.seenAt! - r.sentAt)),
    ack: percentiles(all.filter((r) => r.ackAt !== undefined && !r.failed).map((r) => r.ackAt! - r.sentAt)),
    deliveredPerS: receivedInWindow / SECONDS,
    sent: all.length,
    lost: all.length - delivered.length,
    refused,
    unsent,
    cpuPct: serverUse.cpuPct,
    rssMb: serverUse.rssMb,
    pgCpuPct: pgUse.cpuPct,
    clientCpuPct: ((clientCpu.user + clientCpu.system) / 1e6 / SECONDS) * 100,
    clientLagP99: lag.percentile(99) / 1e6,
    window: [windowStart, windowEnd],
  };
}

// ---- the profile ----

type ProfileNode = { id: number; callFrame: { functionName: string; url: string; lineNumber: number }; children?: number[] };
type Profile = { nodes: ProfileNode[]; samples: number[]; timeDeltas: number[] };

/**
 * The top self-time functions and packages of a .cpuprofile within `[fromMs, toMs]` after the profile began (the
 * load's window, not the start-up), as shares of the busy (not idle) time.
 */
function summariseProfile(file: string, fromMs: number, toMs: number) {
  const profile = JSON.parse(readFileSync(file, 'utf8')) as Profile;
  const byId = new Map(profile.nodes.map((n) => [n.id, n]));
  const selfUs = new Map<number, number>();
  let atUs = 0;
  let windowUs = 0;
  profile.samples.forEach((id, k) => {
    const delta = profile.timeDeltas[k] ?? 0;
    atUs += delta;
    if (atUs < fromMs * 1000 || atUs > toMs * 1000) return;
    windowUs += delta;
    if (byId.get(id)!.callFrame.functionName === '(idle)') return;
    selfUs.set(id, (selfUs.get(id) ?? 0) + delta);
  });
  const busy = [...selfUs.values()].reduce((a, b) => a + b, 0);
  const fns = new Map<string, number>();
  const packages = new Map<string, number>();
  for (const [id, us] of selfUs) {
    const { functionName, url, lineNumber } = byId.get(id)!.callFrame;
    const inModules = url.split('node_modules/').at(-1)!;
    const where = url.includes('node_modules/') ? inModules : url.replace(/^file:\/\//, '');
    const fn = `${functionName || '(anonymous)'} ${where ? `${where.split('/').slice(-2).join('/')}:${lineNumber + 1}` : ''}`.trim();
    fns.set(fn, (fns.get(fn) ?? 0) + us);
    const pkg = !url
      ? functionName.startsWith('(') ? functionName : `(native) ${functionName}`
      : url.startsWith('node:')
        ? url.split('/').slice(0, 2).join('/')
        : url.includes('node_modules/')
          ? inModules.split('/').slice(0, inModules.startsWith('@') ? 2 : 1).join('/')
          : url.includes('/.next/')
            ? '.next (Next bundles)'
            : 'dist/server.js (Levelwire)';
    packages.set(pkg, (packages.get(pkg) ?? 0) + us);
  }
  const top = (m: Map<string, number>, count: number) =>
    [...m.entries()]
      .sort((a, b) => b[1] - a[1])
      .slice(0, count)
      .map(([name, us]) => ({ name, share: us / busy }));
  return { seconds: windowUs / 1e6, busyShare: busy / windowUs, functions: top(fns, 15), packages: top(packages, 12) };
}

// ---- the run ----

const f1 = (x: number) => (Number.isFinite(x) ? x.toFixed(1) : '–');
const pctCells = (p: Pct) => `${f1(p.p50)} / ${f1(p.p95)} / ${f1(p.p99)}`;

async function main() {
  const t0 = performance.now();
  if (!args.includes('--no-build')) buildIfStale();
  const machine = `${os.cpus().length} cores (${os.cpus()[0]?.model.trim()}), ${Math.round(os.totalmem() / 2 ** 30)} GB RAM, Node ${process.version}, load average before the run ${os.loadavg()[0]!.toFixed(2)}`;
  const clusterOpts = { name: 'pg-bench-live', port: 54389, database: 'levelwire_bench_live' };
  let cluster = await prepareDatabase({ ...clusterOpts, fresh: true });
  if (FSYNC) {
    // A fresh cluster starts with fsync off; started again from the same folder it keeps the production setting.
    cluster.stop();
    cluster = await prepareDatabase({ ...clusterOpts, fresh: false });
  }
  const pgVersion = readFileSync(path.join(cluster.dataDir, 'PG_VERSION'), 'utf8').trim();
  const fakes = await startFakes('.data/bench-live-fakes');
  const db: Db = createDb(cluster.url, 4);
  const org = await makeOrganisation(db, 'Bench');
  const logDir = '.data/bench-live-logs';
  const profDir = path.resolve('.data/bench-live-prof');
  const serverEnv = { ...fakes.env, DATABASE_URL: cluster.url, NEXTAUTH_SECRET: SECRET, SHUTDOWN_GRACE_SECONDS: '3', REALTIME_ADAPTER: 'local' };
  const servers = PORTS.map((port, k) => new ServerProcess(`bench-${String.fromCharCode(97 + k)}`, port, { ...serverEnv }, logDir));
  const relay = fork('scripts/bench-relay.ts', [], { execArgv: ['--import', 'tsx'], stdio: ['ignore', 'inherit', 'inherit', 'ipc'] });
  const relayPort = await new Promise<number>((resolve) => relay.once('message', (m: { port: number }) => resolve(m.port)));
  const stopAll = async () => {
    relay.kill('SIGTERM');
    for (const s of servers) if (s.running) await s.stop('SIGKILL');
    await db.$client.end().catch(() => undefined);
    await fakes.stop();
    cluster.stop();
  };
  process.once('SIGINT', () => void stopAll().then(() => process.exit(130)));

  const liveRows: { relay: Row; levelwire: Row }[] = [];
  const scaleRows: { label: string; row: Row }[] = [];
  let profile: ReturnType<typeof summariseProfile> | undefined;
  try {
    const [a] = servers;
    await a!.start();
    const cookies = { tech: await signInOverHttp(org.users.technician.email, undefined, a!.url), expert: await signInOverHttp(org.users.expert.email, undefined, a!.url) };
    // One technician and one expert share every session (the service allows it); each session is its own room and
    // its own row lock, which is what the load contends on. Opened straight through the query the route calls.
    const count = Math.max(...(wants('live') ? LEVELS : [0]), wants('scale') ? SCALE_SESSIONS : 0, wants('profile') ? Math.max(...LEVELS) : 0);
    const sessionIds: string[] = [];
    for (let i = 0; i < count; i++) {
      const { session } = await openSession(db, { organisationId: org.organisationId, machineId: org.machineId, technician: { id: org.users.technician.id, name: org.users.technician.name }, levelDivisionUrad: 20, experts: [org.users.expert.id] });
      sessionIds.push(session.id);
    }
    const sessionsFor = async (n: number) => {
      const rows = await db.select({ id: levelingSessions.id, lastSeq: levelingSessions.lastSeq }).from(levelingSessions).where(inArray(levelingSessions.id, sessionIds.slice(0, n)));
      const bySeq = new Map(rows.map((r) => [r.id, r.lastSeq]));
      return sessionIds.slice(0, n).map((id) => ({ id, lastSeq: bySeq.get(id)! }));
    };
    const pgPids = () => postgresPids(cluster.dataDir);
    const relayTarget: Target = { name: 'bare relay', urls: [`http://127.0.0.1:${relayPort}`], pids: () => [relay.pid!] };
    const levelwire = (running: ServerProcess[], name = 'Levelwire'): Target => ({ name, urls: running.map((s) => s.url), cookies, pids: () => running.map((s) => s.pid!).filter(Boolean) });
    // Before the next step: disconnects and their presence updates done, commands still in flight answered (the servers idle).
    const settle = async (pids: () => number[]) => {
      const deadline = performance.now() + 30_000;
      await sleep(1_000);
      while (performance.now() < deadline) {
        const meter = usageMeter(pids);
        meter.start();
        await sleep(1_000);
        if (meter.stop().cpuPct < 15) return;
      }
    };

    if (wants('live')) {
      log(`live load: ${LEVELS.join(', ')} sessions, ${RATE} readings/s per technician, ${SECONDS} s measured per step`);
      for (const n of LEVELS) {
        const sessions = await sessionsFor(n);
        const relayRow = await runLoad(relayTarget, sessions, pgPids);
        await settle(relayTarget.pids);
        const lwRow = await runLoad(levelwire([a!]), await sessionsFor(n), pgPids);
        await settle(levelwire([a!]).pids);
        liveRows.push({ relay: relayRow, levelwire: lwRow });
        log(`  ${n} sessions: Levelwire p99 ${f1(lwRow.delivery.p99)} ms to the expert, ack p99 ${f1(lwRow.ack.p99)} ms; relay ${f1(relayRow.delivery.p99)} / ${f1(relayRow.ack.p99)} ms`);
      }
    }

    if (wants('scale')) {
      log(`scale-out: ${SCALE_SESSIONS} sessions over ${PROCESSES.join(', ')} process(es)`);
      const steps = PROCESSES.flatMap((p) => (p === 1 ? [{ p, adapter: 'local' as const }, { p, adapter: 'postgres' as const }] : [{ p, adapter: 'postgres' as const }]));
      for (const { p, adapter } of steps) {
        for (const [k, s] of servers.entries()) {
          const wanted = k < p;
          if (s.running && (!wanted || s.env.REALTIME_ADAPTER !== adapter)) await s.stop('SIGTERM');
          s.env.REALTIME_ADAPTER = adapter;
          if (wanted && !s.running) await s.start();
        }
        if (adapter === 'postgres') await sleep(3_000); // the adapter's heartbeats: every process knows the others
        const row = await runLoad(levelwire(servers.slice(0, p)), await sessionsFor(SCALE_SESSIONS), pgPids);
        scaleRows.push({ label: `${p} (${adapter === 'local' ? 'no adapter' : 'PostgreSQL adapter'})`, row });
        log(`  ${p} process(es), ${adapter}: ${f1(row.deliveredPerS)} readings/s delivered, p99 ${f1(row.delivery.p99)} ms`);
        await settle(levelwire(servers.slice(0, p)).pids);
      }
    }

    if (wants('profile')) {
      const n = Math.max(...LEVELS);
      log(`profile: one process, ${n} sessions, node --cpu-prof`);
      for (const s of servers) if (s.running) await s.stop('SIGTERM');
      rmSync(profDir, { recursive: true, force: true });
      mkdirSync(profDir, { recursive: true });
      a!.env.REALTIME_ADAPTER = 'local';
      a!.nodeArgs = ['--cpu-prof', `--cpu-prof-dir=${profDir}`];
      const spawnedAt = performance.now();
      await a!.start();
      const row = await runLoad(levelwire([a!], 'Levelwire (profiled)'), await sessionsFor(n), pgPids);
      await a!.stop('SIGTERM'); // a clean exit writes the profile
      a!.nodeArgs = [];
      const files = existsSync(profDir) ? readdirSync(profDir).filter((f) => f.endsWith('.cpuprofile')) : [];
      const newest = files.map((f) => path.join(profDir, f)).sort((x, y) => statSync(y).size - statSync(x).size)[0];
      if (newest) profile = summariseProfile(newest, row.window[0] - spawnedAt, row.window[1] - spawnedAt);
      else log('  no profile was written');
    }
  } finally {
    await stopAll();
  }

  console.log(`\nMachine: ${machine}; PostgreSQL ${pgVersion} (fsync ${FSYNC ? 'on' : 'off'}), every process on loopback.`);
  console.log(`Load: per session one technician taking ${RATE} level readings a second into an outbox that sends one at a time (as the field view does) and one expert, both in the session's room; ${SECONDS} s measured after a ${WARMUP_MS / 1000} s warm-up.`);
  console.log(`Latencies run from when a reading was taken, outbox wait included. Late: taken in the window and not at the expert ${DRAIN_MS / 1000} s after it.`);
  console.log('Latencies in ms, p50 / p95 / p99: reading → expert is the technician\'s send to the expert\'s receipt of the broadcast; ack is the send to the acknowledgement.');
  if (liveRows.length) {
    console.log('\nLive load, one production process against the bare relay');
    console.log('| sessions | server | reading → expert ms | ack ms | delivered/s | late | server CPU % | server RSS MB | PostgreSQL CPU % | client CPU % | client loop lag p99 ms | p99 vs relay (expert / ack) |');
    console.log('|---|---|---|---|---|---|---|---|---|---|---|---|');
    for (const { relay: r, levelwire: l } of liveRows) {
      for (const row of [r, l]) {
        const times = (x: number, y: number) => (Number.isFinite(x / y) ? `${(x / y).toFixed(1)}x` : '–');
        const ratio = row === l ? `${times(l.delivery.p99, r.delivery.p99)} / ${times(l.ack.p99, r.ack.p99)}` : '1.0x';
        console.log(`| ${row.sessions} | ${row.target} | ${pctCells(row.delivery)} | ${pctCells(row.ack)} | ${f1(row.deliveredPerS)} | ${row.lost}${row.refused ? ` (${row.refused} refused)` : ''} | ${f1(row.cpuPct)} | ${f1(row.rssMb)} | ${row === r ? '–' : f1(row.pgCpuPct)} | ${f1(row.clientCpuPct)} | ${f1(row.clientLagP99)} | ${ratio} |`);
      }
    }
  }
  if (scaleRows.length) {
    const base = scaleRows[0]!.row;
    console.log(`\nScale-out, ${SCALE_SESSIONS} sessions, sockets round-robin over the processes (a session's technician and expert on different processes when there are several)`);
    console.log('| processes | reading → expert ms | ack ms | delivered/s | late | server CPU % (sum) | per process | server RSS MB (sum) | PostgreSQL CPU % | client CPU % | p99 vs 1 process (expert / ack) |');
    console.log('|---|---|---|---|---|---|---|---|---|---|---|');
    for (const { label, row } of scaleRows) {
      console.log(`| ${label} | ${pctCells(row.delivery)} | ${pctCells(row.ack)} | ${f1(row.deliveredPerS)} | ${row.lost}${row.refused ? ` (${row.refused} refused)` : ''} | ${f1(row.cpuPct)} | ${f1(row.cpuPct / row.processes)} | ${f1(row.rssMb)} | ${f1(row.pgCpuPct)} | ${f1(row.clientCpuPct)} | ${(row.delivery.p99 / base.delivery.p99).toFixed(1)}x / ${(row.ack.p99 / base.ack.p99).toFixed(1)}x |`);
    }
  }
  if (profile) {
    console.log(`\nCPU profile of the server at ${Math.max(...LEVELS)} sessions: ${profile.seconds.toFixed(1)} s of the measured window, busy ${(profile.busyShare * 100).toFixed(0)} % of it; self time as shares of the busy time`);
    console.log('| package | share |\n|---|---|');
    for (const p of profile.packages) console.log(`| ${p.name} | ${(p.share * 100).toFixed(1)} % |`);
    console.log('\n| function | share |\n|---|---|');
    for (const p of profile.functions) console.log(`| \`${p.name}\` | ${(p.share * 100).toFixed(1)} % |`);
  }
  if (liveRows.length) {
    const top = liveRows.at(-1)!;
    const p99 = Math.max(top.levelwire.delivery.p99, top.levelwire.ack.p99);
    const ratio = top.levelwire.delivery.p99 / top.relay.delivery.p99;
    // NaN: no reading taken in the window reached the expert in time (the server saturated); a target not met.
    const shown = Number.isFinite(p99) ? `${f1(p99)} ms` : `none of the window's readings arrived within ${DRAIN_MS / 1000} s after it`;
    console.log(`\nTargets at ${top.levelwire.sessions} sessions: p99 under ${TARGET_P99_MS} ms: ${shown}, ${p99 < TARGET_P99_MS ? 'met' : 'not met'}; p99 at most ${TARGET_RATIO}x the relay's: ${Number.isFinite(ratio) ? `${ratio.toFixed(1)}x` : 'no p99'}, ${ratio <= TARGET_RATIO ? 'met' : 'not met'}.`);
  }
  console.log(`bench:live finished in ${Math.round((performance.now() - t0) / 1000)} s`);
  process.exit(0);
}

await main();
