import { eq, sql } from 'drizzle-orm';
import type { Db } from '../client';
import { users } from '../schema';

export async function getUserByEmail(db: Db, { email }: { email: string }) {
  const [user] = await db.select().from(users).where(sql`lower(${users.email}) = lower(${email})`);
  return user ?? null;
}

export async function getUserById(db: Db, { id }: { id: string }) {
  const [user] = await db.select().from(users).where(eq(users.id, id));
  return user ?? null;
}
