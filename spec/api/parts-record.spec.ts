/**
 * The parts record (issue 5 "After the survey"): per component kept / replaced (with the new part)
 * / left, linked to the reading that prompted it or with a reason; the new part's values parsed by
 * the measurement core; a replaced capacitor checked with the capacitor rules (warnings).
 * Each refusal (nothing written) stands beside the request that succeeds.
 */
import { eq } from 'drizzle-orm';
import request from 'supertest';
import type { Role } from '../../schema/index';
import { partsRecord } from '../../schema/index';
import * as templates from '../../api/templates/templates.use-cases';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';
import { addReading, makeSet, makeSurvey } from '../support/bench-fixtures';
import { sampleDocument, specTube } from '../support/template-fixtures';

async function lines(setId: number) {
  const env = await apiEnv();
  return env.database.db.select().from(partsRecord).where(eq(partsRecord.setId, setId));
}

describe('Parts record', () => {
  let tech: Session & { id: number };
  beforeAll(async () => {
    tech = await userSession(['technician']);
  });

  it('records a replaced resistor linked to the reading that prompted it, with the new part\u2019s value and measured value parsed', async () => {
    const env = await apiEnv();
    const survey = await makeSurvey({ ownerId: tech.id });
    const readingId = await addReading(survey.id, { testPointKey: 'tp-r2', text: '420k', method: 'lead-lifted', liftedEnd: 1 });
    const r = await request(env.app)
      .post(`/api/sets/${survey.setId}/parts-record`)
      .set(bearer(tech))
      .send({ componentKey: 'c-r2', action: 'replaced', readingId, newPart: { text: '270k', watts: 0.5, volts: 350, kind: 'carbon-film', measuredText: '268k' }, note: 'Original bagged.' });
    expect(r.status).toBe(201);
    expect(r.body.line).toEqual(
      jasmine.objectContaining({
        componentKey: 'c-r2',
        componentRef: 'R2',
        action: 'replaced',
        readingId,
        reason: '',
        note: 'Original bagged.',
        recordedBy: { id: tech.id, name: tech.user.name },
        newPart: { text: '270k', ohms: 270_000, uF: null, watts: 0.5, volts: 350, kind: 'carbon-film', measuredText: '268k', measuredOhms: 268_000 },
      }),
    );
    expect(r.body.warnings).toEqual([]);
    const list = await request(env.app).get(`/api/sets/${survey.setId}/parts-record`).set(bearer(tech));
    expect(list.body.map((l: { id: number }) => l.id)).toEqual([r.body.line.id]);
  });

  it('refuses a replaced line without the new part (400, nothing written); the line with it is stored', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    const no = await request(env.app).post(`/api/sets/${set.id}/parts-record`).set(bearer(tech)).send({ componentKey: 'c-r1', action: 'replaced', reason: 'Cracked body.' });
    expect(no.status).toBe(400);
    expect(no.body.error.details.field).toBe('newPart');
    expect((await lines(set.id)).length).toBe(0);
    const yes = await request(env.app).post(`/api/sets/${set.id}/parts-record`).set(bearer(tech)).send({ componentKey: 'c-r1', action: 'replaced', reason: 'Cracked body.', newPart: { text: '10M' } });
    expect(yes.status).toBe(201);
    expect((await lines(set.id)).length).toBe(1);
  });

  it('refuses a line with neither a prompting reading nor a reason; the same with a reason (e.g. by policy) is stored', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    const no = await request(env.app).post(`/api/sets/${set.id}/parts-record`).set(bearer(tech)).send({ componentKey: 'c-c1', action: 'replaced', newPart: { text: '0.01 µF 630 V film', uF: 0.01, volts: 630 } });
    expect(no.status).toBe(400);
    expect(no.body.error.details.field).toBe('reason');
    expect((await lines(set.id)).length).toBe(0);
    const yes = await request(env.app)
      .post(`/api/sets/${set.id}/parts-record`)
      .set(bearer(tech))
      .send({ componentKey: 'c-c1', action: 'replaced', reason: 'Paper capacitors replaced by policy.', newPart: { text: '0.01 µF 630 V film', uF: 0.01, volts: 630 } });
    expect(yes.status).toBe(201);
    expect(yes.body.line.newPart).toEqual(jasmine.objectContaining({ uF: 0.01, volts: 630, ohms: null }));
  });

  it('refuses a reading of another set (400 readingId, nothing written); a reading of its own set is taken', async () => {
    const env = await apiEnv();
    const mine = await makeSurvey({ ownerId: tech.id });
    const other = await makeSurvey();
    const foreign = await addReading(other.id, { text: '400k' });
    const own = await addReading(mine.id, { text: '400k' });
    const no = await request(env.app).post(`/api/sets/${mine.setId}/parts-record`).set(bearer(tech)).send({ componentKey: 'c-r2', action: 'kept', readingId: foreign });
    expect(no.status).toBe(400);
    expect(no.body.error.details.field).toBe('readingId');
    expect((await lines(mine.setId)).length).toBe(0);
    const yes = await request(env.app).post(`/api/sets/${mine.setId}/parts-record`).set(bearer(tech)).send({ componentKey: 'c-r2', action: 'left', readingId: own, note: 'Scarce original kept under "conserve".' });
    expect(yes.status).toBe(201);
  });

  it('refuses a new part\u2019s value the core cannot parse, with the core\u2019s message (nothing written); 1k5 is taken', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    // notation.ts (DESIGN.md §3.1): "1,500" is ambiguous (a thousands separator or a decimal comma).
    const no = await request(env.app).post(`/api/sets/${set.id}/parts-record`).set(bearer(tech)).send({ componentKey: 'c-r2', action: 'replaced', reason: 'Burnt.', newPart: { text: '1,500' } });
    expect(no.status).toBe(400);
    expect(no.body.error.details.field).toBe('newPart.text');
    expect(no.body.error.message.length).toBeGreaterThan(10);
    expect((await lines(set.id)).length).toBe(0);
    const yes = await request(env.app).post(`/api/sets/${set.id}/parts-record`).set(bearer(tech)).send({ componentKey: 'c-r2', action: 'replaced', reason: 'Burnt.', newPart: { text: '1k5' } });
    expect(yes.status).toBe(201);
    expect(yes.body.line.newPart.ohms).toBe(1500);
  });

  it('refuses a component the set\u2019s template does not have (400 componentKey)', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    const no = await request(env.app).post(`/api/sets/${set.id}/parts-record`).set(bearer(tech)).send({ componentKey: 'c-r99', action: 'kept', reason: 'In band.' });
    expect(no.status).toBe(400);
    expect(no.body.error.details.field).toBe('componentKey');
    await request(env.app).post(`/api/sets/${set.id}/parts-record`).set(bearer(tech)).send({ componentKey: 'c-r1', action: 'kept', reason: 'In band.' }).expect(201);
  });

  it('checks a replaced capacitor with the capacitor rules: below the voltage across it is a warning, a rating above it none', async () => {
    const env = await apiEnv();
    // The sample chassis with 90 V across C1 recorded (capacitor-checks.ts: a capacitor's own voltsAcross counts).
    const doc = sampleDocument(await specTube(), 'Quillmere Radio Co.', 'Wren 3C');
    doc.components[2].voltsAcross = 90;
    const owner = { id: tech.id, roles: ['technician', 'author'] as Role[] };
    const t = await templates.createTemplate({ db: env.database.db }, owner, { document: doc });
    await templates.publish({ db: env.database.db }, owner, t.id, 'First issue');
    const set = await makeSet({ ownerId: tech.id, templateId: t.id });
    const low = await request(env.app)
      .post(`/api/sets/${set.id}/parts-record`)
      .set(bearer(tech))
      .send({ componentKey: 'c-c1', action: 'replaced', reason: 'Leaky paper capacitor.', newPart: { text: '0.01 µF 63 V', uF: 0.01, volts: 63 } });
    expect(low.status).toBe(201);
    expect(low.body.warnings).toEqual([jasmine.objectContaining({ code: 'working-volts-below', severity: 'error' })]);
    const ok = await request(env.app)
      .post(`/api/sets/${set.id}/parts-record`)
      .set(bearer(tech))
      .send({ componentKey: 'c-c1', action: 'replaced', reason: 'Replaced again with the right part.', newPart: { text: '0.01 µF 630 V', uF: 0.01, volts: 630 } });
    expect(ok.body.warnings).toEqual([]);
    const list = await request(env.app).get(`/api/sets/${set.id}/parts-record`).set(bearer(tech));
    // Append-only: both lines stay, the newest is the one that counts.
    expect(list.body.map((l: { id: number }) => l.id)).toEqual([low.body.line.id, ok.body.line.id]);
  });

  it('answers 404 for someone else\u2019s set, reading or writing (nothing written)', async () => {
    const env = await apiEnv();
    const other = await makeSet();
    const r = await request(env.app).post(`/api/sets/${other.id}/parts-record`).set(bearer(tech)).send({ componentKey: 'c-r1', action: 'kept', reason: 'In band.' });
    expect(r.status).toBe(404);
    expect((await lines(other.id)).length).toBe(0);
    expect((await request(env.app).get(`/api/sets/${other.id}/parts-record`).set(bearer(tech))).status).toBe(404);
  });
});
