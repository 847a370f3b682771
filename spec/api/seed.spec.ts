import { count } from 'drizzle-orm';
import pg from 'pg';
import { createDatabase, type Database } from '../../api/db';
import { runMigrations } from '../../scripts/migrate';
import { chassisTemplates, users } from '../../schema/index';
import { createAdmin, DEMO_ACCOUNTS, seedDemo, SeedRefused } from '../../seeds/seed';

describe('The demo seed', () => {
  const name = `driftmark_seed_spec_${process.pid}`;
  let admin: pg.Client;
  let database: Database;

  beforeAll(async () => {
    const url = process.env.DATABASE_URL!;
    admin = new pg.Client({ connectionString: url.replace(/\/[^/]+$/, '/postgres') });
    await admin.connect();
    await admin.query(`CREATE DATABASE ${name}`);
    const own = url.replace(/\/[^/]+$/, `/${name}`);
    await runMigrations(own);
    database = createDatabase(own, { max: 2 });
  });

  afterAll(async () => {
    await database.close();
    await admin.query(`DROP DATABASE ${name} WITH (FORCE)`);
    await admin.end();
  });

  it('refuses to create the demo accounts when NODE_ENV=production, and creates nothing', async () => {
    await expectAsync(seedDemo(database.db, { NODE_ENV: 'production' })).toBeRejectedWithError(SeedRefused, /production/);
    const [{ n }] = await database.db.select({ n: count() }).from(users);
    expect(n).toBe(0);
  });

  it('creates the first admin of a production instance, once', async () => {
    await createAdmin(database.db, 'keeper@museum.example', 'Collection Keeper', 'a-long-password');
    await expectAsync(createAdmin(database.db, 'KEEPER@museum.example', 'Again', 'a-long-password')).toBeRejectedWithError(SeedRefused);
    const rows = await database.db.select().from(users);
    expect(rows.map((u) => u.roles)).toEqual([['admin']]);
  });

  it('creates the five demo accounts in development only when no user exists', async () => {
    await database.db.delete(users);
    expect(await seedDemo(database.db, { NODE_ENV: 'development' })).toBe(DEMO_ACCOUNTS.length);
    expect(await seedDemo(database.db, { NODE_ENV: 'development' })).toBe(0);
    const emails = (await database.db.select().from(users)).map((u) => u.email).sort();
    expect(emails).toEqual(['admin@driftmark.example', 'author@driftmark.example', 'instructor@driftmark.example', 'student@driftmark.example', 'tech@driftmark.example']);
  });

  it('adds the demo templates to a development database made before templates existed (accounts, no template)', async () => {
    const old = `${name}_old`;
    await admin.query(`CREATE DATABASE ${old}`);
    const url = process.env.DATABASE_URL!.replace(/\/[^/]+$/, `/${old}`);
    await runMigrations(url);
    const db = createDatabase(url, { max: 2 });
    try {
      await db.db.insert(users).values(DEMO_ACCOUNTS.map((a) => ({ ...a, passwordHash: 'x' })));
      expect(await seedDemo(db.db, { NODE_ENV: 'development' })).toBe(0);
      const [{ t }] = await db.db.select({ t: count() }).from(chassisTemplates);
      expect(t).toBe(3);
      // Seeding again adds nothing.
      await seedDemo(db.db, { NODE_ENV: 'development' });
      const [{ t2 }] = await db.db.select({ t2: count() }).from(chassisTemplates);
      expect(t2).toBe(3);
    } finally {
      await db.close();
      await admin.query(`DROP DATABASE ${old} WITH (FORCE)`);
    }
  });
});
