// Scripted people for the fault suite: a technician streaming readings and answering moves, an expert sending
// moves and watching. Both keep an ordered outbox as the field view does: one command at a time, each until the
// server answers it, resent with the same id after a reconnect, kept on a retryable refusal.
import { randomUUID } from 'node:crypto';
import { io, type Socket } from 'socket.io-client';
import { isRetryable, PROTOCOL_VERSION, SOCKET_PATH, type AckError, type ClientToServerEvents, type ServerToClientEvents } from '@/lib/realtime/contract';
import { EVENT_TYPES, type SessionEvent } from '@/lib/session/events';

type ClientSocket = Socket<ServerToClientEvents, ClientToServerEvents>;
type Command = { name: 'reading:submit' | 'move:send' | 'move:answer'; payload: Record<string, unknown> };

const ACK_TIMEOUT_MS = 4_000;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** One person's connection, outbox and view of the log. */
class ScriptedClient {
  readonly socket: ClientSocket;
  private queue: Command[] = [];
  private next = 0;
  private pumping = false;
  private timer: NodeJS.Timeout;
  /** Successful acknowledgements: when the command went out and came back, its seq, and whether the server already held it. */
  readonly acks: { sentAt: number; at: number; seq: number; duplicate: boolean }[] = [];
  readonly refused: AckError[] = [];
  retryableRefusals = 0;
  timeouts = 0;
  reconnects = 0;
  /** Seqs this client holds, and how each first arrived. */
  readonly seen = new Map<number, SessionEvent>();
  live = 0;
  caughtUp = 0;

  constructor(
    url: string,
    cookie: string,
    readonly sessionId: string,
  ) {
    this.socket = io(url, {
      path: SOCKET_PATH,
      transports: ['websocket'],
      extraHeaders: { cookie },
      auth: { protocol: PROTOCOL_VERSION },
      reconnectionDelay: 150,
      reconnectionDelayMax: 1_000,
    });
    this.socket.on('connect', () => {
      this.reconnects += 1;
      void this.joinWhileConnected().then(() => this.pump());
    });
    this.socket.on('connect_error', (err) => {
      // A handshake refused while the database was away is not retried by socket.io itself.
      if (!this.socket.active && (err as { data?: { retryable?: boolean } }).data?.retryable) setTimeout(() => this.socket.connect(), 300);
    });
    for (const type of EVENT_TYPES) this.socket.on(type, (e) => this.receive(e));
    this.timer = setInterval(() => void this.pump(), 250);
  }

  /** The highest seq up to which this client holds every event. */
  private held = 0;
  contiguous(): number {
    return this.held;
  }

  /** When each event first reached this client (ms since the epoch), by seq. */
  private arrivals = new Map<number, number>();

  private hold(e: SessionEvent): boolean {
    if (e.sessionId !== this.sessionId || this.seen.has(e.seq)) return false;
    this.seen.set(e.seq, e);
    this.arrivals.set(e.seq, Date.now());
    while (this.seen.has(this.held + 1)) this.held += 1;
    this.onEvent(e);
    return true;
  }

  private receive(e: SessionEvent) {
    if (!this.hold(e)) return;
    this.live += 1;
    if (e.seq > this.held) void this.join(); // a gap below this event: catch up in order
  }

  /** Joins (or re-joins) the session's room, taking every event after the last contiguous one. */
  async join(): Promise<boolean> {
    try {
      const res = await this.socket.timeout(ACK_TIMEOUT_MS).emitWithAck('session:join', { sessionId: this.sessionId, afterSeq: this.held });
      if (!res.ok) return false;
      for (const e of res.events) if (this.hold(e)) this.caughtUp += 1;
      return true;
    } catch {
      return false;
    }
  }

  /**
   * Joins after a (re)connection, again while the join goes unanswered or is refused (a server restarting, its
   * database away) and the socket stays connected: until joined, no event of the session reaches this client. The
   * field view does the same (components/session/use-live-session.ts).
   */
  private async joinWhileConnected(): Promise<void> {
    for (let attempt = 0; attempt < 100 && this.socket.connected; attempt += 1) {
      if (await this.join()) return;
      await sleep(300);
    }
  }

  protected onEvent(_e: SessionEvent): void {}

  protected enqueue(cmd: Command) {
    this.queue.push(cmd);
    void this.pump();
  }

  get pending(): number {
    return this.queue.length - this.next;
  }

  /** Sends the outbox in order, one command at a time. */
  async pump(): Promise<void> {
    if (this.pumping) return;
    this.pumping = true;
    try {
      while (this.socket.connected && this.next < this.queue.length) {
        const cmd = this.queue[this.next]!;
        let ack;
        const sentAt = Date.now();
        try {
          ack = (await this.socket.timeout(ACK_TIMEOUT_MS).emitWithAck(cmd.name, cmd.payload as never)) as { ok: boolean; seq?: number; duplicate?: boolean; error?: AckError };
        } catch {
          this.timeouts += 1;
          break; // no answer: the same command goes again on the next connection or tick
        }
        if (ack.ok) {
          this.acks.push({ sentAt, at: Date.now(), seq: ack.seq ?? 0, duplicate: Boolean(ack.duplicate) });
          this.next += 1;
        } else if (isRetryable(ack.error!)) {
          this.retryableRefusals += 1;
          await sleep(200);
        } else {
          this.refused.push(ack.error!);
          this.next += 1;
        }
      }
    } finally {
      this.pumping = false;
    }
  }

  /** Resolves once the outbox is empty; rejects when it has not moved for `ms` (a loaded machine is slow, not stuck). */
  async drained(ms: number): Promise<void> {
    let deadline = Date.now() + ms;
    let left = this.pending;
    while (this.pending > 0 || this.pumping) {
      if (this.pending < left) {
        left = this.pending;
        deadline = Date.now() + ms;
      }
      if (Date.now() > deadline) throw new Error(`${this.pending} commands still unsent, none acknowledged for ${ms / 1000} s`);
      await sleep(50);
    }
  }

  /** When the event of this seq reached this client (ms since the epoch), if it did. */
  arrivalOf(seq: number): number | undefined {
    return this.arrivals.get(seq);
  }

  /** The first acknowledgement of a command sent after `t` (ms since the epoch), if any. */
  firstAckSentAfter(t: number) {
    return this.acks.find((a) => a.sentAt > t);
  }

  close() {
    clearInterval(this.timer);
    this.socket.disconnect();
  }
}

/** Streams level readings in a known order and answers every move the coach sends, once. */
export class ScriptedTechnician extends ScriptedClient {
  /** Reading ids in the order the technician took them. */
  readonly readingIds: string[] = [];
  private answered = new Set<string>();
  movesAnswered = 0;

  addReading(i: number) {
    const id = randomUUID();
    this.readingIds.push(id);
    const reading = { kind: 'level', axis: i % 2 ? 'x' : 'y', positionMm: (i % 9) * 100 - 400, divisions: ((i * 7) % 41) / 2 - 10 };
    this.enqueue({ name: 'reading:submit', payload: { id, sessionId: this.sessionId, clientTs: new Date().toISOString(), reading } });
  }

  protected override onEvent(e: SessionEvent) {
    if (e.type !== 'move:sent') return;
    const { moveId, turns } = e.payload as { moveId: string; turns: number };
    if (this.answered.has(moveId)) return;
    this.answered.add(moveId);
    this.movesAnswered += 1;
    this.enqueue({ name: 'move:answer', payload: { id: randomUUID(), sessionId: this.sessionId, moveId, outcome: 'done', turns } });
  }
}

/** Sends a move now and then and watches every event arrive. */
export class ScriptedExpert extends ScriptedClient {
  movesSent = 0;

  sendMove(screwId: string, stage: string) {
    this.movesSent += 1;
    const turns = this.movesSent % 2 ? 0.25 : -0.25;
    this.enqueue({ name: 'move:send', payload: { id: randomUUID(), sessionId: this.sessionId, stage, screwId, turns } });
  }
}
