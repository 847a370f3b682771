/**
 * Meter profiles (DESIGN.md §2 "meter profile"): personal (someone else's is a 404, for admins
 * too), checked with the domain's meterProblems, versioned, archived rather than deleted.
 */
import request from 'supertest';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';
import { makeMeterProfile, makeSurvey } from '../support/bench-fixtures';
import { analogueMeter, workedMeter } from '../support/meters';

describe('Meter profiles', () => {
  let tech: Session;
  beforeAll(async () => {
    tech = await userSession(['technician']);
  });

  it('adds a digital and an analogue profile and lists the caller\'s own only', async () => {
    const env = await apiEnv();
    const other = await makeMeterProfile();
    const d = await request(env.app)
      .post('/api/meter-profiles')
      .set(bearer(tech))
      .send({ name: 'Bench DMM', profile: workedMeter({ autorange: true }), checkKind: 'calibration', checkDate: '2026-03-14', checkResistorOhms: 10000, checkResistorTolerancePct: 0.1 });
    expect(d.status).withContext(JSON.stringify(d.body)).toBe(201);
    expect(d.body.name).toBe('Bench DMM');
    expect(d.body.checkKind).toBe('calibration');
    expect(d.body.checkDate).toBe('2026-03-14');
    expect(d.body.checkResistorOhms).toBe(10000);
    expect(d.body.version).toBe(1);
    expect(d.body.profile.ranges.length).toBe(5);
    const a = await request(env.app).post('/api/meter-profiles').set(bearer(tech)).send({ name: 'Analogue multimeter', profile: analogueMeter() });
    expect(a.status).toBe(201);
    expect(a.body.checkKind).toBe('check');
    expect(a.body.checkResistorOhms).toBeNull();
    const list = await request(env.app).get('/api/meter-profiles').set(bearer(tech));
    expect(list.status).toBe(200);
    const ids = list.body.items.map((m: { id: number }) => m.id);
    expect(ids).toContain(d.body.id);
    expect(ids).toContain(a.body.id);
    expect(ids).not.toContain(other.id);
  });

  it('refuses a profile the domain finds unusable, naming the field; the usable twin is stored', async () => {
    const env = await apiEnv();
    const broken = workedMeter();
    delete (broken.ranges[2] as Partial<Record<string, number>>).resolutionOhms;
    const r = await request(env.app).post('/api/meter-profiles').set(bearer(tech)).send({ name: 'Broken', profile: broken });
    expect(r.status).toBe(400);
    expect(r.body.error.details.field).toBe('profile.ranges[2].resolutionOhms');
    const mixed = workedMeter();
    (mixed.ranges[0] as unknown as Record<string, number>).centreOhms = 10;
    const m = await request(env.app).post('/api/meter-profiles').set(bearer(tech)).send({ name: 'Mixed', profile: mixed });
    expect(m.status).toBe(400);
    expect(m.body.error.details.field).toBe('profile.ranges[0].centreOhms');
    const list = await request(env.app).get('/api/meter-profiles').set(bearer(tech));
    expect(list.body.items.map((x: { name: string }) => x.name)).not.toContain('Broken');
    const ok = await request(env.app).post('/api/meter-profiles').set(bearer(tech)).send({ name: 'Fixed', profile: workedMeter() });
    expect(ok.status).toBe(201);
  });

  it('changes a profile with its version; a stale version is a 409', async () => {
    const env = await apiEnv();
    const p = await makeMeterProfile({ ownerId: tech.user.id });
    const body = { name: 'Renamed DMM', profile: workedMeter({ leadOhms: 0.2 }), checkResistorOhms: 1000, checkResistorTolerancePct: 1 };
    const ok = await request(env.app).put(`/api/meter-profiles/${p.id}`).set(bearer(tech)).send({ ...body, version: 1 });
    expect(ok.status).toBe(200);
    expect(ok.body.version).toBe(2);
    expect(ok.body.profile.leadOhms).toBe(0.2);
    const stale = await request(env.app).put(`/api/meter-profiles/${p.id}`).set(bearer(tech)).send({ ...body, name: 'Late', version: 1 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('stale-version');
    const got = await request(env.app).get(`/api/meter-profiles/${p.id}`).set(bearer(tech));
    expect(got.body.name).toBe('Renamed DMM');
  });

  it("is a 404 on someone else's profile, for an admin too", async () => {
    const env = await apiEnv();
    const p = await makeMeterProfile();
    const admin = await userSession(['admin']);
    for (const s of [tech, admin]) {
      expect((await request(env.app).get(`/api/meter-profiles/${p.id}`).set(bearer(s))).status).toBe(404);
      expect((await request(env.app).delete(`/api/meter-profiles/${p.id}`).set(bearer(s))).status).toBe(404);
    }
    const mine = await makeMeterProfile({ ownerId: tech.user.id });
    expect((await request(env.app).get(`/api/meter-profiles/${mine.id}`).set(bearer(tech))).status).toBe(200);
  });

  it('archives on DELETE: hidden from the list unless asked for, and a survey that used it keeps its meter', async () => {
    const env = await apiEnv();
    const p = await makeMeterProfile({ ownerId: tech.user.id, name: 'Old analogue' });
    const s = await makeSurvey({ ownerId: tech.user.id, meterProfileId: p.id });
    const del = await request(env.app).delete(`/api/meter-profiles/${p.id}`).set(bearer(tech));
    expect(del.status).toBe(200);
    expect(del.body.archived).toBeTrue();
    const list = await request(env.app).get('/api/meter-profiles').set(bearer(tech));
    expect(list.body.items.map((x: { id: number }) => x.id)).not.toContain(p.id);
    const all = await request(env.app).get('/api/meter-profiles?archived=true').set(bearer(tech));
    expect(all.body.items.map((x: { id: number }) => x.id)).toContain(p.id);
    const view = await request(env.app).get(`/api/surveys/${s.id}`).set(bearer(tech));
    expect(view.body.survey.meter.name).toBe('Old analogue');
    // An archived profile is not offered for a new survey.
    const start = await request(env.app).post(`/api/sets/${s.setId}/surveys`).set(bearer(tech)).send({ purpose: 'periodic', meterProfileId: p.id });
    expect(start.status).toBe(400);
    expect(start.body.error.details.field).toBe('meterProfileId');
  });
});
