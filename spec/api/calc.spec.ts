/**
 * The public calculation API. Values are checked against their sources (named beside each);
 * the API must answer exactly what the shared domain functions answer (the browser uses them).
 */
import request from 'supertest';
import { checkNetwork, checkReading } from '../../api/domain/quick-check';
import { apiEnv, randomIp } from '../support/api-env';
import { workedMeter } from '../support/meters';

/** check-values.md §3 worked meter: 2000 counts, ±(0.8 % + 2), ±(1 % + 2) on 2000 k. */
const METER = workedMeter();

describe('Public calculation API', () => {
  it('POST /api/calc/parse reads 4K7J as 4.7 kΩ ±5 % (IEC 60062 clauses 4 and 5) and OL as over-range', async () => {
    const env = await apiEnv();
    const r = await request(env.app).post('/api/calc/parse').send({ text: '4K7J' });
    expect(r.status).toBe(200);
    expect(r.body).toEqual(jasmine.objectContaining({ state: 'value', ohms: 4700, tolerancePct: 5, code: '4K7J' }));
    const ol = await request(env.app).post('/api/calc/parse').send({ text: 'OL' });
    expect(ol.body.state).toBe('over-range');
    expect(ol.body.ohms).toBeNull();
  });

  it('POST /api/calc/parse refuses lower-case m with a message explaining milli and mega (400, field text)', async () => {
    const env = await apiEnv();
    const r = await request(env.app).post('/api/calc/parse').send({ text: '4.7m' });
    expect(r.status).toBe(400);
    expect(r.body.error.details.field).toBe('text');
    expect(r.body.error.message.toLowerCase()).toContain('milli');
  });

  it('POST /api/calc/color-code decodes yellow violet red gold as 4 700 Ω ±5 % (IEC 60062:2016 colour table)', async () => {
    const env = await apiEnv();
    const r = await request(env.app).post('/api/calc/color-code').send({ bands: ['yellow', 'violet', 'red', 'gold'] });
    expect(r.status).toBe(200);
    expect(r.body).toEqual({ ohms: 4700, tolerancePct: 5, tempcoPpmPerK: null });
  });

  it('POST /api/calc/color-code decodes body–tip–dot brown/black/yellow/silver as 100 kΩ ±10 % (encyclopedia "Resistor", marking section [SEC])', async () => {
    const env = await apiEnv();
    const r = await request(env.app).post('/api/calc/color-code').send({ bodyTipDot: { body: 'brown', tip: 'black', dot: 'yellow', end: 'silver' } });
    expect(r.status).toBe(200);
    expect(r.body.ohms).toBe(100000);
    expect(r.body.tolerancePct).toBe(10);
  });

  it('POST /api/calc/color-code encodes 1 kΩ ±1 % as brown black black brown brown (IEC 60062, 5 bands)', async () => {
    const env = await apiEnv();
    const r = await request(env.app).post('/api/calc/color-code').send({ ohms: 1000, bandCount: 5, tolerancePct: 1 });
    expect(r.body).toEqual({ bands: ['brown', 'black', 'black', 'brown', 'brown'] });
  });

  it('POST /api/calc/color-code refuses gold as a first digit (400 naming the band) and an unknown form', async () => {
    const env = await apiEnv();
    const r = await request(env.app).post('/api/calc/color-code').send({ bands: ['gold', 'violet', 'red', 'gold'] });
    expect(r.status).toBe(400);
    expect(r.body.error.details.field).toBe('bands[0]');
    const none = await request(env.app).post('/api/calc/color-code').send({ colours: ['red'] });
    expect(none.status).toBe(400);
  });

  it('GET /api/calc/preferred gives 50 kΩ → 51 k in E24 and 47 k in E12 (IEC 60063; check-values §2)', async () => {
    const env = await apiEnv();
    const e24 = await request(env.app).get('/api/calc/preferred').query({ ohms: 50000 });
    expect(e24.status).toBe(200);
    expect(e24.body.series).toBe('E24');
    expect(e24.body.nearest).toBeCloseTo(51000, 6);
    const e12 = await request(env.app).get('/api/calc/preferred').query({ ohms: 50000, series: 'E12' });
    expect(e12.body.nearest).toBeCloseTo(47000, 6);
    const bad = await request(env.app).get('/api/calc/preferred').query({ ohms: -5 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.field).toBe('ohms');
  });

  it('POST /api/calc/verdict: 100 kΩ ±10 %, 109.5 kΩ on the 200 k range under the guarded rule is a conditional pass, p_c 0.7895 (ILAC-G8:09/2019 §4.2.3; JCGM 106:2012 §7; check-values §3 [CALC])', async () => {
    const env = await apiEnv();
    const body = { expected: 100000, reading: '109.5k', tolerancePct: 10, meter: METER, rule: { decision: 'guarded', nearLimitFraction: 0.75, bandFrom: 'template' } };
    const r = await request(env.app).post('/api/calc/verdict').send(body);
    expect(r.status).toBe(200);
    expect(r.body.verdict).toBe('inconclusive');
    expect(r.body.reason).toBe('guard-band');
    expect(r.body.side).toBe('conditional-pass');
    expect(r.body.conformityProbability).toBeCloseTo(0.7895, 4);
    expect(r.body.band).toEqual(jasmine.objectContaining({ lowOhms: 90000, source: 'template' }));
    expect(r.body.band.highOhms).toBeCloseTo(110000, 6);
    // The browser computes the same function: the API answer equals it exactly.
    expect(r.body).toEqual(JSON.parse(JSON.stringify(checkReading(body as never))));
  });

  it('POST /api/calc/verdict: 104.2 kΩ is in band with U = 1.1935 kΩ at the reading (GUM 4.3.7 rectangular, k = 2; check-values §3 [CALC])', async () => {
    const env = await apiEnv();
    const r = await request(env.app).post('/api/calc/verdict').send({ expected: 100000, reading: 104200, tolerancePct: 10, meter: METER });
    expect(r.body.verdict).toBe('in-band');
    expect(r.body.driftPct).toBeCloseTo(4.2, 6);
    expect(r.body.uncertaintyOhms).toBeCloseTo(1193.5, 0);
  });

  it('POST /api/calc/verdict refuses an unparseable reading with the notation message, field reading', async () => {
    const env = await apiEnv();
    const r = await request(env.app).post('/api/calc/verdict').send({ expected: 4700, reading: '4kk7', tolerancePct: 5 });
    expect(r.status).toBe(400);
    expect(r.body.error.details.field).toBe('reading');
    expect(r.body.error.message).toContain('4kk7');
  });

  it('POST /api/calc/network: balanced bridge reads 225 Ω whatever the bridge arm (check-values §4; Klein & Randić 1993)', async () => {
    const env = await apiEnv();
    const edges = [
      { id: 'R1', a: 'A', b: 'C', ohms: 100 },
      { id: 'R2', a: 'C', b: 'B', ohms: 200 },
      { id: 'R3', a: 'A', b: 'D', ohms: 300 },
      { id: 'R4', a: 'D', b: 'B', ohms: 600 },
      { id: 'R5', a: 'C', b: 'D', ohms: 1234 },
    ];
    const r = await request(env.app).post('/api/calc/network').send({ edges, from: 'A', to: 'B' });
    expect(r.status).toBe(200);
    expect(r.body.open).toBeFalse();
    expect(r.body.effectiveOhms).toBeCloseTo(225, 9);
  });

  it('POST /api/calc/network: 100 kΩ in parallel with 470 kΩ reading 82.46 kΩ implies the part at nominal (rank-one closed form R0·Rm/(R0 − Rm))', async () => {
    const env = await apiEnv();
    // [CALC] 100k ∥ 470k = 47 000/570 kΩ = 82 456.14 Ω; R_x = 470k·82 456.14/(470k − 82 456.14) = 100 000 Ω.
    const edges = [
      { id: 'R7', a: 'V2.1', b: 'B+', ohms: 100000, tolerancePct: 10 },
      { id: 'R8', a: 'V2.1', b: 'B+', ohms: 470000, tolerancePct: 10 },
    ];
    const body = { edges, from: 'V2.1', to: 'B+', partId: 'R7', readingOhms: 82456.14, meter: METER };
    const r = await request(env.app).post('/api/calc/network').send(body);
    expect(r.status).toBe(200);
    expect(r.body.effectiveOhms).toBeCloseTo(82456.14, 1);
    expect(r.body.impliedOhms).toBeCloseTo(100000, -1);
    expect(r.body.explainable).toBeTrue();
    expect(r.body).toEqual(JSON.parse(JSON.stringify(checkNetwork(body as never))));
  });

  it('POST /api/calc/network refuses an unknown node with 400 naming "to"', async () => {
    const env = await apiEnv();
    const r = await request(env.app).post('/api/calc/network').send({ edges: [{ id: 'R1', a: 'A', b: 'B', ohms: 10 }], from: 'A', to: 'Z' });
    expect(r.status).toBe(400);
    expect(r.body.error.details.field).toBe('to');
  });

  it('POST /api/calc/dissipation: 100 kΩ with 150 V across it dissipates 0.225 W → ½ W suggested (P = V²/R; 2× derating, common practice)', async () => {
    const env = await apiEnv();
    const r = await request(env.app).post('/api/calc/dissipation').send({ ohms: 100000, volts: 150 });
    expect(r.status).toBe(200);
    expect(r.body.watts).toBeCloseTo(0.225, 9);
    expect(r.body.suggestedWatts).toBe(0.5);
  });

  it('rate-limits a client beyond the configured calculations per minute with 429; another client still gets answers', async () => {
    const env = await apiEnv();
    const app = env.appWith({ CALC_RATE_LIMIT_PER_MINUTE: '3' });
    const ip = randomIp();
    for (let i = 0; i < 3; i++) expect((await request(app).post('/api/calc/parse').set('X-Forwarded-For', ip).send({ text: '47k' })).status).toBe(200);
    const limited = await request(app).post('/api/calc/parse').set('X-Forwarded-For', ip).send({ text: '47k' });
    expect(limited.status).toBe(429);
    expect(limited.body.error.code).toBe('too-many-requests');
    expect((await request(app).post('/api/calc/parse').set('X-Forwarded-For', randomIp()).send({ text: '47k' })).status).toBe(200);
  });
});
