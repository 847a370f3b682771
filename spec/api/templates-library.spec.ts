/** The template library: search, filters, sort and server-side pagination over what the caller may see. */
import { randomBytes } from 'node:crypto';
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { chassisTemplates } from '../../schema/index';
import type { ChassisKind } from '../../api/domain/template-format';
import { apiEnv, bearer, makeUser, signIn, userSession, type Session } from '../support/api-env';

type Caller = Session & { id: number };
import { makeTubeType, sampleDocument, specTube } from '../support/template-fixtures';

describe('Template library', () => {
  const tok = randomBytes(5).toString('hex');
  let author: Caller;
  let other: Caller;
  let viewer: Caller;
  let secondTube: string;
  const ids: Record<string, number> = {};

  /** Imports, publishes `versions` times, makes public and sets the use count. */
  async function add(name: string, s: Session, o: { maker: string; model: string; chassisNumber: string; kind: ChassisKind; tube?: string; versions?: number; uses?: number; visibility?: 'public' | 'private' }) {
    const env = await apiEnv();
    const doc = sampleDocument(o.tube ?? (await specTube()), o.maker, o.model);
    doc.chassis.chassisNumber = o.chassisNumber;
    doc.chassis.kind = o.kind;
    const r = await request(env.app).post('/api/templates/import').set(bearer(s)).send({ document: doc });
    expect(r.status).withContext(JSON.stringify(r.body)).toBe(201);
    let revision = r.body.revision as number;
    for (let n = 1; n <= (o.versions ?? 1); n++) {
      if (n > 1) {
        doc.components[1].tolerancePct = 10 - n;
        revision = (await request(env.app).put(`/api/templates/${r.body.id}/draft`).set(bearer(s)).send({ revision, content: doc })).body.revision;
      }
      revision = (await request(env.app).post(`/api/templates/${r.body.id}/publish`).set(bearer(s)).send({ changelog: `v${n}` })).body.revision;
    }
    if ((o.visibility ?? 'public') === 'public') await request(env.app).put(`/api/templates/${r.body.id}/sharing`).set(bearer(s)).send({ visibility: 'public', userIds: [] });
    // Surveys arrive with a later issue: the use count is set here as the spec's own data.
    await env.database.db.update(chassisTemplates).set({ surveyCount: o.uses ?? 0 }).where(eq(chassisTemplates.id, r.body.id));
    ids[name] = r.body.id;
  }

  beforeAll(async () => {
    const a = await makeUser(['author'], { name: `Orla Fenwick ${tok}` });
    author = { ...(await signIn(a.email)), id: a.id };
    const b = await makeUser(['author'], { name: `Piet Marlowe ${tok}` });
    other = { ...(await signIn(b.email)), id: b.id };
    viewer = await userSession(['technician']);
    secondTube = await makeTubeType();
    await add('alpha', author, { maker: `Arlen ${tok}`, model: 'Alpha Deluxe', chassisNumber: 'AR-100', kind: 'table-radio', uses: 5 });
    await add('bravo', author, { maker: `Brisk ${tok}`, model: 'Bravo', chassisNumber: 'BR-7', kind: 'console', uses: 9, versions: 2 });
    await add('charlie', other, { maker: `Cadence ${tok}`, model: 'Charlie Twin', chassisNumber: 'CD-2', kind: 'amplifier', tube: secondTube, uses: 1 });
    await add('delta', other, { maker: `Dunmore ${tok}`, model: 'Delta', chassisNumber: 'DM-55', kind: 'table-radio', uses: 7 });
    await add('hidden', other, { maker: `Eskerby ${tok}`, model: 'Echo', chassisNumber: 'ES-1', kind: 'table-radio', uses: 100, visibility: 'private' });
  });

  const list = async (s: Session, query: string) => {
    const r = await request((await apiEnv()).app).get(`/api/templates?q=${tok}&${query}`).set(bearer(s));
    expect(r.status).withContext(JSON.stringify(r.body)).toBe(200);
    return r.body as { items: { id: number; maker: string; latestVersion: number; versionCount: number; stageCount: number; testPointCount: number; componentCount: number; surveyCount: number; authorName: string; visibility: string }[]; total: number };
  };
  const names = (items: { id: number }[]) => items.map((i) => Object.keys(ids).find((k) => ids[k] === i.id));

  it('searches what the caller may see, sorted by use by default; someone else’s private template is not listed', async () => {
    const r = await list(viewer, '');
    expect(names(r.items)).toEqual(['bravo', 'delta', 'alpha', 'charlie']);
    expect(r.total).toBe(4);
    const own = await list(other, '');
    expect(names(own.items)).toEqual(['hidden', 'bravo', 'delta', 'alpha', 'charlie']);
  });

  it('each row carries the author, the latest version, versions, stage, test point, component and survey counts', async () => {
    const r = await list(viewer, 'maker=brisk');
    expect(r.items.length).toBe(1);
    expect(r.items[0]).toEqual(
      jasmine.objectContaining({ authorName: `Orla Fenwick ${tok}`, latestVersion: 2, versionCount: 2, stageCount: 1, testPointCount: 3, componentCount: 3, surveyCount: 9, visibility: 'public' }),
    );
  });

  it('filters by maker, model, chassis number, tube type, kind and author', async () => {
    expect(names((await list(viewer, 'maker=ARLEN')).items)).toEqual(['alpha']);
    expect(names((await list(viewer, 'model=twin')).items)).toEqual(['charlie']);
    expect(names((await list(viewer, 'chassis=DM-5')).items)).toEqual(['delta']);
    expect(names((await list(viewer, `tubeType=${secondTube.toLowerCase()}`)).items)).toEqual(['charlie']);
    expect(names((await list(viewer, 'kind=table-radio')).items)).toEqual(['delta', 'alpha']);
    expect(names((await list(viewer, `author=piet marlowe ${tok}`)).items)).toEqual(['delta', 'charlie']);
    expect((await list(viewer, 'maker=nobody-makes-this')).total).toBe(0);
  });

  it('the free search also finds a tube type, a chassis number and the author', async () => {
    const env = await apiEnv();
    const byTube = await request(env.app).get(`/api/templates?q=${secondTube}`).set(bearer(viewer));
    expect(names(byTube.body.items)).toEqual(['charlie']);
    const byAuthor = await request(env.app).get(`/api/templates?q=${encodeURIComponent(`fenwick ${tok}`)}`).set(bearer(viewer));
    expect(names(byAuthor.body.items)).toEqual(['bravo', 'alpha']);
  });

  it('sorts by maker, model and last update', async () => {
    expect(names((await list(viewer, 'sort=maker')).items)).toEqual(['alpha', 'bravo', 'charlie', 'delta']);
    expect(names((await list(viewer, 'sort=model')).items)).toEqual(['alpha', 'bravo', 'charlie', 'delta']);
    expect(names((await list(viewer, 'sort=updated')).items)).toEqual(['delta', 'charlie', 'bravo', 'alpha']);
  });

  it('paginates on the server: pages count from 1 and the total stays the same', async () => {
    const p1 = await list(viewer, 'sort=maker&pageSize=3&page=1');
    const p2 = await list(viewer, 'sort=maker&pageSize=3&page=2');
    expect([p1.total, p2.total]).toEqual([4, 4]);
    expect(names(p1.items)).toEqual(['alpha', 'bravo', 'charlie']);
    expect(names(p2.items)).toEqual(['delta']);
    expect((await list(viewer, 'sort=maker&pageSize=3&page=3')).items).toEqual([]);
  });

  it('refuses a bad sort, kind or page size with the field named (400), beside the valid query', async () => {
    const env = await apiEnv();
    for (const [q, field] of [
      ['sort=rating', 'sort'],
      ['kind=wireless', 'kind'],
      ['pageSize=1000', 'pageSize'],
      ['page=0', 'page'],
    ]) {
      const r = await request(env.app).get(`/api/templates?${q}`).set(bearer(viewer));
      expect([r.status, r.body.error?.details?.field]).withContext(q).toEqual([400, field]);
    }
    expect((await request(env.app).get('/api/templates?sort=use&kind=console&pageSize=100').set(bearer(viewer))).status).toBe(200);
  });

  it('an admin reads everything, private templates included', async () => {
    const admin = await userSession(['admin']);
    expect(names((await list(admin, '')).items)).toContain('hidden');
  });
});
