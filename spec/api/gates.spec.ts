/**
 * Safety gates, "ready for first power" and the bring-up log (DESIGN.md §2 "safety gates",
 * "lifted-lead list"; issue 5): the API refuses first power (409, nothing written) while a gate item
 * or a lifted lead is open, each refusal beside the request that succeeds once the item is signed or
 * the lead re-soldered.
 */
import { and, eq } from 'drizzle-orm';
import request from 'supertest';
import { bringUpEntries, gateSignatures, sets } from '../../schema/index';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';
import { makeLiftedLead, makeSet } from '../support/bench-fixtures';
import { markFirstPower, signAllGates } from './rows/records.rows';

// check-values.md §5 "Safety before first power-up": an ac-dc set is hot, so the isolation items join the mains items.
const HOT_SET_ITEMS = [
  'load-connected',
  'filter-caps-discharged',
  'line-caps-xy-rated',
  'fuse-in-hot-lead',
  'mains-cord-and-plug',
  'limiter-or-variac-ready',
  'isolation-transformer',
  'controls-insulated',
  'chassis-cabinet-insulation',
];

async function counts(setId: number) {
  const env = await apiEnv();
  const db = env.database.db;
  const gates = await db.select().from(gateSignatures).where(eq(gateSignatures.setId, setId));
  const [set] = await db.select({ firstPowerAt: sets.firstPowerAt }).from(sets).where(eq(sets.id, setId));
  const bringUp = await db.select().from(bringUpEntries).where(eq(bringUpEntries.setId, setId));
  return { gates: gates.length, firstPowerAt: set.firstPowerAt, bringUp: bringUp.length };
}

describe('Safety gates', () => {
  let tech: Session & { id: number };
  beforeAll(async () => {
    tech = await userSession(['technician']);
  });

  it('lists the items of a hot-chassis set, each open, with a caution that defers to local codes and never calls the set safe', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    const r = await request(env.app).get(`/api/sets/${set.id}/gates`).set(bearer(tech));
    expect(r.status).toBe(200);
    expect(r.body.items.map((i: { key: string }) => i.key)).toEqual(HOT_SET_ITEMS);
    expect(r.body.kind).toEqual({ power: 'ac-dc', hotChassis: true });
    for (const i of r.body.items) {
      expect(i.open).withContext(i.key).toBeTrue();
      expect(i.latest).toBeNull();
      expect(i.caution).toMatch(/local electrical codes and licensed practice/);
    }
    expect(JSON.stringify(r.body)).not.toMatch(/\bsafe\b/i);
    expect(r.body.notice).toMatch(/not a certification/);
    expect(r.body.firstPower).toBeNull();
    expect(r.body.blockers.length).toBe(HOT_SET_ITEMS.length);
  });

  it('signs an item as an append-only record of who and when; signing it again is a 409 that writes nothing', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    const r = await request(env.app).post(`/api/sets/${set.id}/gates/load-connected/sign`).set(bearer(tech)).send({ note: 'Speaker plugged in.' });
    expect(r.status).toBe(201);
    const item = r.body.items.find((i: { key: string }) => i.key === 'load-connected');
    expect(item.open).toBeFalse();
    expect(item.latest).toEqual(jasmine.objectContaining({ action: 'signed', note: 'Speaker plugged in.', by: { id: tech.id, name: tech.user.name } }));
    expect((await counts(set.id)).gates).toBe(1);

    const again = await request(env.app).post(`/api/sets/${set.id}/gates/load-connected/sign`).set(bearer(tech)).send({ note: '' });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('gate-already-signed');
    expect((await counts(set.id)).gates).toBe(1);
  });

  it('re-opens a signed item with a reason (a new record; the signature stays in the history); re-opening an open one is a 409', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    const open = await request(env.app).post(`/api/sets/${set.id}/gates/fuse-in-hot-lead/reopen`).set(bearer(tech)).send({ note: 'Why not' });
    expect(open.status).toBe(409);
    expect(open.body.error.code).toBe('gate-not-signed');
    expect((await counts(set.id)).gates).toBe(0);

    await request(env.app).post(`/api/sets/${set.id}/gates/fuse-in-hot-lead/sign`).set(bearer(tech)).send({ note: '' }).expect(201);
    const noReason = await request(env.app).post(`/api/sets/${set.id}/gates/fuse-in-hot-lead/reopen`).set(bearer(tech)).send({ note: '' });
    expect(noReason.status).toBe(400);
    const r = await request(env.app).post(`/api/sets/${set.id}/gates/fuse-in-hot-lead/reopen`).set(bearer(tech)).send({ note: 'Holder cracked on refitting.' });
    expect(r.status).toBe(201);
    expect(r.body.items.find((i: { key: string }) => i.key === 'fuse-in-hot-lead').open).toBeTrue();
    expect(r.body.history.map((h: { action: string }) => h.action)).toEqual(['signed', 'reopened']);
  });

  it('answers 404 for an item that is not on this set\u2019s list (a battery item on a mains set), and signs one that is', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    const r = await request(env.app).post(`/api/sets/${set.id}/gates/battery-supply-checked/sign`).set(bearer(tech)).send({ note: '' });
    expect(r.status).toBe(404);
    expect(r.body.error.code).toBe('no-such-gate-item');
    await request(env.app).post(`/api/sets/${set.id}/gates/isolation-transformer/sign`).set(bearer(tech)).send({ note: '' }).expect(201);
  });

  it('lets a user the set is shared with sign, and answers 404 to a stranger (nothing written)', async () => {
    const env = await apiEnv();
    const friend = await userSession(['technician']);
    const stranger = await userSession(['technician']);
    const set = await makeSet({ ownerId: tech.id, sharedWith: [friend.id] });
    const no = await request(env.app).post(`/api/sets/${set.id}/gates/load-connected/sign`).set(bearer(stranger)).send({ note: '' });
    expect(no.status).toBe(404);
    expect((await counts(set.id)).gates).toBe(0);
    const yes = await request(env.app).post(`/api/sets/${set.id}/gates/load-connected/sign`).set(bearer(friend)).send({ note: '' });
    expect(yes.status).toBe(201);
  });
});

describe('Ready for first power', () => {
  let tech: Session & { id: number };
  beforeAll(async () => {
    tech = await userSession(['technician']);
  });

  it('is refused (409, nothing written) while a gate item is open, naming it; recorded once every item is signed', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    for (const key of HOT_SET_ITEMS.filter((k) => k !== 'isolation-transformer')) {
      await request(env.app).post(`/api/sets/${set.id}/gates/${key}/sign`).set(bearer(tech)).send({ note: '' }).expect(201);
    }
    const before = await counts(set.id);
    const refused = await request(env.app).post(`/api/sets/${set.id}/first-power`).set(bearer(tech)).send({ note: 'Lamp limiter ready.' });
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('first-power-blocked');
    expect(refused.body.error.message).toContain('Isolation transformer in use at the bench');
    expect(refused.body.error.details.blockers).toEqual([{ kind: 'gate-item', itemKey: 'isolation-transformer', title: 'Isolation transformer in use at the bench' }]);
    expect(await counts(set.id)).toEqual(before);
    expect(before.firstPowerAt).toBeNull();

    await request(env.app).post(`/api/sets/${set.id}/gates/isolation-transformer/sign`).set(bearer(tech)).send({ note: '' }).expect(201);
    const ok = await request(env.app).post(`/api/sets/${set.id}/first-power`).set(bearer(tech)).send({ note: 'Lamp limiter ready.' });
    expect(ok.status).toBe(201);
    expect(ok.body.firstPower).toEqual(jasmine.objectContaining({ by: { id: tech.id, name: tech.user.name }, note: 'Lamp limiter ready.' }));
    expect(ok.body.blockers).toEqual([]);
    expect((await counts(set.id)).firstPowerAt).not.toBeNull();
  });

  it('is refused (409, nothing written) while a lifted lead is open, even with every gate signed; recorded once the lead is re-soldered', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    await signAllGates(set.id, tech.id);
    const leadId = await makeLiftedLead(set.id, { componentKey: 'c-r2', componentRef: 'R2', end: 1, node: 'B+1', liftedBy: tech.id });
    const before = await counts(set.id);
    const refused = await request(env.app).post(`/api/sets/${set.id}/first-power`).set(bearer(tech)).send({ note: '' });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toContain('R2 (end at B+1)');
    expect(refused.body.error.details.blockers).toEqual([{ kind: 'lifted-lead', leadId, componentRef: 'R2', end: 1, node: 'B+1' }]);
    expect(await counts(set.id)).toEqual(before);

    const gates = await request(env.app).get(`/api/sets/${set.id}/gates`).set(bearer(tech));
    expect(gates.body.openLiftedLeads.map((l: { id: number }) => l.id)).toEqual([leadId]);

    await request(env.app).post(`/api/sets/${set.id}/lifted-leads/${leadId}/resolder`).set(bearer(tech)).send({ note: 'Re-soldered, joint reflowed.' }).expect(200);
    const ok = await request(env.app).post(`/api/sets/${set.id}/first-power`).set(bearer(tech)).send({ note: '' });
    expect(ok.status).toBe(201);
    expect(ok.body.openLiftedLeads).toEqual([]);
  });

  it('is refused a second time (409) once recorded, and the first record stays', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    await signAllGates(set.id);
    await request(env.app).post(`/api/sets/${set.id}/first-power`).set(bearer(tech)).send({ note: 'First.' }).expect(201);
    const first = await counts(set.id);
    const again = await request(env.app).post(`/api/sets/${set.id}/first-power`).set(bearer(tech)).send({ note: 'Second.' });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('first-power-recorded');
    expect(await counts(set.id)).toEqual(first);
  });
});

describe('Bring-up log', () => {
  let tech: Session & { id: number };
  beforeAll(async () => {
    tech = await userSession(['technician']);
  });

  it('is refused (409, nothing written) before first power is recorded, and takes steps after', async () => {
    const env = await apiEnv();
    const set = await makeSet({ ownerId: tech.id });
    const step = { step: 'limiter-lamp', setting: '60 W lamp', mainsVolts: 118, currentAmps: 0.22, bPlus: [{ node: 'B+', volts: 112 }], observations: ['hum'], note: 'Lamp glows dimly, then settles.' };
    const refused = await request(env.app).post(`/api/sets/${set.id}/bring-up`).set(bearer(tech)).send(step);
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('first-power-not-recorded');
    expect((await counts(set.id)).bringUp).toBe(0);

    await markFirstPower(set.id, tech.id);
    const ok = await request(env.app).post(`/api/sets/${set.id}/bring-up`).set(bearer(tech)).send(step);
    expect(ok.status).toBe(201);
    expect(ok.body).toEqual(jasmine.objectContaining({ step: 'limiter-lamp', mainsVolts: 118, currentAmps: 0.22, bPlus: [{ node: 'B+', volts: 112 }], observations: ['hum'], recordedBy: { id: tech.id, name: tech.user.name } }));
    await request(env.app).post(`/api/sets/${set.id}/bring-up`).set(bearer(tech)).send({ step: 'direct', observations: ['normal'] }).expect(201);
    const list = await request(env.app).get(`/api/sets/${set.id}/bring-up`).set(bearer(tech));
    expect(list.status).toBe(200);
    expect(list.body.map((e: { step: string }) => e.step)).toEqual(['limiter-lamp', 'direct']);
    const env2 = await apiEnv();
    const rows = await env2.database.db.select().from(bringUpEntries).where(and(eq(bringUpEntries.setId, set.id), eq(bringUpEntries.step, 'direct')));
    expect(rows[0].observations).toEqual(['normal']);
  });
});
