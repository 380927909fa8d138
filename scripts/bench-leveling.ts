/**
 * Levelwire leveling convergence benchmark: seeded virtual machines leveled by the manual rule of thumb and by the
 * learning recommender. Usage: npm run bench:leveling -- [--machines 1000] [--seed 1]
 */
import { ADJUST_STAGES, createVirtualMachine, runVirtualSession, type Method, type StageOutcome } from '@/lib/leveling';

const MAX_ROUNDS = 12;
/** Machines run before timing starts, so the figures are not the JIT compiler's first pass (seeds below the first). */
const WARM_UP_MACHINES = 50;
/**
 * The runs are deterministic, so each decision is timed in every pass; its least time over the passes is its cost
 * without the pauses a shared machine adds (garbage collection, other processes).
 */
const TIMING_PASSES = 3;

interface MethodResult {
  method: Method;
  rows: Row[];
  timesMs: number[];
  leastMs: number[];
}

function runMethod(method: Method, machines: number, firstSeed: number): { sessions: StageOutcome[][]; timesMs: number[] } {
  const sessions: StageOutcome[][] = [];
  const timesMs: number[] = [];
  for (let seed = firstSeed; seed < firstSeed + machines; seed++) {
    const run = runVirtualSession({
      machine: createVirtualMachine({ seed }),
      method,
      maxRounds: MAX_ROUNDS,
      clock: () => performance.now(),
    });
    sessions.push(run.stages);
    timesMs.push(...run.recommendationMs);
  }
  return { sessions, timesMs };
}

function flag(name: string, fallback: number): number {
  const at = process.argv.indexOf(`--${name}`);
  const value = at >= 0 ? Number(process.argv[at + 1]) : fallback;
  if (!Number.isInteger(value) || value < 1) throw new Error(`--${name} must be a positive whole number`);
  return value;
}

/** Nearest-rank percentile of a non-empty list. */
function percentile(values: number[], p: number): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.max(0, Math.ceil(p * sorted.length) - 1)]!;
}

const ms = (value: number) => `${value.toFixed(3)} ms`;
const share = (count: number, total: number) => `${((100 * count) / total).toFixed(1)} %`;

interface Row {
  measure: string;
  outcomes: StageOutcome[];
}

function rows(sessions: StageOutcome[][]): Row[] {
  const byStage = ADJUST_STAGES.map((stage) => ({
    measure: stage,
    outcomes: sessions.map((stages) => stages.find((s) => s.stage === stage)!),
  }));
  const whole = sessions.map(
    (stages): StageOutcome => ({
      stage: 'spindle-sweep',
      rounds: stages.reduce((sum, s) => sum + s.rounds, 0),
      readings: stages.reduce((sum, s) => sum + s.readings, 0),
      converged: stages.every((s) => s.converged),
    }),
  );
  return [...byStage, { measure: 'all stages', outcomes: whole }];
}

function tableLine(method: Method, row: Row, withinRounds: number): string {
  const rounds = row.outcomes.map((o) => o.rounds);
  const readings = row.outcomes.map((o) => o.readings);
  const within = row.outcomes.filter((o) => o.converged && o.rounds <= withinRounds).length;
  const never = row.outcomes.filter((o) => !o.converged).length;
  const n = row.outcomes.length;
  return `| ${method} | ${row.measure} | ${(rounds.reduce((a, b) => a + b, 0) / n).toFixed(2)} | ${percentile(rounds, 0.5)} | ${percentile(rounds, 0.95)} | ${Math.max(...rounds)} | ${percentile(readings, 0.5)} | ${percentile(readings, 0.95)} | ${Math.max(...readings)} | ${share(within, n)} | ${share(never, n)} |`;
}

function main(): void {
  const machines = flag('machines', 1000);
  const firstSeed = flag('seed', 1);
  const started = performance.now();
  const methods: Method[] = ['rule-of-thumb', 'recommender'];
  methods.forEach((method) => {
    for (let i = 1; i <= WARM_UP_MACHINES; i++) runVirtualSession({ machine: createVirtualMachine({ seed: -i }), method });
  });
  const results = methods.map((method): MethodResult => {
    const passes = Array.from({ length: TIMING_PASSES }, () => runMethod(method, machines, firstSeed));
    const [first] = passes;
    const leastMs = first!.timesMs.map((_, i) => Math.min(...passes.map((p) => p.timesMs[i]!)));
    return { method, rows: rows(first!.sessions), timesMs: first!.timesMs, leastMs };
  });

  const lines = [
    `Levelwire leveling convergence: ${machines} virtual machines (seeds ${firstSeed} to ${firstSeed + machines - 1}), at most ${MAX_ROUNDS} rounds a stage; a stage that never converged counts ${MAX_ROUNDS} rounds.`,
    '',
    '| method | measure | rounds mean | rounds p50 | rounds p95 | rounds max | readings p50 | readings p95 | readings max | within 3 rounds | never converged |',
    '|---|---|---|---|---|---|---|---|---|---|---|',
    ...results.flatMap((r) => r.rows.map((row) => tableLine(r.method, row, 3))),
    '',
    '| method | timing | decisions | time per decision median | p95 | p99 | max | under 1 ms |',
    '|---|---|---|---|---|---|---|---|',
    ...results.flatMap((r) => [timeLine(r.method, 'one pass', r.timesMs), timeLine(r.method, `least of ${TIMING_PASSES} passes`, r.leastMs)]),
    '',
    ...targetLines(results),
    '',
    `Finished in ${((performance.now() - started) / 1000).toFixed(1)} s on Node ${process.version}.`,
  ];
  console.log(lines.join('\n'));
}

function timeLine(method: Method, timing: string, timesMs: number[]): string {
  return `| ${method} | ${timing} | ${timesMs.length} | ${ms(percentile(timesMs, 0.5))} | ${ms(percentile(timesMs, 0.95))} | ${ms(percentile(timesMs, 0.99))} | ${ms(Math.max(...timesMs))} | ${share(timesMs.filter((t) => t < 1).length, timesMs.length)} |`;
}

function targetLines(results: MethodResult[]): string[] {
  const [manual, recommender] = results;
  if (!manual || !recommender) return [];
  const median = (row: Row) => percentile(row.outcomes.map((o) => o.rounds), 0.5);
  const p95 = (row: Row) => percentile(row.outcomes.map((o) => o.rounds), 0.95);
  const verdict = (met: boolean) => (met ? 'met' : 'NOT met');
  const perMeasure = recommender.rows.filter((row) => row.measure !== 'all stages');
  return [
    'Targets (per measure; the whole job for information):',
    ...recommender.rows.map((row, i) => {
      const manualMedian = median(manual.rows[i]!);
      const halfMedian = `median ${median(row)} against the rule of thumb's ${manualMedian} (target at most half: ${verdict(median(row) <= manualMedian / 2)})`;
      return perMeasure.includes(row)
        ? `- ${row.measure}: recommender p95 ${p95(row)} rounds (target at most 3: ${verdict(p95(row) <= 3)}); ${halfMedian}`
        : `- ${row.measure}: recommender p95 ${p95(row)} rounds; ${halfMedian}`;
    }),
    `- time per recommendation: median ${ms(percentile(recommender.leastMs, 0.5))}, max ${ms(Math.max(...recommender.leastMs))} least of ${TIMING_PASSES} passes (target under 1 ms each: ${verdict(Math.max(...recommender.leastMs) < 1)}); one pass: max ${ms(Math.max(...recommender.timesMs))}, ${share(recommender.timesMs.filter((t) => t < 1).length, recommender.timesMs.length)} under 1 ms`,
  ];
}

main();
