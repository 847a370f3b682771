/**
 * Faults around the commit of a reading save (issue #5 item 4): an app built with `faults` throws
 * just before COMMIT or right after it. Before: nothing is stored. After: the reading is stored
 * whole though the client saw an error. Either way the retry with the same client key converges
 * on one stored reading — never a duplicate, never a 409.
 */
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { createApp } from '../../api/app';
import type { Faults } from '../../api/context';
import { apiEnv, bearer, testConfig, userSession, type Session } from '../support/api-env';
import { clientKey, makeSurvey } from '../support/bench-fixtures';

/** Throws once at the named phase of a reading save, then lets every later call through. */
class OneFault implements Faults {
  armed: 'before-commit' | 'after-commit' | null = null;
  seen: string[] = [];
  async around(op: string, phase: 'before-commit' | 'after-commit'): Promise<void> {
    this.seen.push(`${op}:${phase}`);
    if (op === 'reading-save' && phase === this.armed) {
      this.armed = null;
      throw new Error(`injected fault ${phase}`);
    }
  }
}

async function rows(surveyId: number) {
  const env = await apiEnv();
  return (await env.database.db.execute<{ id: string; text: string; ohms: number; client_key: string }>(sql`SELECT id, text, ohms, client_key FROM readings WHERE survey_id = ${surveyId} ORDER BY id`)).rows;
}

describe('Reading save with faults around the commit', () => {
  let tech: Session;
  let faults: OneFault;
  let app: ReturnType<typeof createApp>;

  beforeAll(async () => {
    const env = await apiEnv();
    tech = await userSession(['technician']);
    faults = new OneFault();
    app = createApp({ config: testConfig({ JWT_SECRET: env.config.jwtSecret }), database: env.database, outbox: env.queue, faults });
  });

  it('passes through both seams on a save without a fault (201, one row)', async () => {
    const s = await makeSurvey({ ownerId: tech.user.id });
    faults.seen = [];
    const r = await request(app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '250k' });
    expect(r.status).toBe(201);
    expect(faults.seen).toEqual(['reading-save:before-commit', 'reading-save:after-commit']);
    expect((await rows(s.id)).length).toBe(1);
  });

  it('aborted before the commit: nothing stored; the retry with the same key stores it once (201)', async () => {
    const s = await makeSurvey({ ownerId: tech.user.id });
    const body = { testPointKey: 'tp-r2', clientKey: clientKey(), text: '252k' };
    faults.armed = 'before-commit';
    const failed = await request(app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send(body);
    expect(failed.status).toBe(500);
    expect(failed.body.error.code).toBe('internal');
    expect(await rows(s.id)).toEqual([]);

    const retry = await request(app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send(body);
    expect(retry.status).toBe(201);
    expect(retry.body.replayed).toBeFalse();
    const again = await request(app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send(body);
    expect(again.status).toBe(200);
    expect(again.body.reading.id).toBe(retry.body.reading.id);
    const stored = await rows(s.id);
    expect(stored.length).toBe(1);
    expect(stored[0].ohms).toBe(252000);
  });

  it('aborted after the commit: stored whole though the client saw an error; the retry answers the stored reading (200), no duplicate, no 409', async () => {
    const s = await makeSurvey({ ownerId: tech.user.id });
    const body = { testPointKey: 'tp-r1', clientKey: clientKey(), text: '10M' };
    faults.armed = 'after-commit';
    const failed = await request(app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send(body);
    expect(failed.status).toBe(500);
    const stored = await rows(s.id);
    expect(stored.length).toBe(1);
    expect(stored[0].text).toBe('10M');
    expect(stored[0].client_key).toBe(body.clientKey);

    const retry = await request(app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send(body);
    expect(retry.status).toBe(200);
    expect(retry.body.replayed).toBeTrue();
    expect(retry.body.reading.id).toBe(Number(stored[0].id));
    expect(retry.body.reading.ohms).toBe(10e6);
    expect(retry.body.evaluation.readingId).toBe(Number(stored[0].id));
    expect((await rows(s.id)).length).toBe(1);
  });

  it('keeps the order of a queue replayed after a fault: each reading once, in the order sent', async () => {
    const s = await makeSurvey({ ownerId: tech.user.id });
    const queue = ['240k', '245k', '250k', '255k'].map((text) => ({ testPointKey: 'tp-r2', clientKey: clientKey(), text }));
    // The first two went through; the third failed after its commit; the client resends from the third.
    for (const b of queue.slice(0, 2)) expect((await request(app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send(b)).status).toBe(201);
    faults.armed = 'after-commit';
    expect((await request(app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send(queue[2])).status).toBe(500);
    const answers = [];
    for (const b of queue.slice(2)) answers.push((await request(app).post(`/api/surveys/${s.id}/readings`).set(bearer(tech)).send(b)).status);
    expect(answers).toEqual([200, 201]);
    expect((await rows(s.id)).map((r) => r.text)).toEqual(['240k', '245k', '250k', '255k']);
  });
});
