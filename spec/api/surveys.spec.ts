/**
 * Surveys (issue #5 items 1, 5, 7): start (carrying over conditions and order, never values), the
 * view the grid reads, changes while draft, the meter's check resistor, complete and amendments,
 * joint checks; someone else's survey is a 404.
 */
import { eq, sql } from 'drizzle-orm';
import request from 'supertest';
import { chassisTemplates } from '../../schema/index';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';
import { addReading, clientKey, makeMeterProfile, makeSet, makeSurvey } from '../support/bench-fixtures';

describe('Surveys', () => {
  let tech: Session;
  beforeAll(async () => {
    tech = await userSession(['technician']);
  });

  it("starts a draft survey on the template's newest version with its conditions, the chosen meter, and counts it on the template", async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.user.id });
    const meter = await makeMeterProfile({ ownerId: tech.user.id, name: 'Shop DMM' });
    const [before] = await env.database.db.select({ n: chassisTemplates.surveyCount }).from(chassisTemplates).where(eq(chassisTemplates.id, set.templateId));
    const r = await request(env.app).post(`/api/sets/${set.id}/surveys`).set(bearer(tech)).send({ purpose: 'intake', meterProfileId: meter.id });
    expect(r.status).withContext(JSON.stringify(r.body).slice(0, 300)).toBe(201);
    const v = r.body;
    expect(v.survey.state).toBe('draft');
    expect(v.survey.editable).toBeTrue();
    expect(v.survey.purpose).toBe('intake');
    expect(v.survey.versionNumber).toBe(1);
    expect(v.survey.meterName).toBe('Shop DMM');
    expect(v.survey.meter.profile.kind).toBe('digital');
    expect(v.survey.rule).toEqual({ decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'template' });
    // The sample template's conditions (spec/support/template-fixtures.ts).
    expect(v.survey.conditions).toEqual({ tubesIn: true, speakerConnected: true, controls: 'volume max', ambientC: null, note: '' });
    expect(v.survey.carriedFromSurveyId).toBeNull();
    expect(v.survey.counts).toEqual({ inBand: 0, nearLimit: 0, out: 0, inconclusive: 0, unread: 3 });
    expect(v.template.document.testPoints.map((t: { key: string }) => t.key)).toEqual(['tp-r1', 'tp-r2', 'tp-v1p']);
    expect(v.tubeTypes.map((t: { designation: string }) => t.designation)).toEqual([set.tube]);
    expect(v.set).toEqual(jasmine.objectContaining({ id: set.id, hotChassis: true, power: 'ac-dc' }));
    expect(v.readings).toEqual([]);
    expect(v.previous).toBeNull();
    expect(v.order).toEqual([]);
    const [after] = await env.database.db.select({ n: chassisTemplates.surveyCount }).from(chassisTemplates).where(eq(chassisTemplates.id, set.templateId));
    expect(after.n).toBe(before.n + 1);

    const noVersion = await request(env.app).post(`/api/sets/${set.id}/surveys`).set(bearer(tech)).send({ purpose: 'intake', versionNumber: 7 });
    expect(noVersion.status).toBe(400);
    expect(noVersion.body.error.details.field).toBe('versionNumber');
    const othersMeter = await makeMeterProfile();
    const badMeter = await request(env.app).post(`/api/sets/${set.id}/surveys`).set(bearer(tech)).send({ purpose: 'intake', meterProfileId: othersMeter.id });
    expect(badMeter.status).toBe(400);
    expect(badMeter.body.error.details.field).toBe('meterProfileId');
  });

  it('carries over the newest survey\'s conditions, rule and order — never its values; the old values come as `previous`', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.user.id });
    const first = await makeSurvey({
      setId: set.id,
      state: 'complete',
      conditions: { tubesIn: false, speakerConnected: true, controls: 'volume min, band MW', ambientC: 18, note: 'cold workshop' },
      rule: { decision: 'guarded', nearLimitFraction: 0.5, bandFrom: 'allowance', allowance: { lowPct: -20, highPct: 20 } },
      createdAt: new Date(Date.now() - 3 * 365 * 24 * 3600 * 1000),
    });
    await addReading(first.id, { testPointKey: 'tp-r2', text: '260k' });
    const superseded = await addReading(first.id, { testPointKey: 'tp-r1', text: '12M' });
    await addReading(first.id, { testPointKey: 'tp-r1', text: '10.5M', method: 'lead-lifted', liftedEnd: 0, followsReadingId: superseded });

    const r = await request(env.app).post(`/api/sets/${set.id}/surveys`).set(bearer(tech)).send({ purpose: 'periodic' });
    expect(r.status).toBe(201);
    const v = r.body;
    expect(v.survey.carriedFromSurveyId).toBe(first.id);
    expect(v.survey.conditions).toEqual({ tubesIn: false, speakerConnected: true, controls: 'volume min, band MW', ambientC: 18, note: 'cold workshop' });
    expect(v.survey.rule.decision).toBe('guarded');
    expect(v.order).toEqual(['tp-r1', 'tp-r2', 'tp-v1p']);
    expect(v.readings).toEqual([]);
    expect(v.survey.counts.unread).toBe(3);
    expect(v.previous.surveyId).toBe(first.id);
    expect(v.previous.readings).toEqual([
      { testPointKey: 'tp-r2', text: '260k', state: 'value', ohms: 260000 },
      { testPointKey: 'tp-r1', text: '10.5M', state: 'value', ohms: 10.5e6 },
    ]);
    // Given conditions win over the carried ones, field by field.
    const third = await request(env.app).post(`/api/sets/${set.id}/surveys`).set(bearer(tech)).send({ purpose: 'after-repair', conditions: { tubesIn: true } });
    expect(third.body.survey.conditions.tubesIn).toBeTrue();
    expect(third.body.survey.conditions.controls).toBe('volume min, band MW');
    expect(third.body.survey.carriedFromSurveyId).toBe(v.survey.id);

    const list = await request(env.app).get(`/api/sets/${set.id}/surveys`).set(bearer(tech));
    expect(list.status).toBe(200);
    expect(list.body.map((s: { id: number }) => s.id)).toEqual([third.body.survey.id, v.survey.id, first.id]);
    expect(list.body[2].counts.inBand + list.body[2].counts.nearLimit + list.body[2].counts.out + list.body[2].counts.inconclusive).toBe(2);
  });

  it('shows each reading with its verdict, the counts over current readings, and is a 404 for a stranger', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.user.id });
    const a = await addReading(s.id, { testPointKey: 'tp-r2', text: '250k' });
    const b = await addReading(s.id, { testPointKey: 'tp-r1', state: 'no-access' });
    const v = await request(env.app).get(`/api/surveys/${s.id}`).set(bearer(tech));
    expect(v.status).toBe(200);
    expect(v.body.evaluations[a].verdict).toBe('in-band');
    expect(v.body.evaluations[b].verdict).toBe('not-read');
    expect(v.body.evaluations[b].reason).toBe('no-access');
    expect(v.body.survey.counts.inBand).toBe(1);
    expect(v.body.survey.counts.unread).toBe(2);
    const stranger = await userSession(['technician']);
    expect((await request(env.app).get(`/api/surveys/${s.id}`).set(bearer(stranger))).status).toBe(404);
    expect((await request(env.app).get(`/api/sets/${s.setId}/surveys`).set(bearer(stranger))).status).toBe(404);
    expect((await request(env.app).post(`/api/sets/${s.setId}/surveys`).set(bearer(stranger)).send({ purpose: 'intake' })).status).toBe(404);
  });

  it('changes conditions, rule and purpose while draft with the version; stale is a 409; a complete survey is read-only', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.user.id });
    const ok = await request(env.app).patch(`/api/surveys/${s.id}`).set(bearer(tech)).send({ version: 1, conditions: { ambientC: 24, note: 'speaker on the bench' }, purpose: 'after-repair' });
    expect(ok.status).toBe(200);
    expect(ok.body.survey.version).toBe(2);
    expect(ok.body.survey.purpose).toBe('after-repair');
    expect(ok.body.survey.conditions).toEqual({ tubesIn: true, speakerConnected: true, controls: 'volume max', ambientC: 24, note: 'speaker on the bench' });
    const stale = await request(env.app).patch(`/api/surveys/${s.id}`).set(bearer(tech)).send({ version: 1, purpose: 'periodic' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('stale-version');
    const noMeter = await request(env.app).patch(`/api/surveys/${s.id}`).set(bearer(tech)).send({ version: 2, meterProfileId: null });
    expect(noMeter.status).toBe(200);
    expect(noMeter.body.survey.meter).toBeNull();
    const done = await request(env.app).post(`/api/surveys/${s.id}/complete`).set(bearer(tech));
    expect(done.status).toBe(200);
    expect(done.body.survey.state).toBe('complete');
    expect(done.body.survey.editable).toBeFalse();
    expect(done.body.survey.completedAt).not.toBeNull();
    const late = await request(env.app).patch(`/api/surveys/${s.id}`).set(bearer(tech)).send({ version: 4, purpose: 'periodic' });
    expect(late.status).toBe(409);
    expect((await request(env.app).post(`/api/surveys/${s.id}/complete`).set(bearer(tech))).status).toBe(409);
  });

  it("checks the meter on its check resistor: ok within the limits, a warning off them, the core's message for unparsable text", async () => {
    const env = await apiEnv();
    // The worked 2000-count meter (spec/support/meters.ts), autorange; the check resistor 10 kΩ ±1 %.
    // 10.02 kΩ reads on the 20 k range: a = 0.8 % × 10 020 + 2 × 10 Ω ≈ 100 Ω, U ≈ 116 Ω [CALC];
    // [9.90 k, 10.14 k] meets [9.9 k, 10.1 k]. 10.5 kΩ: [10.38 k, 10.62 k] does not.
    const s = await makeSurvey({ ownerId: tech.user.id });
    const ok = await request(env.app).post(`/api/surveys/${s.id}/meter-check`).set(bearer(tech)).send({ text: '10.02k' });
    expect(ok.status).toBe(200);
    expect(ok.body).toEqual(jasmine.objectContaining({ text: '10.02k', ohms: 10020, knownOhms: 10000, tolerancePct: 1, ok: true }));
    const off = await request(env.app).post(`/api/surveys/${s.id}/meter-check`).set(bearer(tech)).send({ text: '10.5k' });
    expect(off.status).toBe(200);
    expect(off.body.ok).toBeFalse();
    expect(off.body.message).toContain('check the meter');
    const bad = await request(env.app).post(`/api/surveys/${s.id}/meter-check`).set(bearer(tech)).send({ text: '1,500' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.field).toBe('text');
    const view = await request(env.app).get(`/api/surveys/${s.id}`).set(bearer(tech));
    expect(view.body.survey.meterCheck.ok).toBeFalse();
    expect(view.body.survey.meterCheck.ohms).toBe(10500);

    const noMeter = await makeSurvey({ ownerId: tech.user.id, meter: false });
    const refused = await request(env.app).post(`/api/surveys/${noMeter.id}/meter-check`).set(bearer(tech)).send({ text: '10k' });
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('no-meter');
  });

  it('amends a complete survey (who, when, why): an edited reading and a new one, both shown; a draft is refused', async () => {
    const env = await apiEnv();
    const draft = await makeSurvey({ ownerId: tech.user.id });
    const dr = await addReading(draft.id, { text: '250k' });
    const early = await request(env.app).post(`/api/surveys/${draft.id}/amendments`).set(bearer(tech)).send({ readingId: dr, reason: 'Misread', change: { text: '25k' } });
    expect(early.status).toBe(409);

    const s = await makeSurvey({ ownerId: tech.user.id, state: 'complete' });
    const r = await addReading(s.id, { testPointKey: 'tp-r2', text: '250k' });
    const bad = await request(env.app).post(`/api/surveys/${s.id}/amendments`).set(bearer(tech)).send({ readingId: r, reason: 'Misread', change: { text: '1,500' } });
    expect(bad.status).toBe(400);
    const edit = await request(env.app).post(`/api/surveys/${s.id}/amendments`).set(bearer(tech)).send({ readingId: r, reason: 'Misread the range: it was 25k', change: { text: '25k' } });
    expect(edit.status).withContext(JSON.stringify(edit.body)).toBe(201);
    expect(edit.body.reading.ohms).toBe(25000);
    expect(edit.body.reading.version).toBe(2);
    expect(edit.body.evaluation.verdict).not.toBe('in-band');
    expect(edit.body.amendment.reason).toBe('Misread the range: it was 25k');
    expect(edit.body.amendment.amendedBy.id).toBe(tech.user.id);
    expect(edit.body.amendment.change.before.ohms).toBe(250000);
    expect(edit.body.amendment.change.after.ohms).toBe(25000);
    const added = await request(env.app).post(`/api/surveys/${s.id}/amendments`).set(bearer(tech)).send({ reason: 'R1 was not read', change: { testPointKey: 'tp-r1', text: '9.8M' } });
    expect(added.status).toBe(201);
    expect(added.body.reading.testPointKey).toBe('tp-r1');
    const view = await request(env.app).get(`/api/surveys/${s.id}`).set(bearer(tech));
    expect(view.body.amendments.map((a: { reason: string }) => a.reason)).toEqual(['Misread the range: it was 25k', 'R1 was not read']);
    expect(view.body.readings.length).toBe(2);
    expect(view.body.survey.state).toBe('complete');
  });

  it("marks a path's joints checked and unchecked (draft only); an unknown test point is refused", async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.user.id });
    await addReading(s.id, { testPointKey: 'tp-r2', text: '330k' });
    const bad = await request(env.app).post(`/api/surveys/${s.id}/joint-checks`).set(bearer(tech)).send({ testPointKey: 'tp-r7', checked: true });
    expect(bad.status).toBe(400);
    const on = await request(env.app).post(`/api/surveys/${s.id}/joint-checks`).set(bearer(tech)).send({ testPointKey: 'tp-r2', checked: true });
    expect(on.status).toBe(200);
    expect(on.body.jointChecks['tp-r2'].by.id).toBe(tech.user.id);
    expect(on.body.evaluation.testPointKey).toBe('tp-r2');
    const view = await request(env.app).get(`/api/surveys/${s.id}`).set(bearer(tech));
    expect(Object.keys(view.body.survey.jointChecks)).toEqual(['tp-r2']);
    const off = await request(env.app).post(`/api/surveys/${s.id}/joint-checks`).set(bearer(tech)).send({ testPointKey: 'tp-r2', checked: false });
    expect(off.body.jointChecks).toEqual({});
    await env.database.db.execute(sql`UPDATE surveys SET state = 'complete' WHERE id = ${s.id}`);
    expect((await request(env.app).post(`/api/surveys/${s.id}/joint-checks`).set(bearer(tech)).send({ testPointKey: 'tp-r2', checked: true })).status).toBe(409);
  });

  it('answers a reading saved on a survey another user the set is shared with started', async () => {
    const env = await apiEnv();
    const friend = await userSession(['technician']);
    const set = await makeSet({ ownerId: tech.user.id, sharedWith: [friend.user.id] });
    const start = await request(env.app).post(`/api/sets/${set.id}/surveys`).set(bearer(friend)).send({ purpose: 'intake' });
    expect(start.status).toBe(201);
    expect(start.body.survey.startedBy.id).toBe(friend.user.id);
    const r = await request(env.app).post(`/api/surveys/${start.body.survey.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '250k' });
    expect(r.status).toBe(201);
  });

  it('answers the view as JSON with its server time (Server-Timing), the template spliced in whole, twice the same', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.user.id });
    await addReading(s.id, { testPointKey: 'tp-r2', text: '250k' });
    const a = await request(env.app).get(`/api/surveys/${s.id}`).set(bearer(tech));
    const b = await request(env.app).get(`/api/surveys/${s.id}`).set(bearer(tech));
    expect(a.status).toBe(200);
    expect(a.headers['content-type']).toMatch(/^application\/json/);
    expect(a.headers['server-timing']).toMatch(/^app;dur=\d+(\.\d+)?$/);
    // The second answer comes from the cached template text: the same document, field for field.
    expect(b.body.template).toEqual(a.body.template);
    expect(a.body.template.document.testPoints.length).toBeGreaterThan(0);
    expect(a.body.readings.length).toBe(1);
    expect(Object.keys(b.body)).toEqual(Object.keys(a.body));
  });
});
