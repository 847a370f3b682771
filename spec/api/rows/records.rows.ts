/**
 * Access-matrix and bad-input rows of the records routes (see ./index.ts): gates and first power,
 * bring-up log, parts record, replacement list and marks, history and compare, the record,
 * provenance labels and the export. Also the small direct-insert helpers the records specs share.
 *
 * Every set route follows `SEE_SET` (owner, shared-with users and admins; others' sets a 404).
 */
import { randomBytes } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { gateItemsFor } from '../../../api/domain/gates';
import type { PowerArrangement } from '../../../api/domain/template-format';
import { hashToken } from '../../../api/records/records.use-cases';
import { gateSignatures, provenanceLabels, sets } from '../../../schema/index';
import { apiEnv } from '../../support/api-env';
import { owned, type WriteRoute } from '../../support/bad-input-kit';
import { makeSet, makeSurvey } from '../../support/bench-fixtures';
import { ALL_OK, SIGNED_IN, type Caller, type Expect, type MatrixRequest } from '../../support/matrix-kit';
import { SEE_SET } from './sets.rows';

/** Signs every gate item of a set directly (the sample chassis is ac-dc: hot, nine items). */
export async function signAllGates(setId: number, by: number | null = null, power: PowerArrangement = 'ac-dc'): Promise<void> {
  const env = await apiEnv();
  const items = gateItemsFor({ power, hotChassis: null });
  await env.database.db.insert(gateSignatures).values(items.map((i) => ({ setId, itemKey: i.key, action: 'signed', note: '', signedBy: by })));
}

/** Records first power directly (for the bring-up log). */
export async function markFirstPower(setId: number, by: number | null = null): Promise<void> {
  const env = await apiEnv();
  await env.database.db.update(sets).set({ firstPowerAt: new Date(), firstPowerBy: by }).where(eq(sets.id, setId));
}

/** A live provenance label of a set, made directly: its id and token. */
export async function makeLabel(setId: number, by: number | null = null): Promise<{ id: number; token: string }> {
  const env = await apiEnv();
  const token = randomBytes(24).toString('base64url');
  const [row] = await env.database.db.insert(provenanceLabels).values({ setId, token, tokenHash: hashToken(token), createdBy: by }).returning({ id: provenanceLabels.id });
  return { id: row.id, token };
}

const setOf = async (ownerId?: number) => (await makeSet({ ownerId })).id;

export const RECORD_MATRIX: Record<string, Record<Caller, Expect>> = {
  'GET /api/sets/:id/gates': SEE_SET,
  'POST /api/sets/:id/gates/:itemKey/sign': SEE_SET,
  'POST /api/sets/:id/gates/:itemKey/reopen': SEE_SET,
  'POST /api/sets/:id/first-power': SEE_SET,
  'GET /api/sets/:id/bring-up': SEE_SET,
  'POST /api/sets/:id/bring-up': SEE_SET,
  'GET /api/sets/:id/parts-record': SEE_SET,
  'POST /api/sets/:id/parts-record': SEE_SET,
  'GET /api/sets/:id/replacements': SEE_SET,
  'PUT /api/sets/:id/replacements/:componentKey/marks': SEE_SET,
  'GET /api/sets/:id/history': SEE_SET,
  'GET /api/sets/:id/compare': SEE_SET,
  'GET /api/sets/:id/record': SEE_SET,
  'POST /api/sets/:id/labels': SEE_SET,
  'GET /api/sets/:id/labels': SEE_SET,
  'POST /api/sets/:id/labels/:labelId/revoke': SEE_SET,
  'GET /api/public/labels/:token': ALL_OK,
  'GET /api/export/sets': SIGNED_IN,
};

export const RECORD_REQUESTS: Record<string, MatrixRequest> = {
  'GET /api/sets/:id/gates': async (a, h, ownerId) => a.get(`/api/sets/${await setOf(ownerId)}/gates`).set(h),
  'POST /api/sets/:id/gates/:itemKey/sign': async (a, h, ownerId) => a.post(`/api/sets/${await setOf(ownerId)}/gates/load-connected/sign`).set(h).send({ note: 'Speaker on its plug.' }),
  'POST /api/sets/:id/gates/:itemKey/reopen': async (a, h, ownerId) => {
    const id = await setOf(ownerId);
    await signAllGates(id);
    return a.post(`/api/sets/${id}/gates/load-connected/reopen`).set(h).send({ note: 'Speaker unplugged for the cabinet work.' });
  },
  'POST /api/sets/:id/first-power': async (a, h, ownerId) => {
    const id = await setOf(ownerId);
    await signAllGates(id);
    return a.post(`/api/sets/${id}/first-power`).set(h).send({ note: 'Through a 60 W lamp.' });
  },
  'GET /api/sets/:id/bring-up': async (a, h, ownerId) => a.get(`/api/sets/${await setOf(ownerId)}/bring-up`).set(h),
  'POST /api/sets/:id/bring-up': async (a, h, ownerId) => {
    const id = await setOf(ownerId);
    await markFirstPower(id);
    return a.post(`/api/sets/${id}/bring-up`).set(h).send({ step: 'limiter-lamp', setting: '60 W lamp', mainsVolts: 118, currentAmps: 0.25 });
  },
  'GET /api/sets/:id/parts-record': async (a, h, ownerId) => a.get(`/api/sets/${await setOf(ownerId)}/parts-record`).set(h),
  'POST /api/sets/:id/parts-record': async (a, h, ownerId) => a.post(`/api/sets/${await setOf(ownerId)}/parts-record`).set(h).send({ componentKey: 'c-r1', action: 'kept', reason: 'In band at intake.' }),
  'GET /api/sets/:id/replacements': async (a, h, ownerId) => a.get(`/api/sets/${await setOf(ownerId)}/replacements`).set(h),
  'PUT /api/sets/:id/replacements/:componentKey/marks': async (a, h, ownerId) => a.put(`/api/sets/${await setOf(ownerId)}/replacements/c-r2/marks`).set(h).send({ ordered: true, received: false }),
  'GET /api/sets/:id/history': async (a, h, ownerId) => a.get(`/api/sets/${await setOf(ownerId)}/history`).set(h),
  'GET /api/sets/:id/compare': async (a, h, ownerId) => {
    const id = await setOf(ownerId);
    const s1 = await makeSurvey({ setId: id, state: 'complete' });
    const s2 = await makeSurvey({ setId: id });
    return a.get(`/api/sets/${id}/compare?a=${s1.id}&b=${s2.id}`).set(h);
  },
  'GET /api/sets/:id/record': async (a, h, ownerId) => a.get(`/api/sets/${await setOf(ownerId)}/record`).set(h),
  'POST /api/sets/:id/labels': async (a, h, ownerId) => a.post(`/api/sets/${await setOf(ownerId)}/labels`).set(h),
  'GET /api/sets/:id/labels': async (a, h, ownerId) => a.get(`/api/sets/${await setOf(ownerId)}/labels`).set(h),
  'POST /api/sets/:id/labels/:labelId/revoke': async (a, h, ownerId) => {
    const id = await setOf(ownerId);
    const l = await makeLabel(id);
    return a.post(`/api/sets/${id}/labels/${l.id}/revoke`).set(h);
  },
  'GET /api/public/labels/:token': async (a, h) => a.get(`/api/public/labels/${(await makeLabel(await setOf())).token}`).set(h),
  'GET /api/export/sets': async (a, h) => a.get('/api/export/sets?format=json').set(h),
};

export const RECORD_BAD_INPUT: Record<string, WriteRoute> = {
  'POST /api/sets/:id/gates/:itemKey/sign': owned(
    'post',
    async (o) => ({ path: `/api/sets/${(await makeSet({ ownerId: o.user.id })).id}/gates/fuse-in-hot-lead/sign`, body: { note: 'New 1 A fuse holder in the hot lead.' } }),
    [],
    // A signature may go without a note.
    ['note empty'],
    ['technician'],
  ),
  'POST /api/sets/:id/gates/:itemKey/reopen': owned(
    'post',
    async (o) => {
      const id = (await makeSet({ ownerId: o.user.id })).id;
      await signAllGates(id);
      return { path: `/api/sets/${id}/gates/fuse-in-hot-lead/reopen`, body: { note: 'Fuse holder cracked.' } };
    },
    [],
    [],
    ['technician'],
  ),
  'POST /api/sets/:id/first-power': owned(
    'post',
    async (o) => {
      const id = (await makeSet({ ownerId: o.user.id })).id;
      await signAllGates(id);
      return { path: `/api/sets/${id}/first-power`, body: { note: 'Lamp limiter, 60 W.' } };
    },
    [],
    ['note empty'],
    ['technician'],
  ),
  'POST /api/sets/:id/bring-up': owned(
    'post',
    async (o) => {
      const id = (await makeSet({ ownerId: o.user.id })).id;
      await markFirstPower(id);
      return {
        path: `/api/sets/${id}/bring-up`,
        body: { step: 'variac', setting: 'variac 50 %', mainsVolts: 60, currentAmps: 0.12, bPlus: [{ node: 'B+', volts: 45 }], observations: ['hum'], note: 'Hum at low volts.' },
      };
    },
    ['setting', 'mainsVolts', 'currentAmps', 'bPlus', 'observations', 'note'],
    // Empty text and an empty list are "nothing to say"; a null reading is "not measured"; the setting is free text (stored, never run).
    ['setting with SQL injection', 'setting empty', 'note empty', 'bPlus empty', 'observations empty', 'mainsVolts as null', 'currentAmps as null'],
    ['technician'],
  ),
  'POST /api/sets/:id/parts-record': owned(
    'post',
    async (o) => ({
      path: `/api/sets/${(await makeSet({ ownerId: o.user.id })).id}/parts-record`,
      body: { componentKey: 'c-r2', action: 'replaced', newPart: { text: '270k', watts: 0.5, kind: 'carbon-film', measuredText: '268k' }, reason: 'Read 420 kΩ with a lead lifted.', note: 'Original kept in the bag.' },
    }),
    // Without a note the line is whole; without the new part or a reason (no reading given) it is refused.
    ['note'],
    ['note empty'],
    ['technician'],
  ),
  'PUT /api/sets/:id/replacements/:componentKey/marks': owned(
    'put',
    async (o) => ({ path: `/api/sets/${(await makeSet({ ownerId: o.user.id })).id}/replacements/c-r2/marks`, body: { ordered: true, received: true } }),
    [],
    [],
    ['technician'],
  ),
};
