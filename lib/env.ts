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
   * Sign-in limits (lib/auth/sign-in-limit.ts). This many failed sign-ins for one e-mail from one address lock that
   * e-mail for that address (the right password included) for SIGN_IN_LOCK_MINUTES; a success clears the count.
   */
  SIGN_IN_MAX_FAILURES: z.coerce.number().int().min(1).default(5),
  /** Failed sign-ins from one address, any e-mails, that refuse every sign-in from it; high, as a shop's technicians may share one address. */
  SIGN_IN_MAX_FAILURES_PER_ADDRESS: z.coerce.number().int().min(1).default(50),
  /** Minutes that failures are counted over and that a lock lasts. */
  SIGN_IN_LOCK_MINUTES: z.coerce.number().int().min(1).default(15),
  /**
   * Reverse proxies in front of the server that each append the address they saw to X-Forwarded-For. 0 (the
   * default): the header is not believed and the connection's own address counts (server.ts pins it).
   */
  TRUSTED_PROXIES: z.coerce.number().int().min(0).max(5).default(0),
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
