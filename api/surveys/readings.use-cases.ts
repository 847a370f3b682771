/**
 * Readings (DESIGN.md §2 "reading", issue #5 item 3): POST is idempotent by the client's key —
 * a replay returns the stored reading (200), never a duplicate and never a conflict with itself;
 * edits carry a version and a stale one is a 409 with both values. Text the measurement core
 * cannot parse is refused 400 with the core's message, and nothing is stored.
 *
 * The save is one statement (one round trip): it checks the caller may see the set, that the
 * survey is a draft and that a followed reading belongs to the same test point, inserts with
 * `ON CONFLICT (survey_id, client_key) DO NOTHING`, and answers the stored row of a replay. With
 * fault seams (specs) the statement runs in a transaction and the seams run just before COMMIT and
 * right after it.
 */
import { randomBytes } from 'node:crypto';
import type pg from 'pg';
import { eq, sql } from 'drizzle-orm';
import { readings } from '../../schema/index';
import type { Ctx } from '../context';
import type { ReadingConflict, ReadingEdit, ReadingEvaluation, ReadingInput, ReadingRecord, ReadingSaved } from '../domain/set-format';
import { GridInputError, parseReadingText, type SurveyGrid } from '../domain/survey-grid';
import type { MeterProfile } from '../domain/meter';
import type { Method, ReadingState } from '../domain/words';
import type { Tx } from '../db';
import { AppError, badRequest, conflict, notFound, unauthorized } from '../http/errors';
import { findUserById } from '../auth/auth.repository';
import type { VerifiedClaims } from '../auth/guards';
import type { Actor } from '../sets/sets.repository';
import { cachedGrid, cachedRows, gridOf, gridReadingOf, meterOf } from './survey-view';
import * as repo from './surveys.repository';

export const NOT_DRAFT_MESSAGE = 'This survey is complete: add an amendment (who, when, why) to change it.';

/** The 409 of a change the survey's state does not take (a class survey says where it stands). */
export function notChangeable(survey: Pick<repo.SurveyRow, 'assignmentId' | 'state'>): AppError {
  if (survey.assignmentId === null) return conflict(NOT_DRAFT_MESSAGE, 'survey-not-draft');
  if (survey.state === 'submitted') return conflict('This survey is submitted: it waits for the instructor\u2019s review.', 'survey-not-draft');
  if (survey.state === 'accepted') return conflict('This survey was accepted: it is read-only.', 'survey-not-draft');
  if (survey.state === 'returned') return conflict('This survey was returned: only the test points to re-measure take new readings.', 'survey-not-draft');
  return conflict(`This survey is ${survey.state}.`, 'survey-not-draft');
}

/** A returned class survey: new readings only for the test points the review asked to re-measure. */
export function notRemeasured(testPointKey: string): AppError {
  return conflict(`Only the test points the instructor asked to re-measure take new readings: ${testPointKey} is not one of them.`, 'not-remeasured');
}

/** Whether a survey takes a new reading of this test point: a draft any; a returned class survey its re-measure points. */
export function takesReading(survey: Pick<repo.SurveyRow, 'state' | 'remeasureKeys'>, testPointKey: string): boolean {
  return survey.state === 'draft' || (survey.state === 'returned' && (survey.remeasureKeys ?? []).includes(testPointKey));
}

/** Refuses a new reading of this test point unless the survey takes it (409). */
export function checkTakesReading(survey: Pick<repo.SurveyRow, 'assignmentId' | 'state' | 'remeasureKeys'>, testPointKey: string): void {
  if (takesReading(survey, testPointKey)) return;
  if (survey.state === 'returned') throw notRemeasured(testPointKey);
  throw notChangeable(survey);
}

/** The message of a refused reading text: the measurement core's own words. */
function parseOrRefuse(text: string, meter: MeterProfile | null, rangeIndex: number | null | undefined): { state: ReadingState; ohms: number | null } {
  try {
    return parseReadingText(text, meter, rangeIndex);
  } catch (e) {
    if (e instanceof GridInputError) throw badRequest(e.message, 'text', 'unparsable-reading');
    throw e;
  }
}

/** What a row needs of a reading: the test point exists, is not a pair relation, method and lifted end fit. */
function checkAgainstRow(row: { kind: string } | undefined, input: { testPointKey: string; method?: Method; liftedEnd?: 0 | 1 | null }): void {
  if (row === undefined) throw badRequest(`"testPointKey": this survey's template version has no test point ${input.testPointKey}.`, 'testPointKey', 'validation');
  if (row.kind === 'pair-relation') throw badRequest(`"testPointKey": ${input.testPointKey} is a pair relation, judged on the ratio of its two positions' readings.`, 'testPointKey', 'validation');
  checkLiftedEnd(row.kind, input.method ?? 'in-circuit', input.liftedEnd ?? null);
}

function checkLiftedEnd(kind: string, method: Method, liftedEnd: number | null): void {
  if (method !== 'lead-lifted' && liftedEnd !== null) throw badRequest('"liftedEnd" goes only with method lead-lifted.', 'liftedEnd', 'validation');
  if (method === 'lead-lifted' && kind === 'component-check' && liftedEnd === null) throw badRequest('"liftedEnd": say which end of the component was lifted (0 or 1).', 'liftedEnd', 'validation');
}

function checkRange(meter: MeterProfile | null, rangeIndex: number | null | undefined): void {
  if (rangeIndex === null || rangeIndex === undefined) return;
  if (meter === null) throw badRequest('"rangeIndex": this survey has no meter profile, so no ranges.', 'rangeIndex', 'validation');
  if (rangeIndex >= meter.ranges.length) throw badRequest(`"rangeIndex": the survey's meter has ${meter.ranges.length} range(s), numbered from 0.`, 'rangeIndex', 'validation');
}

/** Either what was typed or a state key, never both. */
function textOrState(input: { text?: string; state?: Exclude<ReadingState, 'value'> }, meter: MeterProfile | null, rangeIndex: number | null | undefined): { text: string; state: ReadingState; ohms: number | null } {
  if (input.text !== undefined && input.state !== undefined) throw badRequest('Send what was typed ("text") or a state key ("state"), not both.', 'state', 'validation');
  if (input.text === undefined && input.state === undefined) throw badRequest('A reading needs what was typed ("text") or a state key ("state").', 'text', 'validation');
  if (input.state !== undefined) return { text: '', state: input.state, ohms: null };
  const p = parseOrRefuse(input.text!, meter, rangeIndex);
  return { text: input.text!.trim(), ...p };
}

type RawReading = {
  id: number;
  survey_id: number;
  test_point_key: string;
  client_key: string;
  follows_reading_id: number | null;
  text: string;
  state: ReadingState;
  ohms: number | null;
  method: Method;
  lifted_end: number | null;
  range_index: number | null;
  note: string;
  prediction: string | null;
  entered_by: number | null;
  entered_by_name: string | null;
  taken_at: string;
  version: number;
  updated_at: string;
};

const recordOfRaw = (r: RawReading): ReadingRecord =>
  repo.readingRecordOf({
    id: Number(r.id),
    surveyId: r.survey_id,
    testPointKey: r.test_point_key,
    clientKey: r.client_key,
    followsReadingId: r.follows_reading_id,
    text: r.text,
    state: r.state,
    ohms: r.ohms,
    method: r.method,
    liftedEnd: r.lifted_end,
    rangeIndex: r.range_index,
    note: r.note,
    prediction: r.prediction,
    enteredBy: r.entered_by,
    enteredByName: r.entered_by_name,
    takenAt: new Date(r.taken_at),
    version: r.version,
    updatedAt: new Date(r.updated_at),
  });

/** The caller's account as the save's own statement checks it (see `caller` in saveReading). */
const ACCOUNT_DEACTIVATED = 'This account has been deactivated.';
const TOKEN_STALE = 'Sign in to continue: the access token is missing, expired or no longer valid.';

/** The caller as the other use cases take it: the account read once (a cold cache, or a miss). */
async function actorOf(tx: Tx, caller: VerifiedClaims): Promise<Actor> {
  const u = await findUserById(tx, caller.userId);
  // Deactivation also bumps the token version: say "deactivated" first, as the other guards do.
  if (u && !u.active) throw unauthorized(ACCOUNT_DEACTIVATED, 'account-deactivated');
  if (!u || u.tokenVersion !== caller.tokenVersion) throw unauthorized(TOKEN_STALE);
  return { id: u.id, roles: u.roles };
}

/** The grid of a survey at the versions the save saw (cached), for the verdict of the answer. */
async function gridAt(tx: Tx, surveyId: number, surveyVersion: number, setVersion: number, caller: VerifiedClaims): Promise<SurveyGrid> {
  const hit = cachedGrid(surveyId, surveyVersion, setVersion);
  if (hit) return hit;
  const { survey, access } = await repo.visibleSurvey(tx, await actorOf(tx, caller), surveyId);
  return gridOf(tx, survey, access.set);
}

function evaluationOf(grid: SurveyGrid, r: ReadingRecord, jointChecked: boolean): ReadingEvaluation {
  return grid.evaluate(gridReadingOf(r), { jointChecked });
}

/**
 * The save, one statement: the account (active, at the token's version: $1, $2), the survey ($5)
 * writable by it — an ordinary survey through its set (owner, shared-with, admin), a class survey
 * (`assignment_id` set) by its student only — the survey a draft (or a returned class survey and
 * the test point one of its re-measure keys) and a followed reading ($4) of the same test point
 * ($3); the insert, idempotent by client key ($6); the stored row of a replay. A named prepared
 * statement: PostgreSQL plans it once per connection.
 */
const SAVE_SQL = `
    WITH u AS (
      SELECT id, name, 'admin' = ANY(roles) AS admin FROM users
      WHERE id = $1::int AND active AND token_version = $2::int
    ), acc AS (
      SELECT sv.id, sv.state::text AS state, sv.version AS survey_version, s.version AS set_version,
             (sv.joint_checks ? $3::text) AS joint_checked,
             sv.assignment_id, coalesce($3::text = ANY(sv.remeasure_keys), false) AS remeasure_ok,
             ($4::bigint IS NULL OR EXISTS (
               SELECT 1 FROM readings f WHERE f.id = $4::bigint AND f.survey_id = sv.id AND f.test_point_key = $3::text)) AS follows_ok
      FROM surveys sv JOIN sets s ON s.id = sv.set_id CROSS JOIN u
      WHERE sv.id = $5::int AND CASE WHEN sv.assignment_id IS NULL
        THEN (u.admin OR s.owner_id = u.id OR EXISTS (SELECT 1 FROM set_shares sh WHERE sh.set_id = s.id AND sh.user_id = u.id))
        ELSE sv.started_by = u.id END
    ), ins AS (
      INSERT INTO readings (survey_id, test_point_key, client_key, follows_reading_id, text, state, ohms, method, lifted_end, range_index, note, prediction, entered_by, taken_at)
      SELECT acc.id, $3::text, $6::text, $4::bigint, $7::text, $8::reading_state, $9::float8,
             $10::reading_method, $11::smallint, $12::smallint, $13::text, $14::text, $1::int, coalesce($15::timestamptz, now())
      FROM acc WHERE (acc.state = 'draft' OR (acc.state = 'returned' AND acc.remeasure_ok)) AND acc.follows_ok
      ON CONFLICT (survey_id, client_key) DO NOTHING
      RETURNING *
    )
    SELECT EXISTS (SELECT 1 FROM u) AS account_ok, acc.id AS survey_id, acc.state, acc.survey_version, acc.set_version, acc.joint_checked, acc.follows_ok, acc.remeasure_ok, acc.assignment_id,
      (SELECT row_to_json(x) FROM (SELECT i.*, (SELECT u.name FROM u) AS entered_by_name FROM ins i) x) AS inserted,
      (SELECT row_to_json(x) FROM (SELECT r.*, eu.name AS entered_by_name FROM readings r LEFT JOIN users eu ON eu.id = r.entered_by
                                   WHERE r.survey_id = acc.id AND r.client_key = $6::text) x) AS existing
    FROM (SELECT 1) one LEFT JOIN acc ON true`;

/**
 * POST /api/surveys/:id/readings. The route verifies the access token without a query (`auth:
 * 'folded'`): the statement below checks the account (active, at the token's version), the set's
 * visibility, the survey's state and the followed reading, and inserts — one round trip once this
 * process has the survey's grid.
 */
export async function saveReading(ctx: Ctx, caller: VerifiedClaims, surveyId: number, input: ReadingInput): Promise<{ status: 200 | 201; body: ReadingSaved }> {
  let known = cachedRows(surveyId);
  if (known === undefined || !known.rows.has(input.testPointKey)) {
    // First save of this survey in this process, or a key it does not know: the account, then access (404 before 400).
    const user = await actorOf(ctx.db, caller);
    const { survey, access } = await repo.visibleSurvey(ctx.db, user, surveyId);
    await gridOf(ctx.db, survey, access.set);
    known = cachedRows(surveyId)!;
  }
  const meter = known.meter;
  checkAgainstRow(known.rows.get(input.testPointKey), input);
  checkRange(meter, input.rangeIndex);
  const value = textOrState(input, meter, input.rangeIndex);

  const follows = input.followsReadingId ?? null;
  const params = [
    caller.userId,
    caller.tokenVersion,
    input.testPointKey,
    follows,
    surveyId,
    input.clientKey,
    value.text,
    value.state,
    value.ohms,
    input.method ?? 'in-circuit',
    input.liftedEnd ?? null,
    input.rangeIndex ?? null,
    input.note ?? '',
    input.prediction ?? null,
    input.takenAt ?? null,
  ];
  type Out = {
    account_ok: boolean;
    survey_id: number | null;
    state: string;
    survey_version: number;
    set_version: number;
    joint_checked: boolean;
    follows_ok: boolean;
    remeasure_ok: boolean;
    assignment_id: number | null;
    inserted: RawReading | null;
    existing: RawReading | null;
  };
  let out: Out | undefined;
  const pool = (ctx.db as unknown as { $client: pg.Pool }).$client;
  const query = { name: 'reading-save', text: SAVE_SQL, values: params };
  if (ctx.faults) {
    // The seams around the commit (specs): the statement in a transaction of its own.
    const faults = ctx.faults;
    const client = await pool.connect();
    try {
      await client.query('BEGIN');
      try {
        out = (await client.query<Out>(query)).rows[0];
        await faults.around('reading-save', 'before-commit');
        await client.query('COMMIT');
      } catch (e) {
        await client.query('ROLLBACK').catch(() => undefined);
        throw e;
      }
    } finally {
      client.release();
    }
    await faults.around('reading-save', 'after-commit');
  } else out = (await pool.query<Out>(query)).rows[0];

  if (out === undefined || !out.account_ok) {
    await actorOf(ctx.db, caller); // says why: deactivated, or a stale token
    throw unauthorized(TOKEN_STALE);
  }
  if (out.survey_id === null) {
    // Not writable by the caller: those who may read it (a class survey's instructor) are told so (403), anyone else 404.
    await repo.writableSurvey(ctx.db, await actorOf(ctx.db, caller), surveyId);
    throw notFound('No such survey.');
  }
  let reading: ReadingRecord;
  let status: 200 | 201;
  if (out.existing) {
    reading = recordOfRaw(out.existing);
    status = 200;
  } else if (out.state === 'returned' && !out.remeasure_ok) throw notRemeasured(input.testPointKey);
  else if (out.state !== 'draft' && out.state !== 'returned') throw notChangeable({ assignmentId: out.assignment_id, state: out.state as repo.SurveyRow['state'] });
  else if (!out.follows_ok) throw badRequest(`"followsReadingId": reading ${follows} is not a reading of ${input.testPointKey} in this survey.`, 'followsReadingId', 'validation');
  else if (out.inserted) {
    reading = recordOfRaw(out.inserted);
    status = 201;
  } else {
    // The same key stored concurrently by another request: this one is its replay.
    const stored = await repo.findReadingByClientKey(ctx.db, surveyId, input.clientKey);
    if (!stored) throw new AppError(503, 'retry', 'The reading could not be saved just now; send it again (same client key).', undefined, { 'Retry-After': '1' });
    reading = stored;
    status = 200;
  }
  const grid = await gridAt(ctx.db, surveyId, out.survey_version, out.set_version, caller);
  return { status, body: { reading, evaluation: evaluationOf(grid, reading, out.joint_checked), replayed: status === 200 } };
}

/** PATCH /api/surveys/:id/readings/:readingId — a draft's reading; a stale version is a 409 with both values. */
export async function editReading(ctx: Ctx, user: Actor, surveyId: number, readingId: number, edit: ReadingEdit): Promise<ReadingSaved> {
  return ctx.db.transaction(async (tx) => {
    const { survey, access } = await repo.writableSurvey(tx, user, surveyId, true);
    const current = await repo.findReading(tx, surveyId, readingId, true);
    if (!current) throw notFound('No such reading in this survey.');
    const grid = await gridOf(tx, survey, access.set);
    const meter = meterOf(survey);
    // Shape problems of the edit itself first (400), then the state of things (409).
    const row = grid.row(current.testPointKey)!;
    const method = edit.method ?? current.method;
    const rangeIndex = edit.rangeIndex !== undefined ? edit.rangeIndex : current.rangeIndex;
    checkRange(meter, rangeIndex);
    let value: { text: string; state: ReadingState; ohms: number | null } | null = null;
    if (edit.text !== undefined || edit.state !== undefined) value = textOrState(edit, meter, rangeIndex);
    const liftedEnd = edit.liftedEnd !== undefined ? edit.liftedEnd : method === 'lead-lifted' ? current.liftedEnd : null;
    checkLiftedEnd(row.kind, method, liftedEnd);
    checkTakesReading(survey, current.testPointKey);
    // A returned class survey: the readings its attempts froze stay as submitted (re-measure with a new reading).
    if (survey.state === 'returned' && (await repo.frozenInAttempt(tx, surveyId, readingId)))
      throw conflict('This reading was submitted: re-measure with a new reading (it supersedes this one).', 'reading-submitted');
    if (current.version !== edit.version) {
      const details: ReadingConflict = { current, yours: edit };
      throw conflict(`This reading was changed since you keyed it (version ${current.version}, yours ${edit.version}): both values are shown.`, 'stale-version', details as unknown as Record<string, unknown>);
    }
    await applyEdit(tx, readingId, current, { value, method, liftedEnd, rangeIndex, note: edit.note });
    const saved = (await repo.findReading(tx, surveyId, readingId))!;
    return { reading: saved, evaluation: evaluationOf(grid, saved, current.testPointKey in (survey.jointChecks as Record<string, unknown>)), replayed: false };
  });
}

export async function applyEdit(
  tx: Tx,
  readingId: number,
  current: ReadingRecord,
  c: { value: { text: string; state: ReadingState; ohms: number | null } | null; method: Method; liftedEnd: 0 | 1 | null; rangeIndex: number | null; note?: string },
): Promise<void> {
  await tx
    .update(readings)
    .set({
      ...(c.value ? { text: c.value.text, state: c.value.state, ohms: c.value.ohms } : {}),
      method: c.method,
      liftedEnd: c.liftedEnd,
      rangeIndex: c.rangeIndex,
      ...(c.note !== undefined ? { note: c.note } : {}),
      version: current.version + 1,
      updatedAt: sql`now()`,
    })
    .where(eq(readings.id, readingId));
}

export interface AmendmentChange {
  testPointKey?: string;
  followsReadingId?: number | null;
  text?: string;
  state?: Exclude<ReadingState, 'value'>;
  method?: Method;
  liftedEnd?: 0 | 1 | null;
  rangeIndex?: number | null;
  note?: string;
}

const snapshot = (r: ReadingRecord) => ({ testPointKey: r.testPointKey, text: r.text, state: r.state, ohms: r.ohms, method: r.method, liftedEnd: r.liftedEnd, rangeIndex: r.rangeIndex, note: r.note });

/**
 * POST /api/surveys/:id/amendments — a change to a complete (or accepted) survey, appended with who,
 * when and why, and applied: an edit of a reading (`readingId`) or a new reading.
 */
export async function amend(ctx: Ctx, user: Actor, surveyId: number, body: { readingId?: number; reason: string; change: AmendmentChange }) {
  return ctx.db.transaction(async (tx) => {
    const { survey, access } = await repo.writableSurvey(tx, user, surveyId, true);
    if (survey.assignmentId !== null) throw conflict('A class survey is not amended: the instructor returns it for re-measuring.', 'class-survey');
    const grid = await gridOf(tx, survey, access.set);
    const meter = meterOf(survey);
    const c = body.change;
    let before: unknown = null;
    let reading: ReadingRecord;
    const editable = survey.state === 'complete' || survey.state === 'accepted';
    if (body.readingId !== undefined) {
      if (c.testPointKey !== undefined || c.followsReadingId !== undefined) throw badRequest('"change.testPointKey": an amendment of a reading changes its value, method, range or note, not its test point.', 'change.testPointKey', 'validation');
      const current = await repo.findReading(tx, surveyId, body.readingId, true);
      if (!current) throw notFound('No such reading in this survey.');
      const method = c.method ?? current.method;
      const rangeIndex = c.rangeIndex !== undefined ? c.rangeIndex : current.rangeIndex;
      checkRange(meter, rangeIndex);
      const value = c.text !== undefined || c.state !== undefined ? textOrState(c, meter, rangeIndex) : null;
      const liftedEnd = c.liftedEnd !== undefined ? c.liftedEnd : method === 'lead-lifted' ? current.liftedEnd : null;
      checkLiftedEnd(grid.row(current.testPointKey)!.kind, method, liftedEnd);
      if (!editable) throw conflict('This survey is still a draft: change the reading itself; amendments are for complete surveys.', 'survey-is-draft');
      before = snapshot(current);
      await applyEdit(tx, current.id, current, { value, method, liftedEnd, rangeIndex, note: c.note });
      reading = (await repo.findReading(tx, surveyId, current.id))!;
    } else {
      if (c.testPointKey === undefined) throw badRequest('"change.testPointKey": a new reading names its test point (or give "readingId" to amend a reading).', 'change.testPointKey', 'validation');
      checkAgainstRow(grid.row(c.testPointKey), { testPointKey: c.testPointKey, method: c.method, liftedEnd: c.liftedEnd });
      checkRange(meter, c.rangeIndex);
      const value = textOrState(c, meter, c.rangeIndex);
      if (c.followsReadingId != null) {
        const f = await repo.findReading(tx, surveyId, c.followsReadingId);
        if (!f || f.testPointKey !== c.testPointKey) throw badRequest(`"change.followsReadingId": reading ${c.followsReadingId} is not a reading of ${c.testPointKey} in this survey.`, 'change.followsReadingId', 'validation');
      }
      if (!editable) throw conflict('This survey is still a draft: add the reading itself; amendments are for complete surveys.', 'survey-is-draft');
      const [row] = await tx
        .insert(readings)
        .values({
          surveyId,
          testPointKey: c.testPointKey,
          clientKey: `amend-${randomBytes(12).toString('hex')}`,
          followsReadingId: c.followsReadingId ?? null,
          text: value.text,
          state: value.state,
          ohms: value.ohms,
          method: c.method ?? 'in-circuit',
          liftedEnd: c.liftedEnd ?? null,
          rangeIndex: c.rangeIndex ?? null,
          note: c.note ?? '',
          enteredBy: user.id,
        })
        .returning({ id: readings.id });
      reading = (await repo.findReading(tx, surveyId, row.id))!;
    }
    const [a] = await tx.execute<{ id: number }>(sql`
      INSERT INTO survey_amendments (survey_id, reading_id, reason, change, amended_by)
      VALUES (${surveyId}, ${reading.id}, ${body.reason.trim()}, ${JSON.stringify({ before, after: snapshot(reading) })}::jsonb, ${user.id})
      RETURNING id`).then((r) => r.rows);
    const amendment = (await repo.amendmentsOf(tx, surveyId)).find((x) => x.id === a.id)!;
    return { amendment, reading, evaluation: evaluationOf(grid, reading, reading.testPointKey in (survey.jointChecks as Record<string, unknown>)) };
  });
}
