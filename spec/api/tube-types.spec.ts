/** The shared tube-type library: read by anyone signed in, added by authors and admins, changed by its creator or an admin. */
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { tubeTypes } from '../../schema/index';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';

type Caller = Session & { id: number };
import { TRIODE_PINS, uniqueDesignation } from '../support/template-fixtures';

describe('Tube types', () => {
  let author: Caller;
  let otherAuthor: Caller;
  let tech: Caller;
  let admin: Caller;
  beforeAll(async () => {
    author = await userSession(['author']);
    otherAuthor = await userSession(['author']);
    tech = await userSession(['technician']);
    admin = await userSession(['admin']);
  });

  // A 6V6-style octal beam power tube (pin 1 shell, 2-7 heater, 3 plate, 4 screen, 5 grid 1,
  // 8 cathode; 6 no connection) — pinout from memory, check against a tube manual.
  const octal = (designation: string) => ({
    designation,
    base: 'octal',
    heating: 'indirect',
    heaterVolts: 6.3,
    heaterAmps: 0.45,
    pins: [
      { pin: 1, electrode: 's', label: 'shell' },
      { pin: 2, electrode: 'h', label: 'heater' },
      { pin: 3, electrode: 'p', label: 'plate' },
      { pin: 4, electrode: 'g2', label: 'screen' },
      { pin: 5, electrode: 'g1', label: 'grid 1' },
      { pin: 6, electrode: 'NC', label: 'no connection' },
      { pin: 7, electrode: 'h', label: 'heater' },
      { pin: 8, electrode: 'k', label: 'cathode' },
    ],
    notes: 'Beam power output.',
  });

  it('an author adds a tube type (stored upper-case); anyone signed in reads and finds it; a second add of the same designation is 409', async () => {
    const env = await apiEnv();
    const d = uniqueDesignation();
    const r = await request(env.app).post('/api/tube-types').set(bearer(author)).send(octal(d.toLowerCase()));
    expect(r.status).toBe(201);
    expect(r.body.designation).toBe(d);
    expect(r.body.ties).toEqual([]);
    expect(r.body.createdBy).toEqual({ id: author.id, name: author.user.name });
    const [row] = await env.database.db.select().from(tubeTypes).where(eq(tubeTypes.designation, d));
    expect(row.heaterAmps).toBe(0.45);
    const read = await request(env.app).get(`/api/tube-types/${d.toLowerCase()}`).set(bearer(tech));
    expect(read.status).toBe(200);
    expect(read.body.pins.length).toBe(8);
    expect(read.body.canEdit).toBe(false);
    const found = await request(env.app).get(`/api/tube-types?q=${d.slice(5)}`).set(bearer(tech));
    expect(found.body.items.map((t: { designation: string }) => t.designation)).toEqual([d]);
    const again = await request(env.app).post('/api/tube-types').set(bearer(otherAuthor)).send(octal(d));
    expect(again.status).toBe(409);
    expect((await request(env.app).get('/api/tube-types/SPEC-NOT-THERE').set(bearer(tech))).status).toBe(404);
  });

  it('a technician may not add one (403) nor anonymous (401); an admin may (201)', async () => {
    const env = await apiEnv();
    expect((await request(env.app).post('/api/tube-types').set(bearer(tech)).send(octal(uniqueDesignation()))).status).toBe(403);
    expect((await request(env.app).post('/api/tube-types').send(octal(uniqueDesignation()))).status).toBe(401);
    expect((await request(env.app).post('/api/tube-types').set(bearer(admin)).send(octal(uniqueDesignation()))).status).toBe(201);
  });

  it('only its creator or an admin changes a tube type: another author 403; the creator and an admin 200', async () => {
    const env = await apiEnv();
    const d = uniqueDesignation();
    await request(env.app).post('/api/tube-types').set(bearer(author)).send(octal(d));
    const { designation: _d, ...record } = octal(d);
    const changed = { ...record, heaterAmps: 0.5, ties: [[1, 6]] };
    expect((await request(env.app).put(`/api/tube-types/${d}`).set(bearer(otherAuthor)).send(changed)).status).toBe(403);
    expect((await request(env.app).put(`/api/tube-types/${d}`).set(bearer(tech)).send(changed)).status).toBe(403);
    const own = await request(env.app).put(`/api/tube-types/${d}`).set(bearer(author)).send(changed);
    expect(own.status).toBe(200);
    expect(own.body.ties).toEqual([[1, 6]]);
    const byAdmin = await request(env.app).put(`/api/tube-types/${d}`).set(bearer(admin)).send({ ...changed, heaterAmps: 0.45 });
    expect(byAdmin.status).toBe(200);
    const [row] = await env.database.db.select().from(tubeTypes).where(eq(tubeTypes.designation, d));
    expect(row.heaterAmps).toBe(0.45);
    expect((await request(env.app).put('/api/tube-types/SPEC-NOT-THERE').set(bearer(admin)).send(changed)).status).toBe(404);
  });

  it('refuses pins beyond the base, a pin twice, an IC pin in a tie and a missing heater, each with its path', async () => {
    const env = await apiEnv();
    const d = uniqueDesignation();
    const bad = {
      ...octal(d),
      base: 'miniature-7',
      pins: [...octal(d).pins.filter((p) => p.electrode !== 'h'), { pin: 2, electrode: 'IC', label: 'internal' }, { pin: 4, electrode: 'NC', label: 'again' }],
      ties: [[2, 1]],
    };
    const r = await request(env.app).post('/api/tube-types').set(bearer(author)).send(bad);
    expect(r.status).toBe(400);
    const paths = r.body.error.details.problems.map((p: { path: string }) => p.path);
    expect(paths).toEqual(jasmine.arrayWithExactContents(['pins[5].pin', 'pins[7].pin', 'pins', 'ties[0][0]']));
    expect((await env.database.db.select().from(tubeTypes).where(eq(tubeTypes.designation, d))).length).toBe(0);
    const ok = await request(env.app)
      .post('/api/tube-types')
      .set(bearer(author))
      .send({ designation: d, base: 'miniature-7', heating: 'indirect', heaterVolts: 12.6, heaterAmps: 0.15, pins: TRIODE_PINS });
    expect(ok.status).toBe(201);
  });

  it('a directly heated tube needs filament pins', async () => {
    const env = await apiEnv();
    const d = uniqueDesignation();
    // A 1T4-style battery pentode: filament on pins 1 and 7 (from memory, check against a tube manual).
    const pins = [
      { pin: 1, electrode: 'f', label: 'filament −' },
      { pin: 2, electrode: 'p', label: 'plate' },
      { pin: 3, electrode: 'g2', label: 'screen' },
      { pin: 4, electrode: 'g3', label: 'suppressor' },
      { pin: 5, electrode: 'g1', label: 'grid 1' },
      { pin: 6, electrode: 'g3', label: 'suppressor' },
      { pin: 7, electrode: 'f', label: 'filament +' },
    ];
    const wrong = await request(env.app).post('/api/tube-types').set(bearer(author)).send({ designation: d, base: 'miniature-7', heating: 'indirect', heaterVolts: 1.4, heaterAmps: 0.05, pins });
    expect([wrong.status, wrong.body.error.details.field]).toEqual([400, 'pins']);
    const right = await request(env.app).post('/api/tube-types').set(bearer(author)).send({ designation: d, base: 'miniature-7', heating: 'direct', heaterVolts: 1.4, heaterAmps: 0.05, pins });
    expect(right.status).toBe(201);
  });
});
