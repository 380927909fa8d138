// `npm run bench:replay`: a 20,000-event session in a throwaway cluster: time to load it, to index it for replay, to
// show the first frame, and to seek, against a fold from the start on every seek (the baseline, measured in the same run).
import { writeFileSync } from 'node:fs';
import { performance } from 'node:perf_hooks';
import { gzipSync } from 'node:zlib';
import { and, eq, sql } from 'drizzle-orm';
import { createDb } from '../db/client';
import { eventRow, listEventsBySession } from '../db/queries/events';
import { getMachineSnapshot, openSession } from '../db/queries/sessions';
import { levelingSessions, machines, organisations, sessionEvents, users } from '../db/schema';
import { DEMO_ORGANISATION, seedDemo } from '../db/seed';
import { seededRandom } from '../lib/leveling';
import { baseModelOf } from '../lib/session/advice';
import { moveOfTurns, stagePlan, stageVerdict } from '../lib/session/derive';
import type { EventType, PayloadOf, SessionEvent } from '../lib/session/events';
import { applyAllInPlace, foldEvents, snapshotOf } from '../lib/session/fold';
import { eventHash, verifyChain } from '../lib/session/hash-chain';
import { buildReplayIndex, stateAt } from '../lib/session/replay';
import { sessionSeries } from '../lib/session/series';
import { sessionFileOf } from '../lib/session/transfer';
import type { SessionStage } from '../lib/session/stages';
import { rigFor, syncRig, takeReading } from '../lib/session/virtual-technician';
import { readingToSlopeUrad, reversalCheck } from '../lib/leveling/level';
import { prepareDatabase } from './setup';

const EVENTS = Number(process.argv.find((a) => a.startsWith('--events='))?.split('=')[1] ?? 20_000);
const SEEKS = 200;
const TARGET_MS = 100;

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const pct = (xs: number[], p: number) => [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.floor(xs.length * p))]!;
const time = <T>(fn: () => T): [T, number] => {
  const t = performance.now();
  const out = fn();
  return [out, performance.now() - t];
};

const cluster = await prepareDatabase({ name: 'pg-bench-replay', port: 54359, database: 'levelwire_bench_replay', fresh: true });
const db = createDb(cluster.url, 4);
try {
  await seedDemo(db);
  const [org] = await db.select().from(organisations).where(eq(organisations.name, DEMO_ORGANISATION));
  // The six-screw demo machine: corners and middle screws, so twist, bow and sweep all have moves.
  const [machine] = await db.select().from(machines).where(and(eq(machines.organisationId, org!.id), sql`${machines.model} like 'Vertical machining centre VX-1250%'`)).limit(1);
  const [tech] = await db.select().from(users).where(eq(users.email, 'tech@northmere.test'));
  const [expert] = await db.select().from(users).where(eq(users.email, 'expert@northmere.test'));
  await getMachineSnapshot(db, { organisationId: org!.id, machineId: machine!.id });
  const session = await openSession(db, { organisationId: org!.id, machineId: machine!.id, technician: { id: tech!.id, name: tech!.name }, levelDivisionUrad: 20, experts: [expert!.id], virtualSeed: 7 });
  const sessionId = session.session.id;

  // The log so far (session:opened, participants), then a long day of work: stage after stage, each round its readings
  // taken from the simulator, a few moves sent and done, notes now and then; the machine answers every move.
  const t0 = performance.now();
  const opening = await listEventsBySession(db, { sessionId });
  const events: SessionEvent[] = [...opening];
  const state = snapshotOf(foldEvents(opening));
  const rig = rigFor(state)!;
  const random = seededRandom(20261202);
  const start = Date.parse(opening.at(-1)!.serverTs);
  let prev = opening.at(-1)!.hash;
  const append = <T extends EventType>(type: T, payload: PayloadOf<T>, actor: { id: string; role: string }) => {
    const seq = events.length + 1;
    const e: SessionEvent = { sessionId, seq, id: crypto.randomUUID(), type, payload, actorId: actor.id, actorRole: actor.role, clientTs: null, serverTs: new Date(start + seq * 1500).toISOString(), prevHash: prev, hash: '' };
    e.hash = eventHash(prev, e);
    prev = e.hash;
    events.push(e);
    applyAllInPlace(state, [e]);
  };
  const T = { id: tech!.id, role: 'technician' };
  const X = { id: expert!.id, role: 'expert' };
  const cycle: SessionStage[] = ['height-check', 'zero-level', 'rough-level', 'twist', 'bow', 'spindle-sweep', 'lock-as-left'];
  for (let round = 0; events.length < EVENTS - 12; round++) {
    const stage = cycle[round % cycle.length]!;
    if (state.stage !== stage) append('stage:entered', { stage }, T);
    for (const planned of stagePlan(stage, state)) {
      const r = takeReading(rig, state, stage, planned);
      const payload = r.kind === 'level' ? { ...r, slopeUrad: readingToSlopeUrad(r.divisions, 20) } : r.kind === 'reversal' ? { ...r, ...reversalCheck(r.firstDiv, r.secondDiv) } : r;
      append('reading:recorded', payload, T);
    }
    if (['rough-level', 'twist', 'bow'].includes(stage)) {
      for (let k = 0; k < 1 + Math.floor(random() * 3); k++) {
        const screw = state.screws[Math.floor(random() * state.screws.length)]!;
        const turns = Math.round((random() - 0.5) * 0.2 * 72) / 72 || 1 / 72;
        const move = moveOfTurns(screw, turns);
        const moveId = crypto.randomUUID();
        append('move:sent', { moveId, screwId: screw.id, stage, raiseUm: move.raiseUm, turns: move.turns, degrees: move.degrees, recommended: false }, X);
        append('move:answered', { moveId, outcome: 'done', turns: move.turns, raiseUm: move.raiseUm }, T);
        syncRig(rig, state);
      }
    }
    if (round % 10 === 9) append('note:posted', { text: `Round ${round + 1}: readings steady, moving on.` }, X);
  }
  while (events.length < EVENTS - 1) append('note:posted', { text: 'Filling the log to its size.' }, X);
  append('session:ended', { reason: 'benchmark' }, T);
  for (let i = opening.length; i < events.length; i += 1000) {
    await db.insert(sessionEvents).values(
      events.slice(i, i + 1000).map(eventRow),
    );
  }
  await db.update(levelingSessions).set({ lastSeq: events.length, lastHash: prev, state: 'ended' }).where(eq(levelingSessions.id, sessionId));
  await db.execute(sql`analyze`);
  const counts = events.reduce<Record<string, number>>((acc, e) => ((acc[e.type] = (acc[e.type] ?? 0) + 1), acc), {});
  console.log(`seeded a ${events.length.toLocaleString('en')}-event session in ${((performance.now() - t0) / 1000).toFixed(1)} s: ${Object.entries(counts).map(([k, v]) => `${k} ${v}`).join(', ')}\n`);

  // Loading: the database read the events route makes, the JSON it sends, the index the replay builds.
  const loads: number[] = [];
  let loaded: SessionEvent[] = [];
  for (let r = 0; r < 7; r++) {
    const t = performance.now();
    loaded = await listEventsBySession(db, { sessionId });
    loads.push(performance.now() - t);
  }
  const json = JSON.stringify({ events: loaded });
  // `--save=<file>` keeps the log as an export file: an admin imports it (/sessions/import) to replay it in a browser
  // (scripts/bench-replay-browser.mjs), and `node --cpu-prof` can fold it without the database.
  const save = process.argv.find((a) => a.startsWith('--save='))?.split('=')[1];
  if (save) writeFileSync(save, JSON.stringify(sessionFileOf({ id: sessionId, state: 'ended', machine: { id: machine!.id, label: null, model: machine!.model, serial: machine!.serial } }, loaded, new Date())));
  const parses = Array.from({ length: 7 }, () => time(() => JSON.parse(json))[1]);
  const verifies = Array.from({ length: 3 }, () => time(() => verifyChain(loaded))[1]);
  const verdict = verifyChain(loaded);
  const builds: number[] = [];
  let index = buildReplayIndex(loaded);
  for (let r = 0; r < 7; r++) builds.push(time(() => (index = buildReplayIndex(loaded)))[1]);

  /** What the replay shows at a moment: the state, the chart's series, the base model and the stage's verdict. */
  const frame = (s: ReturnType<typeof stateAt>) => {
    sessionSeries(s);
    baseModelOf(s);
    stageVerdict(s, s.stage);
  };
  const firstFrames = Array.from({ length: 7 }, () => time(() => frame(stateAt(index, 1)))[1]);
  const lastFrames = Array.from({ length: 7 }, () => time(() => frame(stateAt(index, loaded.length)))[1]);

  const rnd = seededRandom(42);
  const seqs = Array.from({ length: SEEKS }, () => 1 + Math.floor(rnd() * loaded.length));
  const seekState = seqs.map((q) => time(() => stateAt(index, q))[1]);
  const seekFrame = seqs.map((q) => time(() => frame(stateAt(index, q)))[1]);
  const baseSeqs = seqs.slice(0, 40);
  const baseState = baseSeqs.map((q) => time(() => foldEvents(loaded.slice(0, q)))[1]);
  const baseFrame = baseSeqs.map((q) => time(() => frame(foldEvents(loaded.slice(0, q))))[1]);

  const mb = (b: number) => `${(b / 1e6).toFixed(1)} MB`;
  console.log(`chain: ${verdict.ok ? `intact over ${verdict.count} events` : `broken at ${verdict.brokenAtSeq}`}; JSON of the log ${mb(json.length)} (${mb(gzipSync(json).length)} gzip)\n`);
  console.log('| step | p50 ms | p95 ms | max ms | runs |');
  console.log('|---|---|---|---|---|');
  const row = (name: string, xs: number[]) => console.log(`| ${name} | ${median(xs).toFixed(2)} | ${pct(xs, 0.95).toFixed(2)} | ${Math.max(...xs).toFixed(2)} | ${xs.length} |`);
  row('load: database read of the log (events route query)', loads);
  row('load: JSON.parse of the log as sent', parses);
  row('verify the hash chain (import check)', verifies);
  row(`index: one fold with a snapshot every ${index.every} events`, builds);
  row('first frame (seq 1): state + series + base model + verdict', firstFrames);
  row('last frame (end of log)', lastFrames);
  row('seek: state only (snapshot + ≤ 249 events)', seekState);
  row('seek: frame (state + series + base model + verdict)', seekFrame);
  row('baseline seek: fold from the start, state only', baseState);
  row('baseline seek: fold from the start + frame', baseFrame);
  const first = median(loads) + median(parses) + median(builds) + median(firstFrames);
  console.log(`\ntime to first frame (read + parse + index + frame, medians): ${first.toFixed(0)} ms`);
  console.log(`seek p95 ${pct(seekFrame, 0.95).toFixed(1)} ms against the ${TARGET_MS} ms target: ${pct(seekFrame, 0.95) < TARGET_MS ? 'met' : 'NOT met'}; state-only seek ${(median(baseState) / median(seekState)).toFixed(0)}x faster than folding from the start (medians)`);
} finally {
  await db.$client.end();
  await cluster.stop();
}
