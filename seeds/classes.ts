/**
 * The demo class (an invented scenario): instructor Dov Marrick's evening class "Bench practice
 * I" with four students and two assignments on training chassis the instructor owns —
 *  1. "Intake survey of the QA-10 trainer" (due 20 Nov 2026), reviewed: one student returned with
 *     comments and a re-measure request, re-measured and resubmitted late, then accepted; one
 *     accepted first time; one accepted with a low score (fingers across the probes on the 1 MΩ
 *     grid leak); one never started.
 *  2. "Predict, then measure: Larkspur 7-P front end" (predict first, verdicts hidden while
 *     measuring; due six days after seeding), awaiting review: two submissions, one draft with
 *     predictions typed so far, one not started.
 * Competency sign-offs and in-app notifications of the same events. Readings are computed from the
 * chassis networks (seeds/sets.ts readingsFor) with the trainers' drifted parts.
 */
import bcrypt from 'bcrypt';
import { count, sql } from 'drizzle-orm';
import type { Db } from '../api/db';
import type { CompetencyKey } from '../api/domain/class-format';
import { readingsOf } from '../api/surveys/surveys.repository';
import { parseReadingText } from '../api/domain/survey-grid';
import { DEFAULT_RULE } from '../api/domain/verdict';
import {
  assignments,
  attempts,
  classes,
  classInvitations,
  classMembers,
  competencySignoffs,
  meterProfiles,
  notifications,
  readingComments,
  readings,
  reviews,
  sets,
  tubeTypes,
  users,
} from '../schema/index';
import type { TubeTypeRecord } from '../api/domain/template-format';
import { benchText, conditionsOf, DEMO_DIGITAL_METER, demoTemplate, insertSurvey, keyOf, readingsFor, tpOf, type DemoTemplate, type PlannedReading } from './sets';
import { createHash, randomBytes } from 'node:crypto';

const INSTRUCTOR_EMAIL = 'instructor@driftmark.example';
const STUDENT_EMAIL = 'student@driftmark.example';

/** The three other students of the demo class (created with the demo password when missing). */
export const DEMO_CLASS_STUDENTS = [
  { email: 'student2@driftmark.example', name: 'Farid Quenneville' },
  { email: 'student3@driftmark.example', name: 'Grete Abiodun' },
  { email: 'student4@driftmark.example', name: 'Hollis Nakamura-Berg' },
] as const;

const DAY = 86_400_000;

async function userByEmail(db: Db, email: string): Promise<{ id: number; name: string } | undefined> {
  const [u] = await db.select({ id: users.id, name: users.name }).from(users).where(sql`lower(${users.email}) = ${email}`);
  return u;
}

/** Frozen copy of a survey's readings and context as an attempt keeps them. */
async function freeze(db: Db, surveyId: number, meter: { name: string; profile: unknown; checkDate: string }, doc: DemoTemplate['doc']) {
  return { readings: await readingsOf(db, surveyId), context: { conditions: conditionsOf(doc), meter } };
}

/**
 * Seeds the demo class when there is no class and the demo instructor, student and templates
 * exist. Returns how many classes were made (0 or 1).
 */
export async function seedDemoClass(db: Db, password: string): Promise<number> {
  const [{ n }] = await db.select({ n: count() }).from(classes);
  if (n > 0) return 0;
  const instructor = await userByEmail(db, INSTRUCTOR_EMAIL);
  const esi = await userByEmail(db, STUDENT_EMAIL);
  if (!instructor || !esi) return 0;
  const qa10 = await demoTemplate(db, 'QA-10');
  const larkspur = await demoTemplate(db, 'Larkspur 7-P');
  if (!qa10 || !larkspur) return 0;
  const types = (await db.select().from(tubeTypes)).map((t) => ({ ...t, pins: t.pins, ties: t.ties }) as unknown as TubeTypeRecord);

  const hash = await bcrypt.hash(password, 11);
  const others: { id: number; name: string }[] = [];
  for (const s of DEMO_CLASS_STUDENTS) {
    const found = await userByEmail(db, s.email);
    if (found) others.push(found);
    else {
      const [u] = await db.insert(users).values({ email: s.email, name: s.name, roles: ['student'], passwordHash: hash }).returning({ id: users.id, name: users.name });
      others.push(u);
    }
  }
  const [farid, grete, hollis] = others;
  const students = [esi, farid, grete, hollis];

  // The school's bench meters: one profile each (same model as the technician's).
  const meterOf = async (ownerId: number, name: string) => {
    const [m] = await db
      .insert(meterProfiles)
      .values({ ownerId, name, profile: DEMO_DIGITAL_METER, checkKind: 'check', checkDate: '2026-09-01', checkResistorOhms: 100_000, checkResistorTolerancePct: 0.1 })
      .returning({ id: meterProfiles.id });
    return { id: m.id, name, profile: DEMO_DIGITAL_METER, checkDate: '2026-09-01' };
  };
  const instructorMeter = await meterOf(instructor.id, 'Bench 1 DMM (2000 count)');
  const studentMeters = new Map<number, Awaited<ReturnType<typeof meterOf>>>();
  for (const [i, s] of students.entries()) studentMeters.set(s.id, await meterOf(s.id, `Bench ${i + 2} DMM (2000 count)`));

  const [klass] = await db
    .insert(classes)
    .values({ instructorId: instructor.id, name: 'Bench practice I', term: 'Autumn 2026', createdAt: new Date('2026-10-01T18:00:00Z'), updatedAt: new Date('2026-10-01T18:00:00Z') })
    .returning({ id: classes.id });
  await db.insert(classMembers).values(students.map((s, i) => ({ classId: klass.id, studentId: s.id, joinedAt: new Date(Date.UTC(2026, 9, 2 + i, 19)) })));
  // One open invitation (the link went out by mail; only its hash is kept).
  await db.insert(classInvitations).values({
    classId: klass.id,
    email: 'latecomer@driftmark.example',
    tokenHash: createHash('sha256').update(randomBytes(32).toString('base64url')).digest('hex'),
    invitedBy: instructor.id,
    createdAt: new Date(Date.now() - 2 * DAY),
    expiresAt: new Date(Date.now() + 12 * DAY),
  });

  // ---- Training sets, owned by the instructor, with drifted parts ----
  const q = qa10.doc;
  const [qaSet] = await db
    .insert(sets)
    .values({
      ownerId: instructor.id,
      templateId: qa10.templateId,
      label: 'Trainer T1 (QA-10)',
      accessionNumber: 'TR-01',
      serial: 'QA10-1138',
      jobStatus: 'surveying',
      restorationLevel: 'repair',
      condition: 'Teaching chassis on a bench frame; never powered in class without the instructor.',
      complaint: 'Training set: parts drifted on purpose are kept as found.',
      intakeNotes: 'Students survey it unpowered, capacitors discharged and verified first.',
      createdAt: new Date('2026-10-01T18:00:00Z'),
      updatedAt: new Date('2026-10-01T18:00:00Z'),
    })
    .returning({ id: sets.id });
  const qaDrift = { [keyOf(q, 'R4')]: 1.32e6, [keyOf(q, 'R2')]: 26.1e3, [keyOf(q, 'R5')]: 70.5e3 };
  const qaStages = q.stages.slice(0, 2).map((s) => s.key);
  const qaRef = await insertSurvey(db, {
    setId: qaSet.id,
    t: qa10,
    by: instructor.id,
    purpose: 'periodic',
    at: new Date('2026-11-03T17:00:00Z'),
    meter: instructorMeter,
    complete: true,
    readings: readingsFor(q, types, qaDrift, { seed: 7001, stages: qaStages }),
  });

  const l = larkspur.doc;
  const [lkSet] = await db
    .insert(sets)
    .values({
      ownerId: instructor.id,
      templateId: larkspur.templateId,
      label: 'Trainer T2 (Larkspur 7-P)',
      accessionNumber: 'TR-02',
      serial: 'L7P-20455',
      jobStatus: 'surveying',
      restorationLevel: 'repair',
      condition: 'Teaching chassis; cabinet removed.',
      complaint: 'Training set for in-circuit work: the oscillator grid leak reads low in circuit on purpose (a leaky capacitor across it).',
      intakeNotes: 'Unpowered surveys only.',
      createdAt: new Date('2026-10-01T18:10:00Z'),
      updatedAt: new Date('2026-10-01T18:10:00Z'),
    })
    .returning({ id: sets.id });
  const lkDrift = { [keyOf(l, 'R3')]: (22.4e3 * 15e3) / (22.4e3 + 15e3) };
  const lkStages = l.stages.slice(0, 2).map((s) => s.key);
  const lkRef = await insertSurvey(db, {
    setId: lkSet.id,
    t: larkspur,
    by: instructor.id,
    purpose: 'periodic',
    at: new Date('2026-11-24T17:00:00Z'),
    meter: instructorMeter,
    complete: true,
    readings: readingsFor(l, types, lkDrift, { seed: 7002, stages: lkStages }),
  });

  // ---- Assignment 1: reviewed ----
  const due1 = new Date('2026-11-20T17:00:00Z');
  const [a1] = await db
    .insert(assignments)
    .values({
      classId: klass.id,
      title: 'Intake survey of the QA-10 trainer',
      instructions: 'Discharge and verify the filter capacitors first. Survey the power supply and the preamplifier stage in circuit, tubes in, the 8 Ω load connected.',
      templateId: qa10.templateId,
      templateVersionId: qa10.versionId,
      versionNumber: qa10.versionNumber,
      setId: qaSet.id,
      referenceSurveyId: qaRef.id,
      dueAt: due1,
      rule: DEFAULT_RULE,
      predictFirst: false,
      showVerdicts: true,
      createdBy: instructor.id,
      createdAt: new Date('2026-11-05T18:00:00Z'),
      updatedAt: new Date('2026-11-05T18:00:00Z'),
    })
    .returning({ id: assignments.id });

  const r4tp = tpOf(q, 'R4');
  const r2tp = tpOf(q, 'R2');
  /** A student's readings of the trainer: the reference's computation with their own scatter, and a few of their own errors. */
  const studentQa = (seed: number, edits: Record<string, Partial<PlannedReading>> = {}): PlannedReading[] =>
    readingsFor(q, types, qaDrift, { seed, stages: qaStages }).map((r) => ({ ...r, ...(edits[r.testPointKey] ?? {}) }));

  // Esi: attempt 1 with the grid leak read with her fingers on the probes (1.32 MΩ ∥ about 1 MΩ of dry hands ≈ 569 kΩ), returned, re-measured, accepted.
  const esiMeter = studentMeters.get(esi.id)!;
  const esiPlan = studentQa(8101, { [r4tp]: { text: '569K' } });
  const esiSurvey = await insertSurvey(db, {
    setId: qaSet.id,
    t: qa10,
    by: esi.id,
    purpose: 'assignment',
    at: new Date('2026-11-17T18:30:00Z'),
    meter: esiMeter,
    complete: false,
    state: 'accepted',
    assignmentId: a1.id,
    readings: esiPlan,
  });
  const esiA1 = await freeze(db, esiSurvey.id, esiMeter, q);
  const [esiAttempt1] = await db
    .insert(attempts)
    .values({ surveyId: esiSurvey.id, assignmentId: a1.id, studentId: esi.id, number: 1, submittedAt: new Date('2026-11-18T20:00:00Z'), ...esiA1 })
    .returning({ id: attempts.id });
  await db.insert(readingComments).values([
    {
      attemptId: esiAttempt1.id,
      testPointKey: r4tp,
      readingId: esiSurvey.readingIds.get(r4tp) ?? null,
      authorId: instructor.id,
      text: 'Half the reference on a megohm part: were your fingers on both tips? Clip one lead and measure again.',
      createdAt: new Date('2026-11-19T09:10:00Z'),
    },
    {
      attemptId: esiAttempt1.id,
      testPointKey: r2tp,
      readingId: esiSurvey.readingIds.get(r2tp) ?? null,
      authorId: instructor.id,
      text: 'Good: you saw the dropper high and did not call it before checking the joints.',
      createdAt: new Date('2026-11-19T09:12:00Z'),
    },
  ]);
  await db.insert(reviews).values({
    attemptId: esiAttempt1.id,
    reviewerId: instructor.id,
    decision: 'returned',
    score: 70,
    suggestedScore: null,
    comment: 'Careful work apart from the grid leak. Re-measure R4 with one probe clipped.',
    remeasureKeys: [r4tp],
    createdAt: new Date('2026-11-19T09:15:00Z'),
  });
  // The re-measure follows her first reading of R4 and supersedes it.
  await db.insert(readings)
    .values({
      surveyId: esiSurvey.id,
      testPointKey: r4tp,
      clientKey: `seed-remeasure-${randomBytes(8).toString('hex')}`,
      followsReadingId: esiSurvey.readingIds.get(r4tp) ?? null,
      text: benchText(1.32e6 * 1.004),
      state: 'value',
      ohms: parseReadingText(benchText(1.32e6 * 1.004)).ohms,
      method: 'in-circuit',
      note: 'One probe clipped, hands off.',
      enteredBy: esi.id,
      takenAt: new Date('2026-11-21T18:40:00Z'),
      createdAt: new Date('2026-11-21T18:40:00Z'),
      updatedAt: new Date('2026-11-21T18:40:00Z'),
    });
  const esiA2 = await freeze(db, esiSurvey.id, esiMeter, q);
  const [esiAttempt2] = await db
    .insert(attempts)
    .values({ surveyId: esiSurvey.id, assignmentId: a1.id, studentId: esi.id, number: 2, submittedAt: new Date('2026-11-21T19:00:00Z'), ...esiA2 })
    .returning({ id: attempts.id });
  await db.insert(reviews).values({
    attemptId: esiAttempt2.id,
    reviewerId: instructor.id,
    decision: 'accepted',
    score: 92,
    suggestedScore: null,
    comment: 'The re-measure agrees with the reference. Submitted a day late: keep to the date next time.',
    createdAt: new Date('2026-11-22T10:00:00Z'),
  });

  // Farid: accepted first time.
  const faridMeter = studentMeters.get(farid.id)!;
  const faridSurvey = await insertSurvey(db, {
    setId: qaSet.id,
    t: qa10,
    by: farid.id,
    purpose: 'assignment',
    at: new Date('2026-11-18T18:00:00Z'),
    meter: faridMeter,
    complete: false,
    state: 'accepted',
    assignmentId: a1.id,
    readings: studentQa(8102),
  });
  const [faridAttempt] = await db
    .insert(attempts)
    .values({ surveyId: faridSurvey.id, assignmentId: a1.id, studentId: farid.id, number: 1, submittedAt: new Date('2026-11-19T21:00:00Z'), ...(await freeze(db, faridSurvey.id, faridMeter, q)) })
    .returning({ id: attempts.id });
  await db.insert(reviews).values({ attemptId: faridAttempt.id, reviewerId: instructor.id, decision: 'accepted', score: 95, suggestedScore: null, comment: 'Agrees with the reference throughout.', createdAt: new Date('2026-11-20T09:00:00Z') });

  // Grete: accepted with a low score (the grid leak read far low; an over-range left on a low range).
  const greteMeter = studentMeters.get(grete.id)!;
  const greteSurvey = await insertSurvey(db, {
    setId: qaSet.id,
    t: qa10,
    by: grete.id,
    purpose: 'assignment',
    at: new Date('2026-11-19T18:00:00Z'),
    meter: greteMeter,
    complete: false,
    state: 'accepted',
    assignmentId: a1.id,
    readings: studentQa(8103, { [r4tp]: { text: '655K' }, [r2tp]: { text: 'OL', rangeIndex: 1, note: 'Over-range on the 2 k range.' } }),
  });
  const [greteAttempt] = await db
    .insert(attempts)
    .values({ surveyId: greteSurvey.id, assignmentId: a1.id, studentId: grete.id, number: 1, submittedAt: new Date('2026-11-20T16:30:00Z'), ...(await freeze(db, greteSurvey.id, greteMeter, q)) })
    .returning({ id: attempts.id });
  await db.insert(readingComments).values({
    attemptId: greteAttempt.id,
    testPointKey: r2tp,
    readingId: greteSurvey.readingIds.get(r2tp) ?? null,
    authorId: instructor.id,
    text: 'OL on the 2 k range is not "open": a 22 k dropper needs the 20 k range or higher.',
    createdAt: new Date('2026-11-21T09:00:00Z'),
  });
  await db.insert(reviews).values({ attemptId: greteAttempt.id, reviewerId: instructor.id, decision: 'accepted', score: 64, suggestedScore: null, comment: 'Accepted; see the comments on R2 and R4 before the next assignment.', createdAt: new Date('2026-11-21T09:05:00Z') });

  // ---- Assignment 2: predict first, awaiting review ----
  const now = Date.now();
  const due2 = new Date(now + 6 * DAY);
  const [a2] = await db
    .insert(assignments)
    .values({
      classId: klass.id,
      title: 'Predict, then measure: Larkspur 7-P front end',
      instructions: 'Before each reading, predict what the meter will show in circuit (work out the parallel paths from the schematic). Then measure. Verdicts show after you submit.',
      templateId: larkspur.templateId,
      templateVersionId: larkspur.versionId,
      versionNumber: larkspur.versionNumber,
      setId: lkSet.id,
      referenceSurveyId: lkRef.id,
      dueAt: due2,
      rule: DEFAULT_RULE,
      predictFirst: true,
      showVerdicts: false,
      createdBy: instructor.id,
      createdAt: new Date(now - 8 * DAY),
      updatedAt: new Date(now - 8 * DAY),
    })
    .returning({ id: assignments.id });
  /** Readings with a prediction each: the nominal-network value off by the student's own habit (`bias`, a fraction). */
  const nominal = readingsFor(l, types, {}, { seed: 1, scatterPct: 0, stages: lkStages });
  const withPredictions = (seed: number, bias: number, upTo = Infinity): PlannedReading[] =>
    readingsFor(l, types, lkDrift, { seed, stages: lkStages })
      .slice(0, upTo)
      .map((r, i) => {
        const n = nominal.find((x) => x.testPointKey === r.testPointKey);
        const prediction = n ? shiftText(n.text, 1 + bias * (i % 3 === 0 ? 1 : -0.5)) : undefined;
        return { ...r, ...(prediction ? { prediction } : {}) };
      });

  const submitted = async (student: { id: number; name: string }, seed: number, bias: number, daysAgo: number) => {
    const meter = studentMeters.get(student.id)!;
    const at = new Date(now - (daysAgo + 1) * DAY);
    const s = await insertSurvey(db, { setId: lkSet.id, t: larkspur, by: student.id, purpose: 'assignment', at, meter, complete: false, state: 'submitted', assignmentId: a2.id, readings: withPredictions(seed, bias) });
    await db.insert(attempts).values({ surveyId: s.id, assignmentId: a2.id, studentId: student.id, number: 1, submittedAt: new Date(now - daysAgo * DAY), ...(await freeze(db, s.id, meter, l)) });
    return s;
  };
  await submitted(farid, 8202, 0.08, 1);
  await submitted(grete, 8203, 0.3, 2);
  // Esi: draft, predictions and readings of the first eight test points so far.
  await insertSurvey(db, {
    setId: lkSet.id,
    t: larkspur,
    by: esi.id,
    purpose: 'assignment',
    at: new Date(now - DAY),
    meter: studentMeters.get(esi.id)!,
    complete: false,
    state: 'draft',
    assignmentId: a2.id,
    readings: withPredictions(8201, 0.15, 8),
  });

  // ---- Competency sign-offs ----
  const sign = (studentId: number, key: CompetencyKey, at: string, note = '') => ({ studentId, competencyKey: key, classId: klass.id, signedBy: instructor.id, note, createdAt: new Date(at) });
  await db.insert(competencySignoffs).values([
    sign(esi.id, 'discharges-and-verifies', '2026-10-15T19:30:00Z', 'Bleeds the reservoir through a resistor and verifies on the meter, every time.'),
    sign(esi.id, 'meter-check', '2026-10-15T19:35:00Z'),
    sign(esi.id, 'measures-in-circuit', '2026-11-22T10:05:00Z', 'After the re-measure of assignment 1.'),
    sign(farid.id, 'discharges-and-verifies', '2026-10-15T19:40:00Z'),
    sign(farid.id, 'meter-check', '2026-10-15T19:45:00Z'),
    sign(grete.id, 'discharges-and-verifies', '2026-10-22T19:30:00Z'),
  ]);

  // ---- In-app notifications of the same events ----
  await db.insert(notifications).values([
    { userId: instructor.id, kind: 'submission', title: `${farid.name} submitted “Predict, then measure: Larkspur 7-P front end”`, body: 'Attempt 1 is waiting for your review.', link: `/assignments/${a2.id}`, createdAt: new Date(now - DAY) },
    { userId: instructor.id, kind: 'submission', title: `${grete.name} submitted “Predict, then measure: Larkspur 7-P front end”`, body: 'Attempt 1 is waiting for your review.', link: `/assignments/${a2.id}`, createdAt: new Date(now - 2 * DAY) },
    { userId: esi.id, kind: 'review-done', title: 'Your survey “Intake survey of the QA-10 trainer” was accepted', body: 'Score 92. Read the review for the comments.', link: `/assignments/${a1.id}`, createdAt: new Date('2026-11-22T10:00:00Z'), readAt: new Date('2026-11-22T12:00:00Z') },
    { userId: esi.id, kind: 'review-done', title: 'Your survey “Intake survey of the QA-10 trainer” was returned', body: 'Re-measure R4; see the comments.', link: `/assignments/${a1.id}`, createdAt: new Date('2026-11-19T09:15:00Z'), readAt: new Date('2026-11-19T18:00:00Z') },
  ]);
  void hollis.id; // Hollis has started nothing: the queue shows "not started", the reminder job finds them.
  return 1;
}

/** A bench text scaled by `factor` (`47K` × 1.1 → `51K7`), three figures; states stay as they are. */
function shiftText(text: string, factor: number): string {
  const p = parseReadingText(text);
  return p.state === 'value' && p.ohms !== null ? benchText(p.ohms * factor) : text;
}
