import { z } from 'zod';

const DEV_SECRET = 'levelwire-development-secret-change-me';

const schema = z.object({
  DATABASE_URL: z.string().url().default('postgres://postgres@127.0.0.1:54329/levelwire'),
  NEXTAUTH_SECRET: z.string().min(16).default(DEV_SECRET),
  NEXTAUTH_URL: z.string().url().optional(),
  PORT: z.coerce.number().int().positive().default(3000),
  HOST: z.string().default('127.0.0.1'),
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  /** Outgoing mail; in development and tests the start/test scripts point this at their loopback fake. */
  SMTP_URL: z.string().url().default('smtp://127.0.0.1:2525'),
  MAIL_FROM: z.string().default('Levelwire <no-reply@levelwire.invalid>'),
  /** Where the loopback mail fake keeps what it caught; set only when the fake runs (enables the mailbox page). */
  MAILBOX_DIR: z.string().optional(),
  /** Object storage (S3 API); the scripts point this at their loopback fake, production at real storage. */
  S3_ENDPOINT: z.string().url().optional(),
  S3_REGION: z.string().default('us-east-1'),
  S3_BUCKET: z.string().default('levelwire'),
  S3_ACCESS_KEY_ID: z.string().default('S3RVER'),
  S3_SECRET_ACCESS_KEY: z.string().default('S3RVER'),
  /** Minutes between runs of the reminder job inside the server (0 turns it off). */
  REMINDER_INTERVAL_MINUTES: z.coerce.number().min(0).default(60),
  /**
   * How socket.io reaches the other server processes: 'local' for one process, 'postgres' to run several
   * behind a load balancer, joined through the database with @socket.io/postgres-adapter.
   */
  REALTIME_ADAPTER: z.enum(['local', 'postgres']).default('local'),
  /** Seconds a SIGTERM waits for commands in flight before the server closes anyway. */
  SHUTDOWN_GRACE_SECONDS: z.coerce.number().min(1).max(60).default(8),
});

export type Env = z.infer<typeof schema>;

let cached: Env | undefined;

/** The process environment, checked once; a bad value stops the process with the variable named. */
export function env(): Env {
  if (cached) return cached;
  const parsed = schema.safeParse(process.env);
  if (!parsed.success) {
    const issue = parsed.error.issues[0]!;
    throw new Error(`Environment variable ${issue.path.join('.')}: ${issue.message}`);
  }
  cached = parsed.data;
  return cached;
}

/** A production server refuses to start on the development secret (called by server.ts, not at build). */
export function assertProductionSecrets(e: Env): void {
  if (e.NODE_ENV === 'production' && e.NEXTAUTH_SECRET === DEV_SECRET) {
    throw new Error('NEXTAUTH_SECRET must be set in production (npm start makes one in .data/)');
  }
}
