/**
 * Provenance labels (DESIGN.md §6; issue 5 "Record and label"): an unguessable, revocable token
 * under PUBLIC_BASE_URL (refused while it is unset), and the read-only public page behind it
 * without owner identity.
 */
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { provenanceLabels } from '../../schema/index';
import { hashToken } from '../../api/records/records.use-cases';
import { apiEnv, bearer, makeUser, signIn, userSession, type Session } from '../support/api-env';
import { addReading, makeSet, makeSurvey } from '../support/bench-fixtures';

async function labelRows(setId: number) {
  const env = await apiEnv();
  return env.database.db.select().from(provenanceLabels).where(eq(provenanceLabels.setId, setId));
}

describe('Provenance labels', () => {
  let tech: Session & { id: number };
  beforeAll(async () => {
    tech = await userSession(['technician']);
  });

  it('makes a label whose link lies under PUBLIC_BASE_URL, keeping only a hash to look the token up', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    const r = await request(env.app).post(`/api/sets/${set.id}/labels`).set(bearer(tech));
    expect(r.status).toBe(201);
    expect(r.body.token).toMatch(/^[A-Za-z0-9_-]{32}$/); // 24 random bytes in base64url
    expect(r.body.url).toBe(`http://driftmark.test/p/${r.body.token}`);
    expect(r.body.createdBy).toEqual({ id: tech.id, name: tech.user.name });
    const [row] = await labelRows(set.id);
    expect(row.tokenHash).toBe(hashToken(r.body.token));
    expect(row.tokenHash).not.toContain(r.body.token);
    const two = await request(env.app).post(`/api/sets/${set.id}/labels`).set(bearer(tech));
    expect(two.body.token).not.toBe(r.body.token);
    const list = await request(env.app).get(`/api/sets/${set.id}/labels`).set(bearer(tech));
    expect(list.body.map((l: { id: number; url: string }) => [l.id, l.url])).toEqual([
      [two.body.id, two.body.url],
      [r.body.id, r.body.url],
    ]);
  });

  it('is refused (409 public-base-url-missing, nothing written) while PUBLIC_BASE_URL is unset', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    const unset = env.appWith({ PUBLIC_BASE_URL: '' });
    const r = await request(unset).post(`/api/sets/${set.id}/labels`).set(bearer(tech));
    expect(r.status).toBe(409);
    expect(r.body.error.code).toBe('public-base-url-missing');
    expect(r.body.error.message).toContain('PUBLIC_BASE_URL');
    expect((await labelRows(set.id)).length).toBe(0);
    await request(env.app).post(`/api/sets/${set.id}/labels`).set(bearer(tech)).expect(201);
  });

  it('shows a read-only public record without sign-in and without owner identity', async () => {
    const env = await apiEnv();
    const owner = await makeUser(['technician'], { name: 'Ottoline Brisk' });
    const set = await makeSet({ ownerId: owner.id, label: 'Brisk family radio', customer: 'Ottoline Brisk', accessionNumber: 'ACC-1999-042', serial: 'QW3-55012' });
    const done = await makeSurvey({ setId: set.id, state: 'complete' });
    await addReading(done.id, { testPointKey: 'tp-r2', text: '300k', method: 'lead-lifted', liftedEnd: 1, enteredBy: owner.id });
    await addReading(done.id, { testPointKey: 'tp-r1', text: '10M', method: 'lead-lifted', liftedEnd: 1, enteredBy: owner.id });
    await makeSurvey({ setId: set.id }); // a draft: work in progress, not on the public page
    const ownerSession = await signIn(owner.email);
    await request(env.app).post(`/api/sets/${set.id}/parts-record`).set(bearer(ownerSession)).send({ componentKey: 'c-r2', action: 'replaced', reason: 'High.', newPart: { text: '240k' } }).expect(201);
    const label = await request(env.app).post(`/api/sets/${set.id}/labels`).set(bearer(ownerSession));

    const r = await request(env.app).get(`/api/public/labels/${label.body.token}`);
    expect(r.status).toBe(200);
    expect(r.headers['cache-control']).toBe('no-store');
    expect(r.body.chassis).toEqual({ maker: 'Quillmere Radio Co.', model: 'Wren 3', chassisNumber: 'QW-3', yearFrom: 1951, yearTo: 1953 });
    expect(r.body.serial).toBe('QW3-55012');
    expect(r.body.surveys.length).toBe(1);
    expect(r.body.surveys[0].counts).toEqual(jasmine.objectContaining({ out: 1, inBand: 1 }));
    expect(r.body.surveys[0].date).toBe(r.body.surveys[0].completedAt);
    expect(r.body.partsReplaced).toEqual([jasmine.objectContaining({ ref: 'R2', text: '240k' })]);
    expect(r.body.firstPowerAt).toBeNull();
    const text = JSON.stringify(r.body);
    for (const secret of ['Brisk', 'ACC-1999-042', owner.email, `"id":${owner.id}`, 'ownerId', 'recordedBy']) expect(text).withContext(secret).not.toContain(secret);
  });

  it('stops answering once revoked (404), like an unknown token; a revoked label cannot be revoked again (409)', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    const label = await request(env.app).post(`/api/sets/${set.id}/labels`).set(bearer(tech));
    await request(env.app).get(`/api/public/labels/${label.body.token}`).expect(200);
    const rev = await request(env.app).post(`/api/sets/${set.id}/labels/${label.body.id}/revoke`).set(bearer(tech));
    expect(rev.status).toBe(200);
    expect(rev.body.revokedAt).not.toBeNull();
    expect(rev.body.token).toBeNull();
    expect(rev.body.url).toBeNull();
    const gone = await request(env.app).get(`/api/public/labels/${label.body.token}`);
    expect(gone.status).toBe(404);
    const again = await request(env.app).post(`/api/sets/${set.id}/labels/${label.body.id}/revoke`).set(bearer(tech));
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('label-revoked');
    expect((await request(env.app).get(`/api/public/labels/${'x'.repeat(32)}`)).status).toBe(404);
    expect((await request(env.app).get('/api/public/labels/short')).status).toBe(400);
  });

  it('answers 404 to someone who may not see the set, for making, listing and revoking (nothing written)', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    const label = await request(env.app).post(`/api/sets/${set.id}/labels`).set(bearer(tech));
    const stranger = await userSession(['technician']);
    expect((await request(env.app).post(`/api/sets/${set.id}/labels`).set(bearer(stranger))).status).toBe(404);
    expect((await request(env.app).get(`/api/sets/${set.id}/labels`).set(bearer(stranger))).status).toBe(404);
    expect((await request(env.app).post(`/api/sets/${set.id}/labels/${label.body.id}/revoke`).set(bearer(stranger))).status).toBe(404);
    const rows = await labelRows(set.id);
    expect(rows.length).toBe(1);
    expect(rows[0].revokedAt).toBeNull();
  });
});
