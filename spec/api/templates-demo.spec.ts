/** The demo seed's templates: three invented chassis through the real use cases, in a database of their own. */
import { eq } from 'drizzle-orm';
import pg from 'pg';
import { createDatabase, type Database } from '../../api/db';
import { runMigrations } from '../../scripts/migrate';
import { chassisTemplates, templateCorrections, templateVersions, tubeTypes, users } from '../../schema/index';
import { seedDemo } from '../../seeds/seed';
import { DEMO_TUBE_TYPES } from '../../seeds/tube-types';

describe('The demo templates', () => {
  const name = `driftmark_demo_templates_${process.pid}`;
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
    await seedDemo(database.db, { NODE_ENV: 'development' });
  });

  afterAll(async () => {
    await database.close();
    await admin.query(`DROP DATABASE ${name} WITH (FORCE)`);
    await admin.end();
  });

  it('seeds the tube types and three public templates owned by the demo author, every one published', async () => {
    const db = database.db;
    expect((await db.select().from(tubeTypes)).length).toBe(DEMO_TUBE_TYPES.length);
    const [author] = await db.select().from(users).where(eq(users.email, 'author@driftmark.example'));
    const rows = await db.select().from(chassisTemplates).orderBy(chassisTemplates.id);
    expect(rows.length).toBe(3);
    for (const t of rows) {
      expect(t.ownerId).toBe(author.id);
      expect(t.visibility).toBe('public');
      expect(t.latestPublishedNumber).toBeGreaterThanOrEqual(1);
      expect(t.testPointCount).toBeGreaterThan(0);
    }
    expect(rows.map((t) => t.kind).sort()).toEqual(['amplifier', 'console', 'table-radio']);
  });

  it('one template has two published versions, and one a correction from the demo technician waiting', async () => {
    const db = database.db;
    const versions = await db.select().from(templateVersions).where(eq(templateVersions.state, 'published'));
    const perTemplate = new Map<number, number>();
    for (const v of versions) perTemplate.set(v.templateId, (perTemplate.get(v.templateId) ?? 0) + 1);
    expect([...perTemplate.values()].sort()).toEqual([1, 1, 2]);
    const [tech] = await db.select().from(users).where(eq(users.email, 'tech@driftmark.example'));
    const open = await db.select().from(templateCorrections).where(eq(templateCorrections.state, 'open'));
    expect(open.length).toBe(1);
    expect(open[0].authorId).toBe(tech.id);
  });
});
