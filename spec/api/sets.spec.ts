/**
 * Sets (DESIGN.md §2 "set", issue #5 "Sets"): intake on a published template the caller can see,
 * search and status filter, deviations checked against the template (and expected by the survey),
 * sharing (owner or admin; 403 for a shared-with user), tube records per socket, and 404 for
 * someone else's set.
 */
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { apiEnv, bearer, makeUser, signIn, userSession, type Session } from '../support/api-env';
import { makeSet, makeSurvey } from '../support/bench-fixtures';
import { makeTemplate } from '../support/template-fixtures';

async function setCount(ownerId: number): Promise<number> {
  const env = await apiEnv();
  return (await env.database.db.execute<{ n: number }>(sql`SELECT count(*)::int AS n FROM sets WHERE owner_id = ${ownerId}`)).rows[0].n;
}

describe('Sets', () => {
  let tech: Session;
  beforeAll(async () => {
    tech = await userSession(['technician']);
  });

  it('takes in a set on a published template the caller can see (201, SetDetail)', async () => {
    const env = await apiEnv();
    const t = await makeTemplate({ published: 1, visibility: 'public', maker: 'Quillmere Radio Co.', model: 'Wren 3' });
    const r = await request(env.app)
      .post('/api/sets')
      .set(bearer(tech))
      .send({ templateId: t.id, label: 'Ashdown collection', accessionNumber: 'AC-1987.44', serial: 'Q-88213', restorationLevel: 'conserve', complaint: 'Hum, no stations', jobStatus: 'surveying' });
    expect(r.status).withContext(JSON.stringify(r.body)).toBe(201);
    expect(r.body.label).toBe('Ashdown collection');
    expect(r.body.accessionNumber).toBe('AC-1987.44');
    expect(r.body.restorationLevel).toBe('conserve');
    expect(r.body.jobStatus).toBe('surveying');
    expect(r.body.template).toEqual(jasmine.objectContaining({ id: t.id, maker: 'Quillmere Radio Co.', model: 'Wren 3', power: 'ac-dc', hotChassis: true }));
    expect(r.body.owner.id).toBe(tech.user.id);
    expect(r.body.sharedWithMe).toBeFalse();
    expect(r.body.latestPublishedVersion).toBe(1);
    expect(r.body.version).toBe(1);
    expect(r.body.surveys).toEqual([]);
    expect(r.body.deviations).toEqual([]);
  });

  it("refuses someone else's private template (400 on templateId) and an unpublished one (409), storing nothing", async () => {
    const env = await apiEnv();
    const before = await setCount(tech.user.id);
    const hidden = await makeTemplate({ published: 1 });
    const r = await request(env.app).post('/api/sets').set(bearer(tech)).send({ templateId: hidden.id, label: 'Not mine' });
    expect(r.status).toBe(400);
    expect(r.body.error.details.field).toBe('templateId');
    const draftOnly = await makeTemplate({ ownerId: tech.user.id });
    const d = await request(env.app).post('/api/sets').set(bearer(tech)).send({ templateId: draftOnly.id, label: 'Too early' });
    expect(d.status).toBe(409);
    expect(d.body.error.code).toBe('template-not-published');
    expect(await setCount(tech.user.id)).toBe(before);
    const own = await makeTemplate({ ownerId: tech.user.id, published: 1 });
    const ok = await request(env.app).post('/api/sets').set(bearer(tech)).send({ templateId: own.id, label: 'Mine' });
    expect(ok.status).toBe(201);
    expect(await setCount(tech.user.id)).toBe(before + 1);
  });

  it('lists own and shared sets, never a stranger\'s; admins see all; q and status filter', async () => {
    const env = await apiEnv();
    const me = await userSession(['technician']);
    const mine = await makeSet({ ownerId: me.user.id, label: 'Workbench radio', serial: 'ZX-5531', jobStatus: 'repairing' });
    const shared = await makeSet({ label: 'Neighbour radio', sharedWith: [me.user.id] });
    const stranger = await makeSet({ label: 'Stranger radio', serial: 'ZX-5532' });
    await makeSurvey({ setId: mine.id });
    const list = await request(env.app).get('/api/sets').set(bearer(me));
    expect(list.status).toBe(200);
    const ids = list.body.items.map((s: { id: number }) => s.id);
    expect(ids).toContain(mine.id);
    expect(ids).toContain(shared.id);
    expect(ids).not.toContain(stranger.id);
    expect(list.body.total).toBe(2);
    const m = list.body.items.find((s: { id: number }) => s.id === mine.id);
    expect(m.surveyCount).toBe(1);
    expect(m.lastSurvey.state).toBe('draft');
    expect(list.body.items.find((s: { id: number }) => s.id === shared.id).sharedWithMe).toBeTrue();

    const q = await request(env.app).get('/api/sets?q=zx-55').set(bearer(me));
    expect(q.body.items.map((s: { id: number }) => s.id)).toEqual([mine.id]);
    const status = await request(env.app).get('/api/sets?status=intake').set(bearer(me));
    expect(status.body.items.map((s: { id: number }) => s.id)).toEqual([shared.id]);

    const admin = await userSession(['admin']);
    const all = await request(env.app).get('/api/sets?q=ZX-5532').set(bearer(admin));
    expect(all.body.items.map((s: { id: number }) => s.id)).toContain(stranger.id);
  });

  it("is a 404 on someone else's set; the shared-with user and an admin see it", async () => {
    const env = await apiEnv();
    const friend = await makeUser(['student']);
    const s = await makeSet({ ownerId: tech.user.id, sharedWith: [friend.id] });
    const stranger = await userSession(['technician']);
    expect((await request(env.app).get(`/api/sets/${s.id}`).set(bearer(stranger))).status).toBe(404);
    expect((await request(env.app).patch(`/api/sets/${s.id}`).set(bearer(stranger)).send({ version: 1, label: 'Taken' })).status).toBe(404);
    const f = await request(env.app).get(`/api/sets/${s.id}`).set(bearer(await signIn(friend.email)));
    expect(f.status).toBe(200);
    expect(f.body.sharedWithMe).toBeTrue();
    const admin = await userSession(['admin']);
    expect((await request(env.app).get(`/api/sets/${s.id}`).set(bearer(admin))).status).toBe(200);
    expect((await request(env.app).get('/api/sets/999999999').set(bearer(tech))).status).toBe(404);
  });

  it('changes a set with its version; a stale version is a 409 and changes nothing', async () => {
    const env = await apiEnv();
    const s = await makeSet({ ownerId: tech.user.id });
    const ok = await request(env.app).patch(`/api/sets/${s.id}`).set(bearer(tech)).send({ version: 1, label: 'Kitchen set', jobStatus: 'waiting-parts' });
    expect(ok.status).toBe(200);
    expect(ok.body.version).toBe(2);
    expect(ok.body.label).toBe('Kitchen set');
    expect(ok.body.jobStatus).toBe('waiting-parts');
    const stale = await request(env.app).patch(`/api/sets/${s.id}`).set(bearer(tech)).send({ version: 1, label: 'Too late' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('stale-version');
    expect((await request(env.app).get(`/api/sets/${s.id}`).set(bearer(tech))).body.label).toBe('Kitchen set');
  });

  it('checks deviations against the template, and the survey then expects the deviation, not the template value', async () => {
    const env = await apiEnv();
    const s = await makeSet({ ownerId: tech.user.id });
    const unknown = await request(env.app)
      .patch(`/api/sets/${s.id}`)
      .set(bearer(tech))
      .send({ version: 1, deviations: [{ kind: 'non-original', componentKey: 'c-r9', nominal: { ohms: 220000 } }] });
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.details.field).toBe('deviations[0].componentKey');
    const twice = await request(env.app)
      .patch(`/api/sets/${s.id}`)
      .set(bearer(tech))
      .send({ version: 1, deviations: [{ kind: 'non-original', componentKey: 'c-r2', nominal: { ohms: 220000 } }, { kind: 'factory-change', componentKey: 'c-r2', nominal: { ohms: 270000 } }] });
    expect(twice.status).toBe(400);
    expect(twice.body.error.details.field).toBe('deviations[1].componentKey');
    // A non-original 220 kΩ ±5 % in R2's place (the template says 250 kΩ ±10 %).
    const ok = await request(env.app)
      .patch(`/api/sets/${s.id}`)
      .set(bearer(tech))
      .send({ version: 1, deviations: [{ kind: 'non-original', componentKey: 'c-r2', nominal: { ohms: 220000, text: '220k' }, tolerancePct: 5, note: 'Modern metal film' }] });
    expect(ok.status).withContext(JSON.stringify(ok.body)).toBe(200);
    expect(ok.body.deviations.length).toBe(1);
    expect(ok.body.deviations[0].key).toMatch(/^dv-/);
    expect(ok.body.deviations[0].tolerancePct).toBe(5);

    const survey = await request(env.app).post(`/api/sets/${s.id}/surveys`).set(bearer(tech)).send({ purpose: 'intake' });
    expect(survey.status).toBe(201);
    expect(survey.body.set.deviations[0].componentKey).toBe('c-r2');
    // 221 kΩ: in band against the deviation (220 kΩ ±5 %), 11.6 % low against the template's 250 kΩ ±10 %.
    const r = await request(env.app).post(`/api/surveys/${survey.body.survey.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: 'deviation-spec-0001', text: '221k', method: 'out-of-circuit' });
    expect(r.status).toBe(201);
    expect(r.body.evaluation.verdict).toBe('in-band');
    expect(r.body.evaluation.driftPct).toBeCloseTo(((221000 - 220000) / 220000) * 100, 6);
  });

  it('shares a set (owner or admin); a shared-with user may not change the sharing (403); unknown users are refused', async () => {
    const env = await apiEnv();
    const friend = await makeUser(['technician']);
    const s = await makeSet({ ownerId: tech.user.id });
    const bad = await request(env.app).put(`/api/sets/${s.id}/sharing`).set(bearer(tech)).send({ userIds: [friend.id, 999999999] });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.field).toBe('userIds[1]');
    const ok = await request(env.app).put(`/api/sets/${s.id}/sharing`).set(bearer(tech)).send({ userIds: [friend.id] });
    expect(ok.status).toBe(200);
    expect(ok.body.sharedWith).toEqual([{ id: friend.id, name: friend.name }]);
    const fs = await signIn(friend.email);
    expect((await request(env.app).get(`/api/sets/${s.id}`).set(bearer(fs))).status).toBe(200);
    const refused = await request(env.app).put(`/api/sets/${s.id}/sharing`).set(bearer(fs)).send({ userIds: [] });
    expect(refused.status).toBe(403);
    // A shared-with user edits the set itself.
    const edit = await request(env.app).patch(`/api/sets/${s.id}`).set(bearer(fs)).send({ version: 1, intakeNotes: 'Back cover missing.' });
    expect(edit.status).toBe(200);
    const unshare = await request(env.app).put(`/api/sets/${s.id}/sharing`).set(bearer(tech)).send({ userIds: [] });
    expect(unshare.status).toBe(200);
    expect((await request(env.app).get(`/api/sets/${s.id}`).set(bearer(fs))).status).toBe(404);
  });

  it('records what is in a socket of the template; an unknown socket is a 404; a wrong type names the type found', async () => {
    const env = await apiEnv();
    const s = await makeSet({ ownerId: tech.user.id });
    const nowhere = await request(env.app).put(`/api/sets/${s.id}/tube-records/so-v9`).set(bearer(tech)).send({ status: 'present' });
    expect(nowhere.status).toBe(404);
    const noType = await request(env.app).put(`/api/sets/${s.id}/tube-records/so-v1`).set(bearer(tech)).send({ status: 'wrong-type' });
    expect(noType.status).toBe(400);
    expect(noType.body.error.details.field).toBe('foundType');
    const ok = await request(env.app).put(`/api/sets/${s.id}/tube-records/so-v1`).set(bearer(tech)).send({ status: 'wrong-type', foundType: '12AT6', testResult: '70 % of new, no shorts' });
    expect(ok.status).toBe(200);
    expect(ok.body).toEqual(jasmine.objectContaining({ socketKey: 'so-v1', status: 'wrong-type', foundType: '12AT6', testResult: '70 % of new, no shorts' }));
    expect(ok.body.recordedBy.id).toBe(tech.user.id);
    const replaced = await request(env.app).put(`/api/sets/${s.id}/tube-records/so-v1`).set(bearer(tech)).send({ status: 'replaced', note: 'New old stock' });
    expect(replaced.status).toBe(200);
    const detail = await request(env.app).get(`/api/sets/${s.id}`).set(bearer(tech));
    expect(detail.body.tubeRecords.length).toBe(1);
    expect(detail.body.tubeRecords[0].status).toBe('replaced');
  });
});
