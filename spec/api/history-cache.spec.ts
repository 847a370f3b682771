/**
 * The kept history points (api/records/history-points.ts): a set's history answered twice is
 * computed once per survey and then reused — and anything the points come from (an amendment of a
 * reading, a reading added by amendment, a change made straight in the database, the set's
 * deviations) makes the next answer compute that survey again and show the change. The counts of
 * computed and reused surveys tell one from the other; the answers are compared in full.
 *
 * The sample chassis (spec/support/template-fixtures.ts): R2 250 kΩ ±10 % (tp-r2), R1 (tp-r1).
 */
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { pointsCacheStats } from '../../api/records/history-points';
import { readings } from '../../schema/index';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';
import { addReading, makeSurvey } from '../support/bench-fixtures';

async function surveyOn(setId: number | undefined, ownerId: number, when: string, r2: string) {
  const s = await makeSurvey({ setId, ownerId, state: 'complete', createdAt: new Date(when) });
  const readingId = await addReading(s.id, { testPointKey: 'tp-r2', text: r2, method: 'lead-lifted', liftedEnd: 1, takenAt: new Date(when) });
  return { ...s, readingId };
}

interface Part {
  componentKey: string;
  points: { surveyId: number; readingId: number; ohms: number | null; driftPct: number | null }[];
  rate: { slopePctPerYear: number | null };
}

describe('Part history: the kept points of each survey', () => {
  let tech: Session & { id: number };
  beforeAll(async () => {
    tech = await userSession(['technician']);
  });

  /** GET …/history, with how many surveys were computed and how many reused for it. */
  async function history(setId: number) {
    const env = await apiEnv();
    const before = { ...pointsCacheStats };
    const r = await request(env.app).get(`/api/sets/${setId}/history`).set(bearer(tech));
    expect(r.status).toBe(200);
    return { body: r.body as { parts: Part[] }, computed: pointsCacheStats.computed - before.computed, reused: pointsCacheStats.reused - before.reused };
  }
  const r2Of = (body: { parts: Part[] }) => body.parts.find((p) => p.componentKey === 'c-r2')!;

  it('reuses unchanged surveys, and computes again the one an amendment changed (its new value shown)', async () => {
    const env = await apiEnv();
    const s1 = await surveyOn(undefined, tech.id, '2019-06-01T10:00:00Z', '262k');
    const s2 = await surveyOn(s1.setId, tech.id, '2021-06-01T10:00:00Z', '275k');
    await surveyOn(s1.setId, tech.id, '2023-06-01T10:00:00Z', '290k');

    const first = await history(s1.setId);
    expect(first.computed).toBe(3);
    expect(first.reused).toBe(0);
    const again = await history(s1.setId);
    expect(again.computed).toBe(0);
    expect(again.reused).toBe(3);
    expect(again.body).toEqual(first.body);
    expect(r2Of(again.body).points.map((p) => p.ohms)).toEqual([262_000, 275_000, 290_000]);

    // An amendment of the 2021 reading: only that survey is computed again, and the answer shows it.
    const amend = await request(env.app).post(`/api/surveys/${s2.id}/amendments`).set(bearer(tech)).send({ readingId: s2.readingId, reason: 'Misread: it was 280k', change: { text: '280k' } });
    expect(amend.status).withContext(JSON.stringify(amend.body)).toBe(201);
    const amended = await history(s1.setId);
    expect(amended.computed).toBe(1);
    expect(amended.reused).toBe(2);
    expect(r2Of(amended.body).points.map((p) => p.ohms)).toEqual([262_000, 280_000, 290_000]);
    expect(r2Of(amended.body).rate.slopePctPerYear).not.toBe(r2Of(first.body).rate.slopePctPerYear);

    // A reading added by amendment (R1, not read before) appears as a part of its own.
    const added = await request(env.app).post(`/api/surveys/${s2.id}/amendments`).set(bearer(tech)).send({ reason: 'R1 was not read', change: { testPointKey: 'tp-r1', text: '9.8M' } });
    expect(added.status).withContext(JSON.stringify(added.body)).toBe(201);
    const withR1 = await history(s1.setId);
    expect(withR1.computed).toBe(1);
    const r1 = withR1.body.parts.find((p) => p.componentKey === 'c-r1');
    expect(r1?.points.map((p) => p.readingId)).toEqual([added.body.reading.id]);
    expect(first.body.parts.find((p) => p.componentKey === 'c-r1')).toBeUndefined();
  });

  it('sees a change made straight in the database and a change of the set\u2019s deviations; another set is computed on its own', async () => {
    const env = await apiEnv();
    const s1 = await surveyOn(undefined, tech.id, '2018-01-10T10:00:00Z', '255k');
    await surveyOn(s1.setId, tech.id, '2020-01-10T10:00:00Z', '265k');
    expect((await history(s1.setId)).computed).toBe(2);

    // No API call at all: the reading's value changed in the table is seen on the next answer.
    await env.database.db.update(readings).set({ ohms: 300_000, text: '300k' }).where(eq(readings.id, s1.readingId));
    const direct = await history(s1.setId);
    expect(direct.computed).toBe(1);
    expect(direct.reused).toBe(1);
    expect(r2Of(direct.body).points.map((p) => p.ohms)).toEqual([300_000, 265_000]);

    // The set's deviations are part of every survey's grid: a 220 kΩ part in R2's place (the
    // template says 250 kΩ) makes both surveys computed again, against the new nominal.
    const patched = await request(env.app)
      .patch(`/api/sets/${s1.setId}`)
      .set(bearer(tech))
      .send({ version: 1, deviations: [{ kind: 'non-original', componentKey: 'c-r2', nominal: { ohms: 220000, text: '220k' }, tolerancePct: 5, note: 'Modern metal film' }] });
    expect(patched.status).withContext(JSON.stringify(patched.body)).toBe(200);
    const deviated = await history(s1.setId);
    expect(deviated.computed).toBe(2);
    expect(deviated.reused).toBe(0);
    expect(r2Of(direct.body).points.map((p) => +p.driftPct!.toFixed(6))).toEqual([20, 6]);
    // Against 220 kΩ: 300k is 36.36… % high, 265k 20.45… % [CALC].
    expect(r2Of(deviated.body).points.map((p) => +p.driftPct!.toFixed(2))).toEqual([36.36, 20.45]);

    // Another set with the same values is its own: computed, not taken from the first.
    const other = await surveyOn(undefined, tech.id, '2018-01-10T10:00:00Z', '255k');
    const otherHistory = await history(other.setId);
    expect(otherHistory.computed).toBe(1);
    expect(otherHistory.reused).toBe(0);
    expect(r2Of(otherHistory.body).points.map((p) => p.surveyId)).toEqual([other.id]);
  });
});
