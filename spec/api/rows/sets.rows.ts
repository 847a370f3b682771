/**
 * Access-matrix and bad-input rows of the bench's core routes: meter profiles, sets, surveys,
 * readings and lifted leads (see ./index.ts).
 *
 * Sets are seen and edited by their owner, the users they are shared with and admins; anyone
 * else gets a 404 (`SEE_SET`: "own" is a set of the caller's, "others" one of another user's).
 * Meter profiles are personal: someone else's is a 404 for everyone, admins included.
 */
import type { WriteRoute } from '../../support/bad-input-kit';
import { owned } from '../../support/bad-input-kit';
import { makeUser } from '../../support/api-env';
import { addReading, clientKey, makeLiftedLead, makeMeterProfile, makeSet, makeSurvey } from '../../support/bench-fixtures';
import { workedMeter } from '../../support/meters';
import { SIGNED_IN, type Caller, type Expect, type MatrixRequest } from '../../support/matrix-kit';
import { makeTemplate } from '../../support/template-fixtures';

/** A set's own routes: owner and admin (and shared-with users, see sets.spec.ts) pass; others' sets are a 404. */
export const SEE_SET: Record<Caller, Expect> = {
  anonymous: 401,
  admin: { own: 'ok', others: 'ok' },
  author: { own: 'ok', others: 404 },
  technician: { own: 'ok', others: 404 },
  instructor: { own: 'ok', others: 404 },
  student: { own: 'ok', others: 404 },
};
/** Personal records (meter profiles): only their owner, never an admin. */
export const OWN_ONLY: Record<Caller, Expect> = {
  anonymous: 401,
  admin: { own: 'ok', others: 404 },
  author: { own: 'ok', others: 404 },
  technician: { own: 'ok', others: 404 },
  instructor: { own: 'ok', others: 404 },
  student: { own: 'ok', others: 404 },
};
const MAKE_SET: Record<Caller, Expect> = { anonymous: 401, admin: 'ok', author: 403, technician: 'ok', instructor: 'ok', student: 403 };

export const SET_MATRIX: Record<string, Record<Caller, Expect>> = {
  'GET /api/meter-profiles': SIGNED_IN,
  'POST /api/meter-profiles': SIGNED_IN,
  'GET /api/meter-profiles/:id': OWN_ONLY,
  'PUT /api/meter-profiles/:id': OWN_ONLY,
  'DELETE /api/meter-profiles/:id': OWN_ONLY,
  'GET /api/sets': SIGNED_IN,
  'POST /api/sets': MAKE_SET,
  'GET /api/sets/:id': SEE_SET,
  'PATCH /api/sets/:id': SEE_SET,
  'PUT /api/sets/:id/sharing': SEE_SET,
  'PUT /api/sets/:id/tube-records/:socketKey': SEE_SET,
  'GET /api/sets/:id/surveys': SEE_SET,
  'POST /api/sets/:id/surveys': SEE_SET,
  'GET /api/surveys/:id': SEE_SET,
  'PATCH /api/surveys/:id': SEE_SET,
  'POST /api/surveys/:id/meter-check': SEE_SET,
  'POST /api/surveys/:id/readings': SEE_SET,
  'PATCH /api/surveys/:id/readings/:readingId': SEE_SET,
  'POST /api/surveys/:id/complete': SEE_SET,
  'POST /api/surveys/:id/amendments': SEE_SET,
  'POST /api/surveys/:id/joint-checks': SEE_SET,
  'POST /api/surveys/:id/lifted-leads': SEE_SET,
  'GET /api/sets/:id/lifted-leads': SEE_SET,
  'POST /api/sets/:id/lifted-leads/:leadId/resolder': SEE_SET,
};

const meterBody = () => ({ name: 'Matrix meter', profile: workedMeter({ autorange: true }), checkResistorOhms: 10000, checkResistorTolerancePct: 1 });
/** A public template with a published version: every signed-in user may build a set on it. */
let publicTemplate: Promise<number> | null = null;
const openTemplate = () => (publicTemplate ??= makeTemplate({ published: 1, visibility: 'public' }).then((t) => t.id));
const ownerOf = async (ownerId?: number) => ownerId ?? (await makeUser(['technician'])).id;

export const SET_REQUESTS: Record<string, MatrixRequest> = {
  'GET /api/meter-profiles': async (a, h) => a.get('/api/meter-profiles').set(h),
  'POST /api/meter-profiles': async (a, h) => a.post('/api/meter-profiles').set(h).send(meterBody()),
  'GET /api/meter-profiles/:id': async (a, h, ownerId) => a.get(`/api/meter-profiles/${(await makeMeterProfile({ ownerId: await ownerOf(ownerId) })).id}`).set(h),
  'PUT /api/meter-profiles/:id': async (a, h, ownerId) =>
    a
      .put(`/api/meter-profiles/${(await makeMeterProfile({ ownerId: await ownerOf(ownerId) })).id}`)
      .set(h)
      .send({ ...meterBody(), version: 1 }),
  'DELETE /api/meter-profiles/:id': async (a, h, ownerId) => a.delete(`/api/meter-profiles/${(await makeMeterProfile({ ownerId: await ownerOf(ownerId) })).id}`).set(h),
  'GET /api/sets': async (a, h) => a.get('/api/sets?q=spec&pageSize=5').set(h),
  'POST /api/sets': async (a, h) => a.post('/api/sets').set(h).send({ templateId: await openTemplate(), label: 'Matrix intake', serial: 'M-1' }),
  'GET /api/sets/:id': async (a, h, ownerId) => a.get(`/api/sets/${(await makeSet({ ownerId: await ownerOf(ownerId) })).id}`).set(h),
  'PATCH /api/sets/:id': async (a, h, ownerId) => a.patch(`/api/sets/${(await makeSet({ ownerId: await ownerOf(ownerId) })).id}`).set(h).send({ version: 1, jobStatus: 'surveying' }),
  'PUT /api/sets/:id/sharing': async (a, h, ownerId) =>
    a
      .put(`/api/sets/${(await makeSet({ ownerId: await ownerOf(ownerId) })).id}/sharing`)
      .set(h)
      .send({ userIds: [(await makeUser(['technician'])).id] }),
  'PUT /api/sets/:id/tube-records/:socketKey': async (a, h, ownerId) =>
    a.put(`/api/sets/${(await makeSet({ ownerId: await ownerOf(ownerId) })).id}/tube-records/so-v1`).set(h).send({ status: 'present', testResult: '80 % of new' }),
  'GET /api/sets/:id/surveys': async (a, h, ownerId) => {
    const s = await makeSurvey({ ownerId: await ownerOf(ownerId) });
    return a.get(`/api/sets/${s.setId}/surveys`).set(h);
  },
  'POST /api/sets/:id/surveys': async (a, h, ownerId) => a.post(`/api/sets/${(await makeSet({ ownerId: await ownerOf(ownerId) })).id}/surveys`).set(h).send({ purpose: 'intake' }),
  'GET /api/surveys/:id': async (a, h, ownerId) => a.get(`/api/surveys/${(await makeSurvey({ ownerId: await ownerOf(ownerId) })).id}`).set(h),
  'PATCH /api/surveys/:id': async (a, h, ownerId) => a.patch(`/api/surveys/${(await makeSurvey({ ownerId: await ownerOf(ownerId) })).id}`).set(h).send({ version: 1, purpose: 'periodic' }),
  'POST /api/surveys/:id/meter-check': async (a, h, ownerId) => a.post(`/api/surveys/${(await makeSurvey({ ownerId: await ownerOf(ownerId) })).id}/meter-check`).set(h).send({ text: '10.03k' }),
  'POST /api/surveys/:id/readings': async (a, h, ownerId) =>
    a
      .post(`/api/surveys/${(await makeSurvey({ ownerId: await ownerOf(ownerId) })).id}/readings`)
      .set(h)
      .send({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '252k' }),
  'PATCH /api/surveys/:id/readings/:readingId': async (a, h, ownerId) => {
    const s = await makeSurvey({ ownerId: await ownerOf(ownerId) });
    const r = await addReading(s.id, { text: '250k' });
    return a.patch(`/api/surveys/${s.id}/readings/${r}`).set(h).send({ version: 1, text: '262k' });
  },
  'POST /api/surveys/:id/complete': async (a, h, ownerId) => a.post(`/api/surveys/${(await makeSurvey({ ownerId: await ownerOf(ownerId) })).id}/complete`).set(h),
  'POST /api/surveys/:id/amendments': async (a, h, ownerId) => {
    const s = await makeSurvey({ ownerId: await ownerOf(ownerId), state: 'complete' });
    const r = await addReading(s.id, { text: '250k' });
    return a.post(`/api/surveys/${s.id}/amendments`).set(h).send({ readingId: r, reason: 'Misread the range', change: { text: '25k' } });
  },
  'POST /api/surveys/:id/joint-checks': async (a, h, ownerId) =>
    a
      .post(`/api/surveys/${(await makeSurvey({ ownerId: await ownerOf(ownerId) })).id}/joint-checks`)
      .set(h)
      .send({ testPointKey: 'tp-r2', checked: true }),
  'POST /api/surveys/:id/lifted-leads': async (a, h, ownerId) =>
    a
      .post(`/api/surveys/${(await makeSurvey({ ownerId: await ownerOf(ownerId) })).id}/lifted-leads`)
      .set(h)
      .send({ componentKey: 'c-r2', end: 1 }),
  'GET /api/sets/:id/lifted-leads': async (a, h, ownerId) => {
    const s = await makeSet({ ownerId: await ownerOf(ownerId) });
    await makeLiftedLead(s.id);
    return a.get(`/api/sets/${s.id}/lifted-leads`).set(h);
  },
  'POST /api/sets/:id/lifted-leads/:leadId/resolder': async (a, h, ownerId) => {
    const s = await makeSet({ ownerId: await ownerOf(ownerId) });
    const lead = await makeLiftedLead(s.id);
    return a.post(`/api/sets/${s.id}/lifted-leads/${lead}/resolder`).set(h).send({ note: 'Joint remade' });
  },
};

const TECH = ['technician'] as const;
/** A write on a survey of the caller's own (draft unless `state` says otherwise). */
const onSurvey = (method: WriteRoute['method'], suffix: string, body: () => Record<string, unknown>, optional?: string[], accepts?: string[], state: 'draft' | 'complete' = 'draft') =>
  owned(
    method,
    async (o) => {
      const s = await makeSurvey({ ownerId: o.user.id, state });
      return { path: `/api/surveys/${s.id}${suffix}`, body: body() };
    },
    optional,
    accepts,
    [...TECH],
  );

export const SET_BAD_INPUT: Record<string, WriteRoute> = {
  'POST /api/meter-profiles': owned('post', async () => ({ path: '/api/meter-profiles', body: meterBody() }), ['checkResistorOhms', 'checkResistorTolerancePct'], ['checkResistorOhms as null', 'checkResistorTolerancePct as null'], [...TECH]),
  'PUT /api/meter-profiles/:id': owned(
    'put',
    async (o) => ({ path: `/api/meter-profiles/${(await makeMeterProfile({ ownerId: o.user.id })).id}`, body: { ...meterBody(), version: 1 } }),
    ['checkResistorOhms', 'checkResistorTolerancePct'],
    ['checkResistorOhms as null', 'checkResistorTolerancePct as null'],
    [...TECH],
  ),
  'POST /api/sets': owned(
    'post',
    async (o) => ({ path: '/api/sets', body: { templateId: (await makeTemplate({ ownerId: o.user.id, published: 1 })).id, label: 'Bad input intake' } }),
    undefined,
    undefined,
    [...TECH],
  ),
  'PATCH /api/sets/:id': owned('patch', async (o) => ({ path: `/api/sets/${(await makeSet({ ownerId: o.user.id })).id}`, body: { version: 1, label: 'Renamed at the bench' } }), undefined, undefined, [...TECH]),
  'PUT /api/sets/:id/sharing': owned(
    'put',
    async (o) => ({ path: `/api/sets/${(await makeSet({ ownerId: o.user.id })).id}/sharing`, body: { userIds: [(await makeUser(['technician'])).id] } }),
    undefined,
    // An empty list unshares everyone: a valid request.
    ['userIds empty'],
    [...TECH],
  ),
  'PUT /api/sets/:id/tube-records/:socketKey': owned('put', async (o) => ({ path: `/api/sets/${(await makeSet({ ownerId: o.user.id })).id}/tube-records/so-v1`, body: { status: 'present' } }), undefined, undefined, [...TECH]),
  'POST /api/sets/:id/surveys': owned('post', async (o) => ({ path: `/api/sets/${(await makeSet({ ownerId: o.user.id })).id}/surveys`, body: { purpose: 'intake' } }), undefined, undefined, [...TECH]),
  'PATCH /api/surveys/:id': onSurvey('patch', '', () => ({ version: 1, purpose: 'periodic' })),
  'POST /api/surveys/:id/meter-check': onSurvey('post', '/meter-check', () => ({ text: '10.03k' })),
  'POST /api/surveys/:id/readings': onSurvey('post', '/readings', () => ({ testPointKey: 'tp-r2', clientKey: clientKey(), text: '252k' })),
  'PATCH /api/surveys/:id/readings/:readingId': owned(
    'patch',
    async (o) => {
      const s = await makeSurvey({ ownerId: o.user.id });
      return { path: `/api/surveys/${s.id}/readings/${await addReading(s.id, { text: '250k' })}`, body: { version: 1, text: '262k' } };
    },
    undefined,
    undefined,
    [...TECH],
  ),
  'POST /api/surveys/:id/amendments': owned(
    'post',
    async (o) => {
      const s = await makeSurvey({ ownerId: o.user.id, state: 'complete' });
      const r = await addReading(s.id, { text: '250k' });
      return { path: `/api/surveys/${s.id}/amendments`, body: { readingId: r, reason: 'Misread the range', change: { text: '25k' } } };
    },
    undefined,
    undefined,
    [...TECH],
  ),
  'POST /api/surveys/:id/joint-checks': onSurvey('post', '/joint-checks', () => ({ testPointKey: 'tp-r2', checked: true })),
  'POST /api/surveys/:id/lifted-leads': onSurvey('post', '/lifted-leads', () => ({ componentKey: 'c-r2', end: 1 })),
  'POST /api/sets/:id/lifted-leads/:leadId/resolder': owned(
    'post',
    async (o) => {
      const s = await makeSet({ ownerId: o.user.id });
      return { path: `/api/sets/${s.id}/lifted-leads/${await makeLiftedLead(s.id)}/resolder`, body: { note: 'Joint remade, lead dressed' } };
    },
    undefined,
    undefined,
    [...TECH],
  ),
};
