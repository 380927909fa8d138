import { createHash } from 'node:crypto';
import type pg from 'pg';
import { RateLimiterPostgres } from 'rate-limiter-flexible';
import { db } from '@/db/client';
import { env } from '@/lib/env';
import type { SignInLock } from './sign-in-messages';

/**
 * Failed sign-ins, counted in PostgreSQL (`sign_in_limits`, rate-limiter-flexible) so every server process sees
 * the same counts. Two counters, both over a window of `lockMinutes` from the first failure:
 * - per e-mail and address: `maxFailures` failures lock that e-mail from that address for `lockMinutes`
 *   from the last one (5 and 15 min by default); the right password is refused too, unchecked. A success
 *   clears it. Someone else guessing at an account from elsewhere does not lock its owner out.
 * - per address: `maxFailuresPerAddress` failures over any e-mails lock the address the same way (50 by default,
 *   room for a shop whose technicians share one address). A success does not clear it, or one known account
 *   would let an address guess at the others without end.
 * Unknown e-mails count like known ones, so a lock tells nothing about which accounts exist.
 */
export type SignInLimits = { maxFailures: number; maxFailuresPerAddress: number; lockMinutes: number };

const TABLE = 'sign_in_limits';
const ACCOUNT_PREFIX = 'sign_in:account';
const ADDRESS_PREFIX = 'sign_in:address';

/** The e-mail as counted: trimmed, lower case, hashed, so a password typed into the e-mail field is not stored. */
function accountKey(email: string, address: string): string {
  return `${createHash('sha256').update(email.trim().toLowerCase()).digest('hex').slice(0, 32)}@${address}`;
}

/** The rows' keys in `sign_in_limits` for this e-mail and address (for tests and for support looking at a lock). */
export function signInLimitKeys(email: string, address: string): { account: string; address: string } {
  return { account: `${ACCOUNT_PREFIX}:${accountKey(email, address)}`, address: `${ADDRESS_PREFIX}:${address}` };
}

export class SignInLimiter {
  private readonly account: RateLimiterPostgres;
  private readonly byAddress: RateLimiterPostgres;
  private readonly lockSeconds: number;

  constructor(
    pool: pg.Pool,
    private readonly limits: SignInLimits,
  ) {
    this.lockSeconds = limits.lockMinutes * 60;
    // The table comes from migration 0005; expired rows are deleted by the library every few minutes.
    const common = { storeClient: pool, storeType: 'pool', tableName: TABLE, tableCreated: true, duration: this.lockSeconds };
    this.account = new RateLimiterPostgres({ ...common, keyPrefix: ACCOUNT_PREFIX, points: limits.maxFailures });
    this.byAddress = new RateLimiterPostgres({ ...common, keyPrefix: ADDRESS_PREFIX, points: limits.maxFailuresPerAddress });
  }

  /** The lock in force for this e-mail from this address, if any; asked before the password is checked. */
  async lockFor(email: string, address: string): Promise<SignInLock | null> {
    const [account, byAddress] = await Promise.all([this.account.get(accountKey(email, address)), this.byAddress.get(address)]);
    if (byAddress && byAddress.consumedPoints > this.limits.maxFailuresPerAddress) return { scope: 'address', retryAfterMs: byAddress.msBeforeNext };
    if (account && account.consumedPoints > this.limits.maxFailures) return { scope: 'account', retryAfterMs: account.msBeforeNext };
    return null;
  }

  /** Counts a failure on both counters; the one that reaches its limit locks (`block` marks it past the limit). */
  async recordFailure(email: string, address: string): Promise<SignInLock | null> {
    const key = accountKey(email, address);
    const [account, byAddress] = await Promise.all([this.account.penalty(key), this.byAddress.penalty(address)]);
    let lock: SignInLock | null = null;
    if (account.consumedPoints >= this.limits.maxFailures) {
      await this.account.block(key, this.lockSeconds);
      lock = { scope: 'account', retryAfterMs: this.lockSeconds * 1000 };
    }
    if (byAddress.consumedPoints >= this.limits.maxFailuresPerAddress) {
      await this.byAddress.block(address, this.lockSeconds);
      lock = { scope: 'address', retryAfterMs: this.lockSeconds * 1000 };
    }
    return lock;
  }

  /** A success clears this e-mail's count from this address (not the address's). */
  async recordSuccess(email: string, address: string): Promise<void> {
    await this.account.delete(accountKey(email, address));
  }
}

const key = Symbol.for('levelwire.signInLimiter');
type Holder = { [key]?: SignInLimiter };

/** The process-wide limiter on the shared pool, with the limits from the environment. */
export function signInLimiter(): SignInLimiter {
  const g = globalThis as Holder;
  if (!g[key]) {
    const e = env();
    g[key] = new SignInLimiter(db().$client, {
      maxFailures: e.SIGN_IN_MAX_FAILURES,
      maxFailuresPerAddress: e.SIGN_IN_MAX_FAILURES_PER_ADDRESS,
      lockMinutes: e.SIGN_IN_LOCK_MINUTES,
    });
  }
  return g[key];
}
