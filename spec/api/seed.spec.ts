import { count } from 'drizzle-orm';
import pg from 'pg';
import { createDatabase, type Database } from '../../api/db';
import { runMigrations } from '../../scripts/migrate';
import { and, asc, eq } from 'drizzle-orm';
import { SurveyGrid } from '../../api/domain/survey-grid';
import type { TemplateDocument, TubeTypeRecord } from '../../api/domain/template-format';
import { chassisTemplates, gateSignatures, liftedLeads, partsRecord, provenanceLabels, readings, sets, surveys, templateVersions, tubeTypes, users } from '../../schema/index';
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

  it('seeds the demo sets once: three surveys with drift and a replacement, a lead lifted mid-survey, a complete set with its label', async () => {
    // Runs after the accounts and templates exist (the tests above).
    const all = await database.db.select().from(sets).orderBy(asc(sets.id));
    expect(all.map((x) => x.label)).toEqual(['Holloway collection', 'Job 2611 — R. Anselm', 'Vellmar Museum of Sound']);
    const [kestrel, larkspur, museum] = all;
    const ks = await database.db.select().from(surveys).where(eq(surveys.setId, kestrel.id)).orderBy(asc(surveys.createdAt));
    expect(ks.map((x) => x.createdAt.getUTCFullYear())).toEqual([2019, 2022, 2025]);
    expect(ks.every((x) => x.state === 'complete')).toBeTrue();
    const [version] = await database.db.select().from(templateVersions).where(eq(templateVersions.id, ks[0].templateVersionId));
    const doc = version.content as TemplateDocument;
    const types = (await database.db.select().from(tubeTypes)) as unknown as TubeTypeRecord[];
    const r9 = doc.testPoints.find((t) => t.kind === 'component-check' && t.componentKey === doc.components.find((c) => c.ref === 'R9')!.key)!.key;
    const verdictOf = async (surveyId: number) => {
      const s = ks.find((x) => x.id === surveyId)!;
      const grid = new SurveyGrid({ document: doc, tubeTypes: types, deviations: [], meter: (s.meter as { profile: never }).profile, rule: s.rule as never, conditions: s.conditions as never });
      const rs = await database.db.select().from(readings).where(eq(readings.surveyId, surveyId));
      return grid.evaluateAll(rs.map((r) => ({ ...r, liftedEnd: r.liftedEnd as 0 | 1 | null })), s.jointChecks as Record<string, unknown>).get(r9)!.verdict;
    };
    // The plate load drifted out of band by 2022, was replaced, and reads in band in 2025.
    expect(await verdictOf(ks[0].id)).toBe('in-band');
    expect(await verdictOf(ks[1].id)).toBe('high');
    expect(await verdictOf(ks[2].id)).toBe('in-band');
    const replaced = await database.db.select().from(partsRecord).where(and(eq(partsRecord.setId, kestrel.id), eq(partsRecord.componentRef, 'R9')));
    expect(replaced.map((p) => p.action)).toEqual(['replaced']);
    // Mid-survey with a lead lifted and not re-soldered.
    const [ls] = await database.db.select().from(surveys).where(eq(surveys.setId, larkspur.id));
    expect(ls.state).toBe('draft');
    const leads = await database.db.select().from(liftedLeads).where(eq(liftedLeads.setId, larkspur.id));
    expect(leads.length).toBe(1);
    expect(leads[0].resolderedAt).toBeNull();
    const follow = await database.db.select().from(readings).where(and(eq(readings.surveyId, ls.id), eq(readings.method, 'lead-lifted')));
    expect(follow.length).toBe(1);
    expect(follow[0].followsReadingId).not.toBeNull();
    // Complete, first power recorded, a live label.
    expect(museum.firstPowerAt).not.toBeNull();
    const labels = await database.db.select().from(provenanceLabels).where(eq(provenanceLabels.setId, museum.id));
    expect(labels.filter((x) => x.revokedAt === null).length).toBe(1);
    const signed = await database.db.select().from(gateSignatures).where(eq(gateSignatures.setId, museum.id));
    expect(signed.map((g) => g.itemKey)).toContain('first-power');
    expect(signed.length).toBeGreaterThan(4);
    // Seeding again adds no set.
    await seedDemo(database.db, { NODE_ENV: 'development' });
    expect((await database.db.select().from(sets)).length).toBe(3);
  });
});
