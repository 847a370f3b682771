/**
 * The replacement list (DESIGN.md §2 "replacement list"; issue 5): parts out on conclusive evidence
 * go to the order, everything else out to "to confirm" with its next step, the capacitor list by
 * policy; CSV; ordered / received marks.
 *
 * The sample chassis (spec/support/template-fixtures.ts): R1 10 MΩ ±20 % V1.1–chassis, R2 250 kΩ
 * ±10 % ½ W with 45 V across, V1.7–B+1, C1 0.01 µF 400 V paper; chart reading tp-v1p V1.7 to B+1.
 * In this network R2 is the only resistive path between its nodes, so an in-circuit reading of R2
 * is R2 itself.
 */
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { replacementMarks } from '../../schema/index';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';
import { addReading, makeSurvey } from '../support/bench-fixtures';

describe('Replacement list', () => {
  let tech: Session & { id: number };
  beforeAll(async () => {
    tech = await userSession(['technician']);
  });

  it('orders a part measured high on its own leads; sends an in-circuit low and a high chart reading to confirm with their next steps', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.id });
    const r2 = await addReading(s.id, { testPointKey: 'tp-r2', text: '420k', method: 'lead-lifted', liftedEnd: 1 });
    const r1 = await addReading(s.id, { testPointKey: 'tp-r1', text: '5M' });
    await addReading(s.id, { testPointKey: 'tp-v1p', text: '400k' });
    const r = await request(env.app).get(`/api/sets/${s.setId}/replacements`).set(bearer(tech));
    expect(r.status).toBe(200);
    expect(r.body.survey.id).toBe(s.id);
    expect(r.body.surveyId).toBe(s.id);
    expect(r.body.order.length).toBe(1);
    const line = r.body.order[0];
    expect(line).toEqual(
      jasmine.objectContaining({
        componentKey: 'c-r2',
        ref: 'R2',
        nominalText: '250 kΩ',
        // IEC 60063 E24: 240 k is the nearest value to 250 k (|ln(250/240)| < |ln(270/250)|) [CALC], −4 %, inside ±10 %.
        suggested: jasmine.objectContaining({ ohms: 240_000, text: '240 kΩ', series: 'E24', inBand: true }),
        // 45 V across 240 kΩ is 8.4 mW; never below the original ½ W (DESIGN.md §3.6) [CALC].
        watts: 0.5,
        type: 'carbon-film',
        quantity: 1,
        evidence: { testPointKey: 'tp-r2', readingId: r2, verdict: 'high', method: 'lead-lifted' },
        ordered: false,
        orderedAt: null,
        received: false,
        receivedAt: null,
      }),
    );
    expect(line.suggested.deviationPct).toBeCloseTo(-4, 12);
    const confirm = Object.fromEntries(r.body.confirm.map((c: { testPointKey: string }) => [c.testPointKey, c]));
    expect(Object.keys(confirm).sort()).toEqual(['tp-r1', 'tp-v1p']);
    expect(confirm['tp-r1']).toEqual(jasmine.objectContaining({ componentKey: 'c-r1', ref: 'R1', nominalText: '10 MΩ', readingText: '5M', verdict: 'low', nextStep: 'lift-a-lead', readingId: r1 }));
    expect(confirm['tp-v1p']).toEqual(jasmine.objectContaining({ componentKey: null, ref: 'V1.7 to B+1', from: 'V1.7', to: 'B+1', verdict: 'high', nextStep: 'check-joint' }));
    // The recap by policy: C1 is a paper capacitor (check-values.md §5).
    expect(r.body.capacitors.map((c: { ref: string; reason: string; type: string }) => [c.ref, c.reason, c.type])).toEqual([['C1', 'policy', 'film']]);
  });

  it('keeps an in-circuit high off the order until the path\u2019s joints are marked checked, then orders it', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.id });
    await addReading(s.id, { testPointKey: 'tp-r2', text: '420k' });
    const before = await request(env.app).get(`/api/sets/${s.setId}/replacements`).set(bearer(tech));
    expect(before.body.order).toEqual([]);
    expect(before.body.confirm).toEqual([jasmine.objectContaining({ componentKey: 'c-r2', nextStep: 'check-joint' })]);

    await request(env.app).post(`/api/surveys/${s.id}/joint-checks`).set(bearer(tech)).send({ testPointKey: 'tp-r2', checked: true }).expect(200);
    const after = await request(env.app).get(`/api/sets/${s.setId}/replacements`).set(bearer(tech));
    expect(after.body.order.map((o: { ref: string }) => o.ref)).toEqual(['R2']);
    expect(after.body.confirm).toEqual([]);
  });

  it('lists nothing to order for readings in band; the latest follow-up supersedes the reading it follows', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.id });
    const first = await addReading(s.id, { testPointKey: 'tp-r1', text: '5M' });
    await addReading(s.id, { testPointKey: 'tp-r1', text: '10.5M', method: 'lead-lifted', liftedEnd: 1, followsReadingId: first });
    await addReading(s.id, { testPointKey: 'tp-r2', text: '255k', method: 'out-of-circuit' });
    const r = await request(env.app).get(`/api/sets/${s.setId}/replacements`).set(bearer(tech));
    expect(r.body.order).toEqual([]);
    expect(r.body.confirm).toEqual([]);
  });

  it('takes another survey of the set by ?surveyId=, and answers 404 for a survey of another set', async () => {
    const env = await apiEnv();
    const older = await makeSurvey({ ownerId: tech.id, state: 'complete' });
    await addReading(older.id, { testPointKey: 'tp-r2', text: '420k', method: 'lead-lifted', liftedEnd: 0 });
    const newer = await makeSurvey({ setId: older.setId });
    const elsewhere = await makeSurvey({ ownerId: tech.id });
    const dflt = await request(env.app).get(`/api/sets/${older.setId}/replacements`).set(bearer(tech));
    expect(dflt.body.survey.id).toBe(newer.id);
    expect(dflt.body.order).toEqual([]);
    const old = await request(env.app).get(`/api/sets/${older.setId}/replacements?surveyId=${older.id}`).set(bearer(tech));
    expect(old.body.order.map((o: { ref: string }) => o.ref)).toEqual(['R2']);
    const foreign = await request(env.app).get(`/api/sets/${older.setId}/replacements?surveyId=${elsewhere.id}`).set(bearer(tech));
    expect(foreign.status).toBe(404);
  });

  it('follows the series and recap options: E12 gives 270 k for 250 k, recap=none lists no capacitor', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.id });
    await addReading(s.id, { testPointKey: 'tp-r2', text: '420k', method: 'lead-lifted', liftedEnd: 1 });
    // IEC 60063 E12: 220 k and 270 k; |ln(270/250)| < |ln(250/220)| [CALC].
    const r = await request(env.app).get(`/api/sets/${s.setId}/replacements?series=E12&recap=none`).set(bearer(tech));
    expect(r.body.order[0].suggested.ohms).toBe(270_000);
    expect(r.body.capacitors).toEqual([]);
    const bad = await request(env.app).get(`/api/sets/${s.setId}/replacements?series=E7`).set(bearer(tech));
    expect(bad.status).toBe(400);
  });

  it('exports the order and the capacitors as CSV with a header row', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.id });
    await addReading(s.id, { testPointKey: 'tp-r2', text: '420k', method: 'lead-lifted', liftedEnd: 1 });
    const r = await request(env.app).get(`/api/sets/${s.setId}/replacements?format=csv`).set(bearer(tech));
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toMatch(/^text\/csv/);
    const rows = r.text.trim().split('\r\n');
    expect(rows[0]).toBe('list,refs,description,quantity,value,series deviation %,watts,type,voltage warning,ordered,received');
    expect(rows[1]).toBe('order,R2,"240 kΩ, ½ W, carbon-film",1,240 kΩ,-4.0,0.5,carbon-film,,no,no');
    expect(rows[2]).toMatch(/^capacitors,C1,/);
    expect(rows.length).toBe(3);
  });
});

describe('Ordered / received marks', () => {
  let tech: Session & { id: number };
  beforeAll(async () => {
    tech = await userSession(['technician']);
  });

  it('marks a line ordered, then received (ordered keeps its first time), and shows the marks on the list', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.id });
    await addReading(s.id, { testPointKey: 'tp-r2', text: '420k', method: 'lead-lifted', liftedEnd: 1 });
    const o = await request(env.app).put(`/api/sets/${s.setId}/replacements/c-r2/marks`).set(bearer(tech)).send({ ordered: true, received: false });
    expect(o.status).toBe(200);
    expect(o.body).toEqual(jasmine.objectContaining({ componentKey: 'c-r2', ordered: true, received: false, receivedAt: null }));
    const rec = await request(env.app).put(`/api/sets/${s.setId}/replacements/c-r2/marks`).set(bearer(tech)).send({ ordered: true, received: true });
    expect(rec.body.orderedAt).toBe(o.body.orderedAt);
    expect(rec.body.received).toBeTrue();
    const list = await request(env.app).get(`/api/sets/${s.setId}/replacements`).set(bearer(tech));
    expect(list.body.order[0]).toEqual(jasmine.objectContaining({ ordered: true, orderedAt: o.body.orderedAt, received: true, receivedAt: rec.body.receivedAt }));
    const csv = await request(env.app).get(`/api/sets/${s.setId}/replacements?format=csv`).set(bearer(tech));
    expect(csv.text.split('\r\n')[1]).toMatch(/,yes,yes$/);

    const cleared = await request(env.app).put(`/api/sets/${s.setId}/replacements/c-r2/marks`).set(bearer(tech)).send({ ordered: false, received: false });
    expect(cleared.body).toEqual(jasmine.objectContaining({ ordered: false, orderedAt: null, received: false }));
  });

  it('answers 404 for a component the template does not have and for someone else\u2019s set (nothing written)', async () => {
    const env = await apiEnv();
    const s = await makeSurvey({ ownerId: tech.id });
    const other = await makeSurvey();
    const unknown = await request(env.app).put(`/api/sets/${s.setId}/replacements/c-r77/marks`).set(bearer(tech)).send({ ordered: true, received: false });
    expect(unknown.status).toBe(404);
    const foreign = await request(env.app).put(`/api/sets/${other.setId}/replacements/c-r2/marks`).set(bearer(tech)).send({ ordered: true, received: false });
    expect(foreign.status).toBe(404);
    const db = env.database.db;
    expect((await db.select().from(replacementMarks).where(eq(replacementMarks.setId, s.setId))).length).toBe(0);
    expect((await db.select().from(replacementMarks).where(eq(replacementMarks.setId, other.setId))).length).toBe(0);
    await request(env.app).put(`/api/sets/${s.setId}/replacements/c-r2/marks`).set(bearer(tech)).send({ ordered: true, received: false }).expect(200);
  });
});
