/**
 * Readings (issue #5 item 3): idempotent POST by client key, versioned PATCH with a 409 that shows
 * both values, text the measurement core cannot parse refused with the core's message and nothing
 * stored, follow-ups, and object-level access (someone else's survey is a 404).
 */
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { parseResistance } from '../../api/domain/notation';
import { apiEnv, bearer, makeUser, signIn, userSession, type Session } from '../support/api-env';
import { addReading, clientKey, makeSet, makeSurvey } from '../support/bench-fixtures';

async function count(surveyId: number): Promise<number> {
  const env = await apiEnv();
  const r = await env.database.db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM readings WHERE survey_id = ${surveyId}`);
  return r.rows[0].n;
}

describe('Readings', () => {
  let tech: Session;
  beforeAll(async () => {
    tech = await userSession(['technician']);
  });

  it('stores a new reading (201) with its verdict, and a replay with the same client key answers the stored reading (200), never a duplicate', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.user.id });
    const key = clientKey();
    const first = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: key, text: '250k' });
    expect(first.status).withContext(JSON.stringify(first.body)).toBe(201);
    expect(first.body.replayed).toBeFalse();
    expect(first.body.reading.ohms).toBe(250000);
    expect(first.body.reading.state).toBe('value');
    expect(first.body.reading.version).toBe(1);
    expect(first.body.reading.enteredBy.id).toBe(tech.user.id);
    expect(first.body.evaluation.readingId).toBe(first.body.reading.id);
    // R2 is 250 kΩ ±10 % (the sample chassis): its nominal read in circuit, alone between V1.7 and B+1.
    expect(first.body.evaluation.verdict).toBe('in-band');

    const replay = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: key, text: '250k' });
    expect(replay.status).toBe(200);
    expect(replay.body.replayed).toBeTrue();
    expect(replay.body.reading.id).toBe(first.body.reading.id);
    // Even a replay whose body differs is the same write: the stored reading is the answer.
    const differing = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: key, text: '300k' });
    expect(differing.status).toBe(200);
    expect(differing.body.reading.ohms).toBe(250000);
    expect(await count(s.id)).toBe(1);

    const another = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '251k' });
    expect(another.status).toBe(201);
    expect(await count(s.id)).toBe(2);
  });

  it('converges when the same reading is sent twice at once: one row, one 201 and one 200', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.user.id });
    const body = { testPointKey: 'tp-r1', clientKey: clientKey(), text: '10M' };
    const [a, b] = await Promise.all([
      request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send(body),
      request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send(body),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 201]);
    expect(a.body.reading.id).toBe(b.body.reading.id);
    expect(await count(s.id)).toBe(1);
  });

  it('refuses text the measurement core cannot parse with the core\'s own message, and stores nothing; parsable text beside it is stored', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.user.id });
    // DESIGN.md §3.1: "1,500" is ambiguous (a thousands separator or a decimal comma).
    const core = parseResistance('1,500');
    expect(core.ok).toBeFalse();
    const r = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '1,500' });
    expect(r.status).toBe(400);
    expect(r.body.error.details.field).toBe('text');
    expect(r.body.error.message).toBe((core as { message: string }).message);
    expect(await count(s.id)).toBe(0);
    const ok = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '1.5k' });
    expect(ok.status).toBe(201);
    expect(ok.body.reading.ohms).toBe(1500);
  });

  it('takes a state key without text (open), and refuses text and state together', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.user.id });
    const both = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '250k', state: 'open' });
    expect(both.status).toBe(400);
    const neither = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: clientKey() });
    expect(neither.status).toBe(400);
    const open = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), state: 'open' });
    expect(open.status).toBe(201);
    expect(open.body.reading.state).toBe('open');
    expect(open.body.reading.text).toBe('');
    expect(open.body.evaluation.verdict).not.toBe('in-band');
    expect(await count(s.id)).toBe(1);
  });

  it('refuses a test point the template version does not have (400 on testPointKey) and a pair-free key beside it succeeds', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.user.id });
    const bad = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-nowhere', clientKey: clientKey(), text: '250k' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.field).toBe('testPointKey');
    const good = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-v1p', clientKey: clientKey(), text: '250k' });
    expect(good.status).toBe(201);
    expect(await count(s.id)).toBe(1);
  });

  it('links a follow-up to the reading it follows (same test point only); the follow-up supersedes it in the counts', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.user.id });
    const other = await addReading(s.id, { testPointKey: 'tp-r1', text: '10M' });
    const first = await addReading(s.id, { testPointKey: 'tp-r2', text: '120k' });
    const wrong = await request(env.app)
      .post(`/api/surveys/${s.id}/readings`)
      .set(bearer(tech))
      .send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '250k', method: 'lead-lifted', liftedEnd: 1, followsReadingId: other });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.details.field).toBe('followsReadingId');
    const noEnd = await request(env.app)
      .post(`/api/surveys/${s.id}/readings`)
      .set(bearer(tech))
      .send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '250k', method: 'lead-lifted', followsReadingId: first });
    expect(noEnd.status).toBe(400);
    expect(noEnd.body.error.details.field).toBe('liftedEnd');
    expect(await count(s.id)).toBe(2);
    const follow = await request(env.app)
      .post(`/api/surveys/${s.id}/readings`)
      .set(bearer(tech))
      .send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '250k', method: 'lead-lifted', liftedEnd: 1, followsReadingId: first });
    expect(follow.status).toBe(201);
    expect(follow.body.reading.followsReadingId).toBe(first);
    expect(follow.body.reading.method).toBe('lead-lifted');
    expect(follow.body.reading.liftedEnd).toBe(1);
    expect(follow.body.evaluation.verdict).toBe('in-band');

    const view = await request(env.app).get(`/api/surveys/${s.id}`).set(bearer(tech));
    expect(view.status).toBe(200);
    expect(view.body.readings.length).toBe(3);
    // Current readings: R1 10 MΩ and the follow-up on R2, both in band; the 120 kΩ in-circuit reading is superseded.
    expect(view.body.survey.counts.inBand).toBe(2);
    expect(view.body.evaluations[follow.body.reading.id].verdict).toBe('in-band');
  });

  it('edits a reading with its version; a stale version is a 409 with both values and changes nothing', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.user.id });
    const id = await addReading(s.id, { testPointKey: 'tp-r2', text: '250k' });
    const edited = await request(env.app).patch(`/api/surveys/${s.id}/readings/${id}`).set(bearer(tech)).send({ version: 1, text: '330k' });
    expect(edited.status).withContext(JSON.stringify(edited.body)).toBe(200);
    expect(edited.body.reading.version).toBe(2);
    expect(edited.body.reading.ohms).toBe(330000);
    expect(['high', 'inconclusive']).toContain(edited.body.evaluation.verdict);

    const stale = await request(env.app).patch(`/api/surveys/${s.id}/readings/${id}`).set(bearer(tech)).send({ version: 1, text: '240k' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('stale-version');
    expect(stale.body.error.details.current.ohms).toBe(330000);
    expect(stale.body.error.details.current.version).toBe(2);
    expect(stale.body.error.details.yours).toEqual({ version: 1, text: '240k' });
    const after = await request(env.app).get(`/api/surveys/${s.id}`).set(bearer(tech));
    expect(after.body.readings[0].ohms).toBe(330000);

    const unparsable = await request(env.app).patch(`/api/surveys/${s.id}/readings/${id}`).set(bearer(tech)).send({ version: 2, text: '1,500' });
    expect(unparsable.status).toBe(400);
    expect(unparsable.body.error.details.field).toBe('text');
  });

  it('is a 404 on someone else\'s survey (nothing stored), and works for a user the set is shared with', async () => {
    const env = await apiEnv();
    const friend = await makeUser(['technician']);
    const set = await makeSet({ ownerId: tech.user.id, sharedWith: [friend.id] });
    const s = await makeSurvey({ setId: set.id });
    const stranger = await userSession(['technician']);
    const refused = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(stranger)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '250k' });
    expect(refused.status).toBe(404);
    const refusedBadKey = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(stranger)).send({ testPointKey: 'tp-nowhere', clientKey: clientKey(), text: '250k' });
    expect(refusedBadKey.status).toBe(404);
    const id = await addReading(s.id, { text: '250k' });
    const edit = await request(env.app).patch(`/api/surveys/${s.id}/readings/${id}`).set(bearer(stranger)).send({ version: 1, text: '1k' });
    expect(edit.status).toBe(404);
    expect(await count(s.id)).toBe(1);
    const shared = await signIn(friend.email);
    const ok = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(shared)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '250k' });
    expect(ok.status).toBe(201);
    expect(await count(s.id)).toBe(2);
  });

  it('refuses new readings and edits on a complete survey (409: add an amendment); a replay of a stored key still answers 200', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.user.id });
    const key = clientKey();
    const saved = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: key, text: '250k' });
    expect(saved.status).toBe(201);
    const done = await request(env.app).post(`/api/surveys/${s.id}/complete`).set(bearer(tech));
    expect(done.status).toBe(200);
    const late = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '250k' });
    expect(late.status).toBe(409);
    expect(late.body.error.message).toContain('amendment');
    const edit = await request(env.app).patch(`/api/surveys/${s.id}/readings/${saved.body.reading.id}`).set(bearer(tech)).send({ version: 1, text: '1k' });
    expect(edit.status).toBe(409);
    const replay = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: key, text: '250k' });
    expect(replay.status).toBe(200);
    expect(replay.body.reading.id).toBe(saved.body.reading.id);
    expect(await count(s.id)).toBe(1);
  });

  it('checks the account inside the save itself: a deactivated account or a stale token is a 401 and stores nothing, on a warm survey too', async () => {
    const env = await apiEnv();
    const owner = await userSession(['technician']);
    const s = await makeSurvey({ ownerId: owner.user.id });
    // The twin: the owner's save succeeds (and warms this process's grid, so the next saves take the one-statement path).
    const ok = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(owner)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '250k' });
    expect(ok.status).toBe(201);
    // A token issued before a password change (token version bumped) is refused.
    await env.database.db.execute(sql`UPDATE users SET token_version = token_version + 1 WHERE id = ${owner.user.id}`);
    const stale = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(owner)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '251k' });
    expect(stale.status).toBe(401);
    expect(stale.body.error.code).toBe('unauthorized');
    // A deactivated account is refused with its own code.
    const other = await userSession(['technician']);
    const s2 = await makeSurvey({ ownerId: other.user.id });
    expect((await request(env.app).post(`/api/surveys/${s2.id}/readings`).set(bearer(other)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '250k' })).status).toBe(201);
    await env.database.db.execute(sql`UPDATE users SET active = false WHERE id = ${other.user.id}`);
    const off = await request(env.app).post(`/api/surveys/${s2.id}/readings`).set(bearer(other)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '252k' });
    expect(off.status).toBe(401);
    expect(off.body.error.code).toBe('account-deactivated');
    // A forged token (wrong signature) never reaches the statement.
    const forged = await request(env.app).post(`/api/surveys/${s2.id}/readings`).set('Authorization', `Bearer ${owner.accessToken.slice(0, -4)}AAAA`).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '252k' });
    expect(forged.status).toBe(401);
    expect(await count(s.id)).toBe(1);
    expect(await count(s2.id)).toBe(1);
  });
});
