import { sql } from 'drizzle-orm';
import { NextResponse } from 'next/server';
import { db } from '@/db/client';

export const dynamic = 'force-dynamic';

/** The app's and the database's status; open to anyone, tells nothing private. */
export async function GET() {
  const started = performance.now();
  let database: 'up' | 'down' = 'down';
  try {
    await db().execute(sql`select 1`);
    database = 'up';
  } catch {
    database = 'down';
  }
  const body = { app: 'up', database, dbLatencyMs: Math.round((performance.now() - started) * 10) / 10, time: new Date().toISOString() };
  return NextResponse.json(body, { status: database === 'up' ? 200 : 503 });
}
