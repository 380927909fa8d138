import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import { env } from '@/lib/env';
import * as schema from './schema';

export type Db = NodePgDatabase<typeof schema> & { $client: pg.Pool };

/** The one place a pool is made. Tests and scripts pass their own URL. */
export function createDb(url: string, max = 10): Db {
  const pool = new pg.Pool({ connectionString: url, max });
  pool.on('error', (err) => console.error('[db] idle client error', err.message));
  // A client checked out of the pool (a transaction, the realtime adapter's LISTEN) has no error listener of the
  // pool's; without one, a database restart would throw an unhandled 'error' and end the process.
  pool.on('connect', (client) => client.on('error', (err) => console.error('[db] client error', err.message)));
  return drizzle(pool, { schema }) as Db;
}

const key = Symbol.for('levelwire.db');
type Holder = { [key]?: Db };

/** The process-wide database (one pool shared by Next's bundles and the socket server). */
export function db(): Db {
  const g = globalThis as Holder;
  g[key] ??= createDb(env().DATABASE_URL);
  return g[key];
}
