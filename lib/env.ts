import { z } from 'zod';

const DEV_SECRET = 'levelwire-development-secret-change-me';

const schema = z.object({
  DATABASE_URL: z.string().url().default('postgres://postgres@127.0.0.1:54329/levelwire'),
  NEXTAUTH_SECRET: z.string().min(16).default(DEV_SECRET),
  NEXTAUTH_URL: z.string().url().optional(),
  PORT: z.coerce.number().int().positive().default(3000),
  HOST: z.string().default('127.0.0.1'),
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
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
