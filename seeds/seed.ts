/**
 * Demo data: an invented scenario. Accounts here, the tube types and chassis templates in
 * seeds/templates.ts, the sets with their surveys in seeds/sets.ts; the class arrives with the classes issue. Refuses to
 * create demo accounts when NODE_ENV=production.
 */
import bcrypt from 'bcrypt';
import { count, sql } from 'drizzle-orm';
import { parseArgs } from 'node:util';
import { createDatabase } from '../api/db';
import type { Db } from '../api/db';
import { chassisTemplates, users, type Role } from '../schema/index';
import { seedDemoClass } from './classes';
import { seedDemoSets } from './sets';
import { seedDemoTemplates } from './templates';

export const DEMO_PASSWORD = 'driftmark-demo';

export const DEMO_ACCOUNTS: { email: string; name: string; roles: Role[] }[] = [
  { email: 'admin@driftmark.example', name: 'Ada Okonkwo-Lind', roles: ['admin'] },
  { email: 'author@driftmark.example', name: 'Bram Tessaro', roles: ['author', 'technician'] },
  { email: 'tech@driftmark.example', name: 'Carmen Vidalje', roles: ['technician'] },
  { email: 'instructor@driftmark.example', name: 'Dov Marrick', roles: ['instructor', 'technician'] },
  { email: 'student@driftmark.example', name: 'Esi Pohlmann', roles: ['student'] },
];

export class SeedRefused extends Error {}

/**
 * Seeds the demo data, each part when its own table is still empty: the accounts when there is no
 * user; the tube types and chassis templates when there is no template and the demo author exists
 * (so a development database made before a part existed gets it at the next start). Never under
 * NODE_ENV=production. Returns how many accounts were created.
 */
export async function seedDemo(db: Db, env: NodeJS.ProcessEnv = process.env): Promise<number> {
  const [{ n }] = await db.select({ n: count() }).from(users);
  if (n === 0 && env.NODE_ENV === 'production') {
    throw new SeedRefused(
      'Refusing to create demo accounts with NODE_ENV=production. Create the first admin with: ' +
        'DATABASE_URL=… ADMIN_PASSWORD=… npm run seed -- --admin EMAIL --name "Full Name"',
    );
  }
  if (env.NODE_ENV === 'production') return 0;
  let created = 0;
  if (n === 0) {
    const passwordHash = await bcrypt.hash(DEMO_PASSWORD, 11);
    await db.insert(users).values(DEMO_ACCOUNTS.map((a) => ({ ...a, passwordHash })));
    created = DEMO_ACCOUNTS.length;
  }
  const [{ templates }] = await db.select({ templates: count() }).from(chassisTemplates);
  const [author] = await db.select({ id: users.id }).from(users).where(sql`lower(${users.email}) = ${DEMO_ACCOUNTS[1].email}`);
  if (templates === 0 && author) await seedDemoTemplates(db);
  await seedDemoSets(db);
  await seedDemoClass(db, DEMO_PASSWORD);
  return created;
}

/** Creates one admin account (for a production instance, where no demo accounts exist). */
export async function createAdmin(db: Db, email: string, name: string, password: string): Promise<void> {
  if (password.length < 10) throw new SeedRefused('ADMIN_PASSWORD must be at least 10 characters.');
  const [existing] = await db.select({ id: users.id }).from(users).where(sql`lower(${users.email}) = lower(${email})`);
  if (existing) throw new SeedRefused(`An account with ${email} already exists.`);
  await db.insert(users).values({ email, name, roles: ['admin'], passwordHash: await bcrypt.hash(password, 11) });
}

// `npm run seed` (DATABASE_URL set): the demo accounts, or with --admin one admin account.
if (import.meta.url === `file://${process.argv[1]}`) {
  const { values } = parseArgs({ options: { admin: { type: 'string' }, name: { type: 'string' } } });
  const url = process.env.DATABASE_URL;
  if (!url) {
    console.error('Set DATABASE_URL (npm start seeds its own cluster by itself).');
    process.exit(2);
  }
  const database = createDatabase(url, { max: 1 });
  const work = values.admin
    ? createAdmin(database.db, values.admin, values.name ?? values.admin, process.env.ADMIN_PASSWORD ?? '').then(() => console.log(`Admin ${values.admin} created.`))
    : seedDemo(database.db).then((n) => console.log(n ? `${n} demo accounts created.` : 'Users exist already: nothing seeded.'));
  work
    .catch((e) => {
      console.error(e instanceof SeedRefused ? e.message : e);
      process.exitCode = 1;
    })
    .finally(() => database.close());
}
