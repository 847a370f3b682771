/**
 * Part history across a set's surveys (DESIGN.md §3.8, §6 "Drift over years"), the before/after
 * comparison of two surveys, and the printable record of a set.
 *
 * The sample chassis (spec/support/template-fixtures.ts): R2 250 kΩ ±10 % (test point tp-r2).
 * Readings on R2's own leads (lead lifted) are R2's value.
 */
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { partsRecord } from '../../schema/index';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';
import { addReading, makeSurvey } from '../support/bench-fixtures';

const at = (iso: string) => new Date(iso);

/** A complete survey of the set dated `when`, with R2 read on its own leads. */
async function surveyOn(setId: number | undefined, ownerId: number, when: string, r2: string) {
  const s = await makeSurvey({ setId, ownerId, state: 'complete', createdAt: at(when) });
  await addReading(s.id, { testPointKey: 'tp-r2', text: r2, method: 'lead-lifted', liftedEnd: 1, takenAt: at(when) });
  return s;
}

describe('Part history', () => {
  let tech: Session & { id: number };
  beforeAll(async () => {
    tech = await userSession(['technician']);
  });

  it('gives R2 a drift rate with its interval from three surveys over four years whose spread exceeds U', async () => {
    const env = await apiEnv();
    const s1 = await surveyOn(undefined, tech.id, '2019-06-01T10:00:00Z', '262k');
    await surveyOn(s1.setId, tech.id, '2021-06-01T10:00:00Z', '275k');
    await surveyOn(s1.setId, tech.id, '2023-06-01T10:00:00Z', '290k');
    const r = await request(env.app).get(`/api/sets/${s1.setId}/history`).set(bearer(tech));
    expect(r.status).toBe(200);
    expect(r.body.surveys.length).toBe(3);
    const r2 = r.body.parts.find((p: { componentKey: string }) => p.componentKey === 'c-r2');
    expect(r2.instance).toBe(1);
    expect(r2.original).toBeTrue();
    // Drift from 250 kΩ: 4.8 %, 10 %, 16 % [CALC].
    expect(r2.points.map((p: { driftPct: number }) => +p.driftPct.toFixed(6))).toEqual([4.8, 10, 16]);
    for (const p of r2.points) expect(p.uncertaintyPct).toBeGreaterThan(0);
    // About (16 − 4.8) / 4 = 2.8 %/year by least squares over dates 730–731 days apart [CALC].
    expect(r2.rate.slopePctPerYear).toBeCloseTo(2.8, 1);
    expect(r2.rate.n).toBe(3);
    expect(r2.rate.interval.low).toBeLessThan(r2.rate.slopePctPerYear);
    expect(r2.rate.interval.high).toBeGreaterThan(r2.rate.slopePctPerYear);
    expect(r2.projection.extrapolation).toBeTrue();
    expect(r2.projection.note).toMatch(/extrapolation/);
  });

  it('gives no rate from two surveys, and leaves a draft survey\u2019s readings out', async () => {
    const env = await apiEnv();
    const s1 = await surveyOn(undefined, tech.id, '2020-01-10T10:00:00Z', '262k');
    await surveyOn(s1.setId, tech.id, '2022-01-10T10:00:00Z', '290k');
    const draft = await makeSurvey({ setId: s1.setId });
    await addReading(draft.id, { testPointKey: 'tp-r2', text: '300k', method: 'lead-lifted', liftedEnd: 1 });
    const r = await request(env.app).get(`/api/sets/${s1.setId}/history`).set(bearer(tech));
    const r2 = r.body.parts.find((p: { componentKey: string }) => p.componentKey === 'c-r2');
    expect(r2.points.length).toBe(2);
    expect(r2.rate.slopePctPerYear).toBeNull();
    expect(r2.rate.reason).toMatch(/3 surveys or more/);
    expect(r2.projection).toBeNull();
  });

  it('starts a new part instance at a replacement recorded in the parts record', async () => {
    const env = await apiEnv();
    const s1 = await surveyOn(undefined, tech.id, '2018-03-01T10:00:00Z', '262k');
    await surveyOn(s1.setId, tech.id, '2020-03-01T10:00:00Z', '280k');
    const line = await request(env.app)
      .post(`/api/sets/${s1.setId}/parts-record`)
      .set(bearer(tech))
      .send({ componentKey: 'c-r2', action: 'replaced', reason: 'High at the 2020 survey.', newPart: { text: '240k' } });
    expect(line.status).toBe(201);
    // The replacement happened in 2021 (the line is backdated: the API stamps the time of recording).
    await env.database.db.update(partsRecord).set({ createdAt: at('2021-03-01T10:00:00Z') }).where(eq(partsRecord.id, line.body.line.id));
    await surveyOn(s1.setId, tech.id, '2023-03-01T10:00:00Z', '241k');
    const r = await request(env.app).get(`/api/sets/${s1.setId}/history`).set(bearer(tech));
    const r2 = r.body.parts.filter((p: { componentKey: string }) => p.componentKey === 'c-r2');
    expect(r2.map((p: { instance: number }) => p.instance)).toEqual([1, 2]);
    expect(r2[0].points.length).toBe(2);
    expect(r2[0].endedBy.text).toBe('240k');
    expect(r2[1].startedBy.text).toBe('240k');
    expect(r2[1].points.map((p: { ohms: number }) => p.ohms)).toEqual([241_000]);
  });

  it('answers 404 for someone else\u2019s set', async () => {
    const env = await apiEnv();
    const other = await makeSurvey();
    expect((await request(env.app).get(`/api/sets/${other.setId}/history`).set(bearer(tech))).status).toBe(404);
    expect((await request(env.app).get(`/api/sets/${other.setId}/history`).set(bearer(await userSession(['admin'])))).status).toBe(200);
  });
});

describe('Before / after comparison', () => {
  let tech: Session & { id: number };
  beforeAll(async () => {
    tech = await userSession(['technician']);
  });

  it('puts both values and verdicts side by side with the change in percent', async () => {
    const env = await apiEnv();
    const a = await surveyOn(undefined, tech.id, '2024-01-05T10:00:00Z', '300k');
    const b = await surveyOn(a.setId, tech.id, '2024-02-05T10:00:00Z', '250k');
    const r = await request(env.app).get(`/api/sets/${a.setId}/compare?a=${a.id}&b=${b.id}`).set(bearer(tech));
    expect(r.status).toBe(200);
    expect(r.body.a.id).toBe(a.id);
    expect(r.body.b.id).toBe(b.id);
    const row = r.body.rows.find((x: { testPointKey: string }) => x.testPointKey === 'tp-r2');
    expect(row.label).toBe('R2');
    expect(row.a.verdict).toBe('high'); // +20 % against ±10 %
    expect(row.b.verdict).toBe('in-band');
    expect(row.changePct).toBeCloseTo((-50 / 300) * 100, 9); // (250 k − 300 k) / 300 k [CALC]
    expect(row.verdictChanged).toBeTrue();
    const unread = r.body.rows.find((x: { testPointKey: string }) => x.testPointKey === 'tp-r1');
    expect(unread.a).toBeNull();
    expect(unread.changePct).toBeNull();
  });

  it('answers 404 for a survey of another set and 400 without both surveys', async () => {
    const env = await apiEnv();
    const a = await surveyOn(undefined, tech.id, '2024-01-05T10:00:00Z', '300k');
    const elsewhere = await surveyOn(undefined, tech.id, '2024-01-05T10:00:00Z', '300k');
    expect((await request(env.app).get(`/api/sets/${a.setId}/compare?a=${a.id}&b=${elsewhere.id}`).set(bearer(tech))).status).toBe(404);
    expect((await request(env.app).get(`/api/sets/${a.setId}/compare?a=${a.id}`).set(bearer(tech))).status).toBe(400);
    expect((await request(env.app).get(`/api/sets/${a.setId}/compare?a=${a.id}&b=${a.id}`).set(bearer(tech))).status).toBe(200);
  });
});

describe('Printable record', () => {
  it('gathers the set, its surveys with readings and verdicts, parts record, gates, lifted leads and bring-up log', async () => {
    const env = await apiEnv();
    const tech = await userSession(['technician']);
    const s = await surveyOn(undefined, tech.id, '2024-04-01T10:00:00Z', '300k');
    await request(env.app).post(`/api/sets/${s.setId}/parts-record`).set(bearer(tech)).send({ componentKey: 'c-r2', action: 'replaced', reason: 'High.', newPart: { text: '240k' } }).expect(201);
    await request(env.app).post(`/api/sets/${s.setId}/gates/load-connected/sign`).set(bearer(tech)).send({ note: '' }).expect(201);
    const r = await request(env.app).get(`/api/sets/${s.setId}/record`).set(bearer(tech));
    expect(r.status).toBe(200);
    expect(r.body.set.id).toBe(s.setId);
    expect(r.body.set.owner).toEqual({ id: tech.id, name: tech.user.name });
    expect(r.body.surveys.length).toBe(1);
    const view = r.body.surveys[0];
    expect(view.readings.length).toBe(1);
    expect(view.evaluations[view.readings[0].id].verdict).toBe('high');
    expect(r.body.partsRecord.map((l: { componentRef: string }) => l.componentRef)).toEqual(['R2']);
    expect(r.body.gates.items.find((i: { key: string }) => i.key === 'load-connected').open).toBeFalse();
    expect(r.body.liftedLeads).toEqual([]);
    expect(r.body.bringUp).toEqual([]);
  });
});
