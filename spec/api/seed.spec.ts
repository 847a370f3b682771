import { count } from 'drizzle-orm';
import pg from 'pg';
import { createDatabase, type Database } from '../../api/db';
import { runMigrations } from '../../scripts/migrate';
import { and, asc, eq, inArray, isNotNull } from 'drizzle-orm';
import { compareReadings, feedbackHints } from '../../api/domain/review';
import { SurveyGrid } from '../../api/domain/survey-grid';
import type { TemplateDocument, TubeTypeRecord } from '../../api/domain/template-format';
import { assignments, attempts, classes, classMembers, competencySignoffs, notifications, readingComments, reviews, chassisTemplates, gateSignatures, liftedLeads, partsRecord, provenanceLabels, readings, sets, surveys, templateVersions, tubeTypes, users } from '../../schema/index';
import { DEMO_CLASS_STUDENTS } from '../../seeds/classes';
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
    // The five accounts, and the demo class's three other students (seeds/classes.ts) once the templates exist.
    expect(emails.filter((e) => !DEMO_CLASS_STUDENTS.some((s) => s.email === e))).toEqual(['admin@driftmark.example', 'author@driftmark.example', 'instructor@driftmark.example', 'student@driftmark.example', 'tech@driftmark.example']);
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
    // The demo class's training sets (owned by the instructor) are checked below.
    const all = (await database.db.select().from(sets).orderBy(asc(sets.id))).filter((x) => !x.label.startsWith('Trainer'));
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
    // Seeding again adds no set (three of the technician, two training sets of the class).
    await seedDemo(database.db, { NODE_ENV: 'development' });
    expect((await database.db.select().from(sets)).length).toBe(5);
  });

  it('seeds the demo class: an instructor, four students, one assignment reviewed (comments, a re-measure, a resubmission), one awaiting review with predictions', async () => {
    const [klass, ...more] = await database.db.select().from(classes);
    expect(more.length).toBe(0);
    const members = await database.db.select().from(classMembers).where(eq(classMembers.classId, klass.id));
    expect(members.length).toBe(4);
    const [instructor] = await database.db.select().from(users).where(eq(users.id, klass.instructorId));
    expect(instructor.roles).toContain('instructor');
    const [a1, a2] = await database.db.select().from(assignments).where(eq(assignments.classId, klass.id)).orderBy(asc(assignments.id));
    expect(a2.predictFirst).toBeTrue();
    expect(a2.showVerdicts).toBeFalse();
    // The reference surveys are ordinary surveys of the training sets, by the instructor.
    for (const a of [a1, a2]) {
      const [ref] = await database.db.select().from(surveys).where(eq(surveys.id, a.referenceSurveyId!));
      expect(ref.assignmentId).toBeNull();
      expect(ref.setId).toBe(a.setId);
      expect(ref.startedBy).toBe(klass.instructorId);
    }

    // Assignment 1: Esi returned, re-measured, resubmitted late, accepted.
    const [esi] = await database.db.select().from(users).where(eq(users.email, 'student@driftmark.example'));
    const [esiSurvey] = await database.db.select().from(surveys).where(and(eq(surveys.assignmentId, a1.id), eq(surveys.startedBy, esi.id)));
    expect(esiSurvey.state).toBe('accepted');
    const tries = await database.db.select().from(attempts).where(eq(attempts.surveyId, esiSurvey.id)).orderBy(asc(attempts.number));
    expect(tries.map((t) => t.number)).toEqual([1, 2]);
    expect(tries[1].submittedAt.getTime()).toBeGreaterThan(a1.dueAt.getTime()); // late: derived from the due date
    const decisions = await database.db.select().from(reviews).where(inArray(reviews.attemptId, tries.map((t) => t.id))).orderBy(asc(reviews.id));
    expect(decisions.map((d) => d.decision)).toEqual(['returned', 'accepted']);
    expect(decisions[0].remeasureKeys.length).toBe(1);
    const comments = await database.db.select().from(readingComments).where(eq(readingComments.attemptId, tries[0].id));
    expect(comments.length).toBe(2);

    // The re-measure follows the first reading and agrees with the reference by E_n; the first reading earns the fingers hint.
    const tp = decisions[0].remeasureKeys[0];
    const [version] = await database.db.select().from(templateVersions).where(eq(templateVersions.id, a1.templateVersionId));
    const doc = version.content as TemplateDocument;
    const types = (await database.db.select().from(tubeTypes)) as unknown as TubeTypeRecord[];
    const gridOf = (s: typeof esiSurvey) => new SurveyGrid({ document: doc, tubeTypes: types, deviations: [], meter: (s.meter as { profile: never }).profile, rule: s.rule as never, conditions: s.conditions as never });
    const mine = await database.db.select().from(readings).where(and(eq(readings.surveyId, esiSurvey.id), eq(readings.testPointKey, tp))).orderBy(asc(readings.id));
    expect(mine.length).toBe(2);
    expect(mine[1].followsReadingId).toBe(mine[0].id);
    const [refSurvey] = await database.db.select().from(surveys).where(eq(surveys.id, a1.referenceSurveyId!));
    const [refReading] = await database.db.select().from(readings).where(and(eq(readings.surveyId, refSurvey.id), eq(readings.testPointKey, tp)));
    const asGrid = (r: typeof refReading) => ({ ...r, liftedEnd: r.liftedEnd as 0 | 1 | null });
    const evalMine = gridOf(esiSurvey).evaluate(asGrid(mine[1]));
    const evalRef = gridOf(refSurvey).evaluate(asGrid(refReading));
    const cmp = compareReadings(
      { ...mine[1], verdict: evalMine.verdict, uncertaintyOhms: evalMine.uncertaintyOhms },
      { ...refReading, verdict: evalRef.verdict, uncertaintyOhms: evalRef.uncertaintyOhms },
      { conditionDifferences: [], sameMeter: false },
    );
    expect(cmp.agreement).toBe('agree');
    const row = gridOf(esiSurvey).row(tp)!;
    const expectedOhms = row.inCircuit?.expectedOhms ?? null;
    expect(feedbackHints({ reading: mine[0], expectedOhms, meter: (esiSurvey.meter as { profile: never }).profile, predictionErrorPct: null })).toContain('fingers-across-probes');

    // Assignment 2: two submissions awaiting review, Esi's draft with predictions, one student not started.
    const a2Surveys = await database.db.select().from(surveys).where(eq(surveys.assignmentId, a2.id));
    expect(a2Surveys.map((s) => s.state).sort()).toEqual(['draft', 'submitted', 'submitted']);
    const a2Attempts = await database.db.select().from(attempts).where(eq(attempts.assignmentId, a2.id));
    expect(a2Attempts.length).toBe(2);
    expect((await database.db.select().from(reviews).where(inArray(reviews.attemptId, a2Attempts.map((t) => t.id)))).length).toBe(0);
    const esiDraft = a2Surveys.find((s) => s.startedBy === esi.id)!;
    expect(esiDraft.state).toBe('draft');
    const predicted = await database.db.select().from(readings).where(and(eq(readings.surveyId, esiDraft.id), isNotNull(readings.prediction)));
    expect(predicted.length).toBeGreaterThan(3);

    // Competencies signed and notifications of the same events.
    expect((await database.db.select().from(competencySignoffs).where(eq(competencySignoffs.studentId, esi.id))).length).toBe(3);
    expect((await database.db.select().from(notifications).where(eq(notifications.userId, klass.instructorId))).length).toBeGreaterThan(0);

    // Seeding again adds no class.
    await seedDemo(database.db, { NODE_ENV: 'development' });
    expect((await database.db.select().from(classes)).length).toBe(1);
  });
});
