/**
 * Demo data: an invented scenario. Accounts here; chassis, sets and the class arrive with the
 * issues that build them. Refuses to create demo accounts when NODE_ENV=production.
 */
import bcrypt from 'bcrypt';
import { count } from 'drizzle-orm';
import type { Db } from '../api/db';
import { users, type Role } from '../schema/index';

export const DEMO_PASSWORD = 'driftmark-demo';

export const DEMO_ACCOUNTS: { email: string; name: string; roles: Role[] }[] = [
  { email: 'admin@driftmark.example', name: 'Ada Okonkwo-Lind', roles: ['admin'] },
  { email: 'author@driftmark.example', name: 'Bram Tessaro', roles: ['author', 'technician'] },
  { email: 'tech@driftmark.example', name: 'Carmen Vidalje', roles: ['technician'] },
  { email: 'instructor@driftmark.example', name: 'Dov Marrick', roles: ['instructor', 'technician'] },
  { email: 'student@driftmark.example', name: 'Esi Pohlmann', roles: ['student'] },
];

export class SeedRefused extends Error {}

/** Seeds the demo accounts when the users table is empty. Returns how many were created. */
export async function seedDemo(db: Db, env: NodeJS.ProcessEnv = process.env): Promise<number> {
  const [{ n }] = await db.select({ n: count() }).from(users);
  if (n > 0) return 0;
  if (env.NODE_ENV === 'production') {
    throw new SeedRefused('Refusing to create demo accounts with NODE_ENV=production. Create the first admin with `npm run seed -- --admin EMAIL`.');
  }
  const passwordHash = await bcrypt.hash(DEMO_PASSWORD, 11);
  await db.insert(users).values(DEMO_ACCOUNTS.map((a) => ({ ...a, passwordHash })));
  return DEMO_ACCOUNTS.length;
}
