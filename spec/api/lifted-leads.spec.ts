/**
 * The lifted-lead list (DESIGN.md §2 "lifted-lead list", §3.5; issue #5 item 5): a low in-circuit
 * reading the network does not explain offers "lift a lead"; the lift is recorded (component, end,
 * node, who, when), the follow-up reading links to the one it follows, and the entry stays open
 * until re-soldered (optionally with a re-check reading). Refusals beside their twins.
 */
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';
import { addReading, clientKey, makeLiftedLead, makeSet, makeSurvey } from '../support/bench-fixtures';

async function leadCount(setId: number): Promise<number> {
  const env = await apiEnv();
  return (await env.database.db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM lifted_leads WHERE set_id = ${setId}`)).rows[0].n;
}

describe('Lifted leads', () => {
  let tech: Session;
  beforeAll(async () => {
    tech = await userSession(['technician']);
  });

  it('lifts a lead after an unexplained low reading, links the follow-up, and re-solders it with a re-check', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.user.id });
    // 120 kΩ across R2 (250 kΩ ±10 %) in circuit, where the network holds R2 alone: lower than any
    // healthy network can read, so the grid asks for a lifted lead.
    const low = await request(env.app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '120k' });
    expect(low.status).toBe(201);
    expect(low.body.evaluation.advice).toContain('lift-a-lead');
    const promptedBy = low.body.reading.id;

    const lift = await request(env.app).post(`/api/surveys/${s.id}/lifted-leads`).set(bearer(tech)).send({ componentKey: 'c-r2', end: 1, promptedByReadingId: promptedBy, note: 'B+1 end, tag strip' });
    expect(lift.status).withContext(JSON.stringify(lift.body)).toBe(201);
    // R2's nodes are ['V1.7', 'B+1'] in the sample template: end 1 is B+1.
    expect(lift.body).toEqual(
      jasmine.objectContaining({ setId: s.setId, surveyId: s.id, componentKey: 'c-r2', componentRef: 'R2', end: 1, node: 'B+1', promptedByReadingId: promptedBy, resolderedAt: null, note: 'B+1 end, tag strip' }),
    );
    expect(lift.body.liftedBy.id).toBe(tech.user.id);

    const follow = await request(env.app)
      .post(`/api/surveys/${s.id}/readings`)
      .set(bearer(tech))
      .send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '118k', method: 'lead-lifted', liftedEnd: 1, followsReadingId: promptedBy });
    expect(follow.status).toBe(201);
    expect(follow.body.evaluation.verdict).toBe('low');

    const list = await request(env.app).get(`/api/sets/${s.setId}/lifted-leads`).set(bearer(tech));
    expect(list.status).toBe(200);
    expect(list.body.items.map((l: { id: number }) => l.id)).toEqual([lift.body.id]);
    const summary = await request(env.app).get(`/api/sets/${s.setId}`).set(bearer(tech));
    expect(summary.body.openLiftedLeads).toBe(1);

    const done = await request(env.app).post(`/api/sets/${s.setId}/lifted-leads/${lift.body.id}/resolder`).set(bearer(tech)).send({ recheckReadingId: follow.body.reading.id, note: 'Joint remade' });
    expect(done.status).toBe(200);
    expect(done.body.resolderedAt).not.toBeNull();
    expect(done.body.resolderedBy.id).toBe(tech.user.id);
    expect(done.body.recheckReadingId).toBe(follow.body.reading.id);
    expect(done.body.note).toContain('Joint remade');
    expect((await request(env.app).get(`/api/sets/${s.setId}`).set(bearer(tech))).body.openLiftedLeads).toBe(0);

    const again = await request(env.app).post(`/api/sets/${s.setId}/lifted-leads/${lift.body.id}/resolder`).set(bearer(tech)).send({ note: 'Again' });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('already-resoldered');
  });

  it('refuses a second lift of the same lead while it is open (409), an unknown component (400), and a complete survey (409)', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.user.id });
    const first = await request(env.app).post(`/api/surveys/${s.id}/lifted-leads`).set(bearer(tech)).send({ componentKey: 'c-r1', end: 0 });
    expect(first.status).toBe(201);
    expect(first.body.node).toBe('V1.1');
    const twice = await request(env.app).post(`/api/surveys/${s.id}/lifted-leads`).set(bearer(tech)).send({ componentKey: 'c-r1', end: 0 });
    expect(twice.status).toBe(409);
    expect(twice.body.error.code).toBe('already-lifted');
    const otherEnd = await request(env.app).post(`/api/surveys/${s.id}/lifted-leads`).set(bearer(tech)).send({ componentKey: 'c-r1', end: 1 });
    expect(otherEnd.status).toBe(201);
    expect(otherEnd.body.node).toBe('chassis');
    const unknown = await request(env.app).post(`/api/surveys/${s.id}/lifted-leads`).set(bearer(tech)).send({ componentKey: 'c-r9', end: 0 });
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.details.field).toBe('componentKey');
    const otherSurvey = await makeSurvey({ ownerId: tech.user.id });
    const foreign = await addReading(otherSurvey.id, { text: '250k' });
    const badPrompt = await request(env.app).post(`/api/surveys/${s.id}/lifted-leads`).set(bearer(tech)).send({ componentKey: 'c-r2', end: 0, promptedByReadingId: foreign });
    expect(badPrompt.status).toBe(400);
    expect(badPrompt.body.error.details.field).toBe('promptedByReadingId');
    expect(await leadCount(s.setId)).toBe(2);

    const complete = await makeSurvey({ ownerId: tech.user.id, state: 'complete' });
    const late = await request(env.app).post(`/api/surveys/${complete.id}/lifted-leads`).set(bearer(tech)).send({ componentKey: 'c-r2', end: 0 });
    expect(late.status).toBe(409);
    expect(await leadCount(complete.setId)).toBe(0);
  });

  it("refuses a re-check reading from another set (400) and is a 404 on a stranger's set or another set's lead", async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.user.id });
    const lead = await makeLiftedLead(set.id, { liftedBy: tech.user.id });
    const elsewhere = await makeSurvey({ ownerId: tech.user.id });
    const foreign = await addReading(elsewhere.id, { text: '250k' });
    const bad = await request(env.app).post(`/api/sets/${set.id}/lifted-leads/${lead}/resolder`).set(bearer(tech)).send({ recheckReadingId: foreign, note: 'Done' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.field).toBe('recheckReadingId');
    const wrongSet = await request(env.app).post(`/api/sets/${elsewhere.setId}/lifted-leads/${lead}/resolder`).set(bearer(tech)).send({ note: 'Done' });
    expect(wrongSet.status).toBe(404);
    const stranger = await userSession(['technician']);
    expect((await request(env.app).get(`/api/sets/${set.id}/lifted-leads`).set(bearer(stranger))).status).toBe(404);
    expect((await request(env.app).post(`/api/sets/${set.id}/lifted-leads/${lead}/resolder`).set(bearer(stranger)).send({ note: 'Done' })).status).toBe(404);
    const ok = await request(env.app).post(`/api/sets/${set.id}/lifted-leads/${lead}/resolder`).set(bearer(tech)).send({ note: 'Done' });
    expect(ok.status).toBe(200);
  });

  it('lists open leads first, then the re-soldered ones', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.user.id });
    const closed = await makeLiftedLead(set.id, { componentKey: 'c-r1', componentRef: 'R1', end: 0, node: 'V1.1', resoldered: true });
    const open = await makeLiftedLead(set.id);
    const list = await request(env.app).get(`/api/sets/${set.id}/lifted-leads`).set(bearer(tech));
    expect(list.body.items.map((l: { id: number }) => l.id)).toEqual([open, closed]);
  });
});
