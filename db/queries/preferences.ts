import { eq } from 'drizzle-orm';
import type { UnitPreference } from '@/lib/settings';
import type { Db } from '../client';
import { users } from '../schema';

export async function setUnitSystem(db: Db, { userId, unitSystem }: { userId: string } & UnitPreference) {
  await db.update(users).set({ unitSystem }).where(eq(users.id, userId));
}
