// Production server processes for the fault suite: started, killed (SIGKILL or SIGTERM) and started again.
import { spawn, type ChildProcess } from 'node:child_process';
import { createWriteStream, mkdirSync } from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import { waitForHealth } from '../../scripts/setup';

export class ServerProcess {
  private child: ChildProcess | undefined;
  starts = 0;
  /** Node options before the script, read at each start (the live benchmark profiles with --cpu-prof, which NODE_OPTIONS refuses). */
  nodeArgs: string[] = [];

  constructor(
    readonly name: string,
    readonly port: number,
    /** Read at each start: a change applies from the next one. */
    readonly env: Record<string, string>,
    private logDir: string,
  ) {}

  get url() {
    return `http://127.0.0.1:${this.port}`;
  }

  /** The running process's id (the live benchmark reads its CPU and memory from /proc). */
  get pid(): number | undefined {
    return this.running ? this.child!.pid : undefined;
  }

  get running() {
    return this.child !== undefined && this.child.exitCode === null && this.child.signalCode === null;
  }

  async start(): Promise<void> {
    // A server left from another run would answer the health check in this one's place.
    const taken = await new Promise<boolean>((resolve) => {
      const probe = net.connect(this.port, '127.0.0.1');
      probe.once('connect', () => {
        probe.destroy();
        resolve(true);
      });
      probe.once('error', () => resolve(false));
    });
    if (taken) throw new Error(`port ${this.port} is already in use (a server left from another run?)`);
    mkdirSync(this.logDir, { recursive: true });
    const log = createWriteStream(path.join(this.logDir, `${this.name}.log`), { flags: 'a' });
    this.child = spawn(process.execPath, [...this.nodeArgs, 'dist/server.js'], {
      stdio: ['ignore', 'pipe', 'pipe'],
      env: { ...process.env, ...this.env, NODE_ENV: 'production', NEXT_TELEMETRY_DISABLED: '1', REMINDER_INTERVAL_MINUTES: '0', PORT: String(this.port), HOST: '127.0.0.1', NEXTAUTH_URL: this.url },
    });
    this.child.stdout!.pipe(log);
    this.child.stderr!.pipe(log);
    this.starts += 1;
    await waitForHealth(this.url, this.child);
  }

  /** Sends the signal and waits for the process to end; returns how long it took, ms. */
  async stop(signal: NodeJS.Signals): Promise<number> {
    const child = this.child;
    if (!child || !this.running) return 0;
    const t0 = performance.now();
    const exited = new Promise((r) => child.once('exit', r));
    child.kill(signal);
    await exited;
    return performance.now() - t0;
  }
}
