/**
 * Chassis templates: the version lifecycle, the immutability of published versions (at the
 * database level and through the API), optimistic revisions, document checks, copies and
 * corrections. Real PostgreSQL through apiEnv(); every template here is the spec's own row.
 */
import { and, eq, sql } from 'drizzle-orm';
import request from 'supertest';
import { chassisTemplates, templateCorrections, templateVersions } from '../../schema/index';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';

type Caller = Session & { id: number };
import { makeTemplate, sampleDocument, specTube, withR2Tolerance } from '../support/template-fixtures';

describe('Chassis templates', () => {
  let author: Caller;
  let tech: Caller;
  let admin: Caller;
  beforeAll(async () => {
    author = await userSession(['author']);
    tech = await userSession(['technician']);
    admin = await userSession(['admin']);
  });

  const versionsOf = async (id: number) => {
    const env = await apiEnv();
    return env.database.db
      .select({ number: templateVersions.number, state: templateVersions.state, content: templateVersions.content })
      .from(templateVersions)
      .where(eq(templateVersions.templateId, id))
      .orderBy(templateVersions.number);
  };

  it('goes create → edit draft → publish v1 → edit → publish v2 → diff v1..v2 → retire v1, and lists the versions with their states', async () => {
    const env = await apiEnv();
    const tube = await specTube();
    const created = await request(env.app).post('/api/templates').set(bearer(author)).send({ chassis: { maker: 'Quillmere Radio Co.', model: 'Lifecycle 1', kind: 'table-radio', power: 'ac-dc' } });
    expect(created.status).toBe(201);
    const id = created.body.id as number;
    expect(created.body.draft.revision).toBe(1);
    expect(created.body.versions).toEqual([]);

    const draft = await request(env.app).get(`/api/templates/${id}/draft`).set(bearer(author));
    expect(draft.status).toBe(200);
    expect(draft.body.content.chassis.hotChassis).withContext('hot chassis follows from ac-dc').toBe(true);
    expect(draft.body.content.components).toEqual([]);

    const doc = { ...sampleDocument(tube, 'Quillmere Radio Co.', 'Lifecycle 1') };
    const saved = await request(env.app).put(`/api/templates/${id}/draft`).set(bearer(author)).send({ revision: 1, content: doc });
    expect(saved.status).withContext(JSON.stringify(saved.body)).toBe(200);
    expect(saved.body.revision).toBe(2);

    const v1 = await request(env.app).post(`/api/templates/${id}/publish`).set(bearer(author)).send({ changelog: 'First issue from the service sheet' });
    expect(v1.status).toBe(201);
    expect(v1.body.latestVersion).toBe(1);
    expect(v1.body.draft).toBeNull();

    // A new draft starts from the latest version; the revision moved on with publishing.
    const fresh = await request(env.app).get(`/api/templates/${id}/draft`).set(bearer(author));
    expect(fresh.body.exists).toBe(false);
    expect(fresh.body.basedOn).toBe(1);
    expect(fresh.body.content).toEqual(doc);
    const edited = withR2Tolerance(doc, 5);
    edited.components.push({ ...doc.components[0], key: 'c-r3', ref: 'R3', nodes: ['V1.2', 'chassis'], nominal: { ohms: 5600, text: '5k6' }, tolerancePct: 10 });
    edited.testPoints = edited.testPoints.filter((t) => t.key !== 'tp-r1');
    edited.testPoints.push({ key: 'tp-r3', stageKey: 'st-audio', kind: 'component-check', componentKey: 'c-r3' });
    const second = await request(env.app).put(`/api/templates/${id}/draft`).set(bearer(author)).send({ revision: fresh.body.revision, content: edited });
    expect(second.status).withContext(JSON.stringify(second.body)).toBe(200);
    const v2 = await request(env.app).post(`/api/templates/${id}/publish`).set(bearer(author)).send({ changelog: 'R2 is 5 %; cathode resistor added' });
    expect(v2.status).toBe(201);
    expect(v2.body.latestVersion).toBe(2);

    const diff = await request(env.app).get(`/api/templates/${id}/diff?from=1&to=2`).set(bearer(author));
    expect(diff.status).toBe(200);
    expect(diff.body.components.added.map((e: { key: string }) => e.key)).toEqual(['c-r3']);
    expect(diff.body.components.removed).toEqual([]);
    expect(diff.body.components.changed.map((e: { key: string; fields: string[] }) => [e.key, e.fields])).toEqual([['c-r2', ['tolerancePct']]]);
    expect(diff.body.testPoints.added.map((e: { key: string }) => e.key)).toEqual(['tp-r3']);
    expect(diff.body.testPoints.removed.map((e: { key: string }) => e.key)).toEqual(['tp-r1']);
    expect(diff.body.testPoints.changed).toEqual([]);

    const retired = await request(env.app).post(`/api/templates/${id}/versions/1/retire`).set(bearer(author)).send({ reason: 'R2 band was wrong' });
    expect(retired.status).toBe(200);
    expect(retired.body.versions.map((v: { number: number; state: string }) => [v.number, v.state])).toEqual([
      [2, 'published'],
      [1, 'retired'],
    ]);
    expect(retired.body.versions[1].retiredReason).toBe('R2 band was wrong');
    const again = await request(env.app).post(`/api/templates/${id}/versions/1/retire`).set(bearer(author)).send({ reason: 'twice' });
    expect(again.status).toBe(409);

    const rows = await versionsOf(id);
    expect(rows.map((r) => [r.number, r.state])).toEqual([
      [1, 'retired'],
      [2, 'published'],
    ]);
    expect((rows[0].content as { components: unknown[] }).components.length).toBe(3);
    const v1Read = await request(env.app).get(`/api/templates/${id}/versions/1`).set(bearer(author));
    expect(v1Read.status).toBe(200);
    expect(v1Read.body.content).toEqual(doc);
    expect(v1Read.body.changelog).toBe('First issue from the service sheet');
  });

  it('publishing answers 409 without a draft, and when the draft equals the last version; a changed draft publishes', async () => {
    const env = await apiEnv();
    const t = await makeTemplate({ ownerId: author.id, published: 1 });
    const none = await request(env.app).post(`/api/templates/${t.id}/publish`).set(bearer(author)).send({ changelog: 'nothing' });
    expect(none.status).toBe(409);
    expect(none.body.error.code).toBe('no-draft');
    const current = await request(env.app).get(`/api/templates/${t.id}/draft`).set(bearer(author));
    const same = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: current.body.revision, content: t.doc });
    expect(same.status).toBe(200);
    const unchanged = await request(env.app).post(`/api/templates/${t.id}/publish`).set(bearer(author)).send({ changelog: 'same again' });
    expect(unchanged.status).toBe(409);
    expect(unchanged.body.error.code).toBe('unchanged');
    await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: same.body.revision, content: withR2Tolerance(t.doc, 2) });
    const ok = await request(env.app).post(`/api/templates/${t.id}/publish`).set(bearer(author)).send({ changelog: 'R2 2 %' });
    expect(ok.status).toBe(201);
    expect((await versionsOf(t.id)).map((v) => v.number)).toEqual([1, 2]);
  });

  describe('published versions are immutable', () => {
    it('at the database level: a raw UPDATE of a published version’s content fails (the trigger) while the draft updates', async () => {
      const env = await apiEnv();
      const t = await makeTemplate({ ownerId: author.id, published: 1, changedDraft: true });
      const pool = env.database.pool;
      await expectAsync(pool.query(`UPDATE template_versions SET content = '{"tampered": true}'::jsonb WHERE template_id = $1 AND state = 'published'`, [t.id])).toBeRejectedWithError(/cannot change/);
      await expectAsync(pool.query(`UPDATE template_versions SET number = 9 WHERE template_id = $1 AND state = 'published'`, [t.id])).toBeRejectedWithError(/cannot change/);
      await expectAsync(pool.query(`DELETE FROM template_versions WHERE template_id = $1 AND state = 'published'`, [t.id])).toBeRejectedWithError(/cannot be deleted/);
      await expectAsync(pool.query(`UPDATE template_versions SET state = 'draft' WHERE template_id = $1 AND state = 'published'`, [t.id])).toBeRejectedWithError(/cannot change/);
      // The positive twins: the draft row takes any update, and published → retired is allowed.
      const draft = await pool.query(`UPDATE template_versions SET content = '{"edited": true}'::jsonb WHERE template_id = $1 AND state = 'draft'`, [t.id]);
      expect(draft.rowCount).toBe(1);
      const retire = await pool.query(`UPDATE template_versions SET state = 'retired', retired_at = now() WHERE template_id = $1 AND state = 'published'`, [t.id]);
      expect(retire.rowCount).toBe(1);
      await expectAsync(pool.query(`UPDATE template_versions SET state = 'published' WHERE template_id = $1 AND state = 'retired'`, [t.id])).toBeRejectedWithError(/cannot change/);
      const [v1] = await env.database.db.select().from(templateVersions).where(and(eq(templateVersions.templateId, t.id), eq(templateVersions.number, 1)));
      expect(v1.content).toEqual(t.doc);
      expect(v1.state).toBe('retired');
    });

    it('later draft edits through the API leave the published snapshot as it was', async () => {
      const env = await apiEnv();
      const t = await makeTemplate({ ownerId: author.id, published: 1 });
      const d = await request(env.app).get(`/api/templates/${t.id}/draft`).set(bearer(author));
      const r = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: d.body.revision, content: withR2Tolerance(t.doc, 1) });
      expect(r.status).toBe(200);
      const [v1] = await env.database.db.select().from(templateVersions).where(and(eq(templateVersions.templateId, t.id), eq(templateVersions.number, 1)));
      expect((v1.content as typeof t.doc).components[1].tolerancePct).toBe(10);
    });

    it('PUT of a published version answers 409 (version-immutable); PUT of versions/draft saves', async () => {
      const env = await apiEnv();
      const t = await makeTemplate({ ownerId: author.id, published: 1 });
      const d = await request(env.app).get(`/api/templates/${t.id}/draft`).set(bearer(author));
      const refused = await request(env.app).put(`/api/templates/${t.id}/versions/1`).set(bearer(author)).send({ revision: d.body.revision, content: withR2Tolerance(t.doc, 1) });
      expect(refused.status).toBe(409);
      expect(refused.body.error.code).toBe('version-immutable');
      const missing = await request(env.app).put(`/api/templates/${t.id}/versions/7`).set(bearer(author)).send({ revision: d.body.revision, content: t.doc });
      expect(missing.status).toBe(404);
      const ok = await request(env.app).put(`/api/templates/${t.id}/versions/draft`).set(bearer(author)).send({ revision: d.body.revision, content: withR2Tolerance(t.doc, 1) });
      expect(ok.status).toBe(200);
      const [v1] = await env.database.db.select().from(templateVersions).where(and(eq(templateVersions.templateId, t.id), eq(templateVersions.number, 1)));
      expect((v1.content as typeof t.doc).components[1].tolerancePct).toBe(10);
    });
  });

  it('a stale revision answers 409 with both revisions and writes nothing; the current revision saves', async () => {
    const env = await apiEnv();
    const t = await makeTemplate({ ownerId: author.id });
    const first = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: 1, content: withR2Tolerance(t.doc, 5) });
    expect(first.status).toBe(200);
    const stale = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: 1, content: withR2Tolerance(t.doc, 1) });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('stale-revision');
    expect(stale.body.error.details).toEqual({ yourRevision: 1, currentRevision: 2 });
    const [row] = await env.database.db.select({ revision: chassisTemplates.revision }).from(chassisTemplates).where(eq(chassisTemplates.id, t.id));
    expect(row.revision).toBe(2);
    const draft = (await versionsOf(t.id)).find((v) => v.state === 'draft')!;
    expect((draft.content as typeof t.doc).components[1].tolerancePct).toBe(5);
  });

  it('a draft that breaks the format or the domain is refused with every problem and its path; nothing is written', async () => {
    const env = await apiEnv();
    const t = await makeTemplate({ ownerId: author.id });
    const bad = structuredClone(t.doc) as unknown as Record<string, any>;
    bad.components[0].nodes = ['V1.9', 'V7.1']; // no pin 9 on a 7-pin tube; no socket V7
    bad.components[1].nominal = { ohms: 250000, text: '25k' }; // the text disagrees
    bad.testPoints[0].componentKey = 'c-missing';
    bad.testPoints.push({ ...bad.testPoints[1] }); // duplicate key
    bad.components[2].nodes = ['V1.7', 'AVC']; // undeclared junction
    const r = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: 1, content: bad });
    expect(r.status).toBe(400);
    const paths = (r.body.error.details.problems as { path: string }[]).map((p) => p.path);
    expect(paths).toEqual(
      jasmine.arrayWithExactContents([
        'content.components[0].nodes[0]',
        'content.components[0].nodes[1]',
        'content.components[1].nominal.text',
        'content.components[2].nodes[1]',
        'content.testPoints[3].key',
        'content.testPoints[0].componentKey',
      ]),
    );
    expect(r.body.error.details.field).toBe(paths[0]);
    const shape = structuredClone(t.doc) as unknown as Record<string, any>;
    delete shape.components[0].nominal;
    shape.testPoints[2].tolerancePct = -5;
    const s = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: 1, content: shape });
    expect(s.status).toBe(400);
    expect((s.body.error.details.problems as { path: string }[]).map((p) => p.path)).toEqual(jasmine.arrayWithExactContents(['content.components[0].nominal', 'content.testPoints[2].tolerancePct']));
    const [row] = await env.database.db.select({ revision: chassisTemplates.revision }).from(chassisTemplates).where(eq(chassisTemplates.id, t.id));
    expect(row.revision).toBe(1);
    const ok = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: 1, content: t.doc });
    expect(ok.status).toBe(200);
  });

  describe('the draft checked as a network', () => {
    it('refuses a node that resolves to nothing and a pot without its wiper, each with its path (once); the mended draft saves', async () => {
      const env = await apiEnv();
      const t = await makeTemplate({ ownerId: author.id });
      const bad = structuredClone(t.doc);
      bad.components[1].nodes = ['V1.7', 'B+9']; // no junction B+9
      bad.components.push({ ...bad.components[1], key: 'c-p1', ref: 'P1', kind: 'pot', nodes: ['V1.1', 'chassis'], wiper: null, nominal: { ohms: 500000, text: '500k' } });
      const r = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: 1, content: bad });
      expect(r.status).toBe(400);
      const paths = (r.body.error.details.problems as { path: string }[]).map((p) => p.path);
      expect(paths).toEqual(jasmine.arrayWithExactContents(['content.components[1].nodes[1]', 'content.components[3].wiper']));
      const [row] = await env.database.db.select({ revision: chassisTemplates.revision }).from(chassisTemplates).where(eq(chassisTemplates.id, t.id));
      expect(row.revision).toBe(1);
      bad.components[1].nodes = ['V1.7', 'B+1'];
      bad.components[3].wiper = { node: 'V1.1', fraction: 0.5 };
      const ok = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: 1, content: bad });
      expect(ok.status).withContext(JSON.stringify(ok.body)).toBe(200);
    });

    it('saves a chart reading off by a factor of two, with a warning at its path; the agreeing chart saves with none', async () => {
      const env = await apiEnv();
      const t = await makeTemplate({ ownerId: author.id });
      const off = structuredClone(t.doc);
      const chart = off.testPoints[2];
      if (chart.kind !== 'chart-reading') throw new Error('the sample has its chart reading third');
      chart.expected = { ohms: 500000 }; // the network reads R2 = 250 kΩ between V1.7 and B+1
      const r = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: 1, content: off });
      expect(r.status).withContext(JSON.stringify(r.body)).toBe(200);
      expect(r.body.revision).toBe(2);
      expect(r.body.warnings.length).toBe(1);
      const [w] = r.body.warnings;
      expect(w.path).toBe('content.testPoints[2]');
      expect(w.code).toBe('chart-disagrees');
      expect(w.message).toContain('chart reading disagrees with the network beyond its tolerance — an error in the template or in the service data');
      expect(w.values.networkOhms).toBeCloseTo(250000, 6);
      expect(w.values.deviationPct).toBeCloseTo(-50, 9);
      const saved = (await versionsOf(t.id)).find((v) => v.state === 'draft')!;
      expect((saved.content as typeof t.doc).testPoints[2]).toEqual(jasmine.objectContaining({ expected: { ohms: 500000 } }));
      const agree = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: 2, content: t.doc });
      expect(agree.status).toBe(200);
      expect(agree.body.warnings).toEqual([]);
    });

    it('warns about the capacitor list (a line capacitor without an X/Y class) and still saves', async () => {
      const env = await apiEnv();
      const t = await makeTemplate({ ownerId: author.id });
      const doc = structuredClone(t.doc);
      doc.components[2].capacitor = { ...doc.components[2].capacitor!, lineConnected: true };
      const r = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: 1, content: doc });
      expect(r.status).toBe(200);
      expect(r.body.warnings.map((w: { path: string; code: string }) => `${w.code} ${w.path}`)).toEqual(['capacitor-safety-class-missing content.components[2].capacitor.safetyClass']);
      doc.components[2].capacitor = { ...doc.components[2].capacitor!, safetyClass: 'Y' };
      const y = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: 2, content: doc });
      expect(y.body.warnings).toEqual([]);
    });
  });

  describe('GET /api/templates/:id/versions/:version/network', () => {
    it('answers per test point the expected reading, its parallel paths and any chart disagreement', async () => {
      const env = await apiEnv();
      const t = await makeTemplate({ ownerId: author.id, published: 1, visibility: 'public' });
      const r = await request(env.app).get(`/api/templates/${t.id}/versions/1/network`).set(bearer(tech));
      expect(r.status).toBe(200);
      expect(Object.keys(r.body.testPoints)).toEqual(['tp-r1', 'tp-r2', 'tp-v1p']);
      // R1 10 MΩ from V1.1 to chassis, nothing in parallel (C1 is open at DC)
      expect(r.body.testPoints['tp-r1'].expectedOhms).toBeCloseTo(10e6, 3);
      expect(r.body.testPoints['tp-r1'].parallelPaths).toEqual({ ohms: null, edges: [] });
      expect(r.body.testPoints['tp-v1p'].expectedOhms).toBeCloseTo(250000, 6);
      expect(r.body.testPoints['tp-v1p'].parallelPaths.edges).toEqual([{ edgeId: 'c-r2', share: 1 }]);
      expect(r.body.testPoints['tp-v1p'].disagreement).toBeUndefined();
      expect(r.body.problems).toEqual([]);
    });

    it('flags a disagreeing chart reading of the owner’s draft (others who see the template get 403 for the draft, 404 for a missing version)', async () => {
      const env = await apiEnv();
      const t = await makeTemplate({ ownerId: author.id, published: 1, visibility: 'public' });
      const off = structuredClone(t.doc);
      const chart = off.testPoints[2];
      if (chart.kind !== 'chart-reading') throw new Error('the sample has its chart reading third');
      chart.expected = { ohms: 125000 };
      const loaded = await request(env.app).get(`/api/templates/${t.id}/draft`).set(bearer(author));
      const put = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: loaded.body.revision, content: off });
      expect(put.status).withContext(JSON.stringify(put.body)).toBe(200);
      const mine = await request(env.app).get(`/api/templates/${t.id}/versions/draft/network`).set(bearer(author));
      expect(mine.status).toBe(200);
      expect(mine.body.testPoints['tp-v1p'].disagreement).toEqual(jasmine.objectContaining({ path: 'testPoints[2]', networkOhms: 250000, tolerancePct: 20 }));
      const v1 = await request(env.app).get(`/api/templates/${t.id}/versions/1/network`).set(bearer(author));
      expect(v1.body.testPoints['tp-v1p'].disagreement).toBeUndefined();
      const theirs = await request(env.app).get(`/api/templates/${t.id}/versions/draft/network`).set(bearer(tech));
      expect(theirs.status).toBe(403);
      const missing = await request(env.app).get(`/api/templates/${t.id}/versions/7/network`).set(bearer(author));
      expect(missing.status).toBe(404);
    });
  });

  it('refuses an IC pin as a tie point, and takes an NC pin', async () => {
    const env = await apiEnv();
    const tube = await request(env.app)
      .post('/api/tube-types')
      .set(bearer(author))
      .send({
        designation: `SPEC-IC${Date.now().toString(36).toUpperCase()}`,
        base: 'miniature-7',
        heating: 'indirect',
        heaterVolts: 6.3,
        heaterAmps: 0.3,
        pins: [
          { pin: 1, electrode: 'p', label: 'plate' },
          { pin: 2, electrode: 'IC', label: 'internal' },
          { pin: 3, electrode: 'h', label: 'heater' },
          { pin: 4, electrode: 'h', label: 'heater' },
          { pin: 5, electrode: 'NC', label: 'no connection' },
          { pin: 6, electrode: 'k', label: 'cathode' },
          { pin: 7, electrode: 'g1', label: 'grid 1' },
        ],
      });
    expect(tube.status).toBe(201);
    const doc = sampleDocument(tube.body.designation);
    doc.components[0].nodes = ['V1.2', 'chassis'];
    const t = await makeTemplate({ ownerId: author.id });
    const ic = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: 1, content: doc });
    expect(ic.status).toBe(400);
    expect(ic.body.error.details.problems.map((p: { path: string }) => p.path)).toContain('content.components[0].nodes[0]');
    doc.components[0].nodes = ['V1.5', 'chassis'];
    const nc = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: 1, content: doc });
    expect(nc.status).withContext(JSON.stringify(nc.body)).toBe(200);
  });

  it('only the owner edits the draft: admin 403, another technician 404 (private); the owner 200', async () => {
    const env = await apiEnv();
    const t = await makeTemplate({ ownerId: author.id });
    const asAdmin = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(admin)).send({ revision: 1, content: t.doc });
    expect(asAdmin.status).toBe(403);
    const asTech = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(tech)).send({ revision: 1, content: t.doc });
    expect(asTech.status).toBe(404);
    const adminReads = await request(env.app).get(`/api/templates/${t.id}/draft`).set(bearer(admin));
    expect(adminReads.status).toBe(200);
    const owner = await request(env.app).put(`/api/templates/${t.id}/draft`).set(bearer(author)).send({ revision: 1, content: withR2Tolerance(t.doc, 3) });
    expect(owner.status).toBe(200);
  });

  describe('copies', () => {
    it('a technician copies a public version into a private template that credits the origin, its version and author, with the keys kept', async () => {
      const env = await apiEnv();
      const t = await makeTemplate({ ownerId: author.id, published: 2, visibility: 'public' });
      const r = await request(env.app).post(`/api/templates/${t.id}/copy`).set(bearer(tech)).send({ version: 1 });
      expect(r.status).toBe(201);
      expect(r.body.own).toBe(true);
      expect(r.body.visibility).toBe('private');
      expect(r.body.copiedFrom).toEqual({ templateId: t.id, versionNumber: 1, authorName: author.user.name });
      const draft = await request(env.app).get(`/api/templates/${r.body.id}/draft`).set(bearer(tech));
      expect(draft.body.content).toEqual(t.doc);
      expect(draft.body.content.testPoints.map((p: { key: string }) => p.key)).toEqual(['tp-r1', 'tp-r2', 'tp-v1p']);
      const [row] = await env.database.db.select().from(chassisTemplates).where(eq(chassisTemplates.id, r.body.id));
      expect(row.ownerId).toBe(tech.user.id);
      expect(row.originAuthorName).toBe(author.user.name);
      // The copy is the technician's own: they edit and publish it.
      const edit = await request(env.app).put(`/api/templates/${r.body.id}/draft`).set(bearer(tech)).send({ revision: draft.body.revision, content: withR2Tolerance(t.doc, 2) });
      expect(edit.status).toBe(200);
      // The origin's owner cannot see the private copy.
      const hidden = await request(env.app).get(`/api/templates/${r.body.id}`).set(bearer(author));
      expect(hidden.status).toBe(404);
    });

    it('refuses to copy someone else’s private template (404) and someone else’s draft (403); the owner copies their draft', async () => {
      const env = await apiEnv();
      const priv = await makeTemplate({ ownerId: author.id, published: 1 });
      expect((await request(env.app).post(`/api/templates/${priv.id}/copy`).set(bearer(tech)).send({ version: 1 })).status).toBe(404);
      const pub = await makeTemplate({ ownerId: author.id, published: 1, changedDraft: true, visibility: 'public' });
      expect((await request(env.app).post(`/api/templates/${pub.id}/copy`).set(bearer(tech)).send({ version: 'draft' })).status).toBe(403);
      const own = await request(env.app).post(`/api/templates/${pub.id}/copy`).set(bearer(author)).send({ version: 'draft' });
      expect(own.status).toBe(201);
      expect(own.body.copiedFrom.versionNumber).toBeNull();
    });
  });

  describe('corrections', () => {
    it('a technician sends a correction; the owner accepts it into a new draft (from the latest version) at the next revision', async () => {
      const env = await apiEnv();
      const t = await makeTemplate({ ownerId: author.id, published: 1, visibility: 'public' });
      const sent = await request(env.app)
        .post(`/api/templates/${t.id}/corrections`)
        .set(bearer(tech))
        .send({ versionNumber: 1, target: { kind: 'component', key: 'c-r2' }, change: { nominal: { ohms: 220000, text: '220k' } }, note: "The factory's change notice gives 220k." });
      expect(sent.status).withContext(JSON.stringify(sent.body)).toBe(201);
      expect(sent.body.state).toBe('open');
      const before = await request(env.app).get(`/api/templates/${t.id}/draft`).set(bearer(author));
      expect(before.body.exists).toBe(false);
      const accepted = await request(env.app).post(`/api/templates/${t.id}/corrections/${sent.body.id}/decision`).set(bearer(author)).send({ decision: 'accept', note: 'Thanks, confirmed.' });
      expect(accepted.status).toBe(200);
      expect(accepted.body.correction.state).toBe('accepted');
      expect(accepted.body.draft.revision).toBe(before.body.revision + 1);
      const after = await request(env.app).get(`/api/templates/${t.id}/draft`).set(bearer(author));
      expect(after.body.exists).toBe(true);
      expect(after.body.content.components[1].nominal).toEqual({ ohms: 220000, text: '220k' });
      const twice = await request(env.app).post(`/api/templates/${t.id}/corrections/${sent.body.id}/decision`).set(bearer(author)).send({ decision: 'decline' });
      expect(twice.status).toBe(409);
      const [row] = await env.database.db.select().from(templateCorrections).where(eq(templateCorrections.id, sent.body.id));
      expect(row.decisionNote).toBe('Thanks, confirmed.');
      expect(row.decidedBy).toBe(author.user.id);
    });

    it('the owner declines with a note and the draft stays as it was; the sender sees the decision, only the owner sees every correction', async () => {
      const env = await apiEnv();
      const t = await makeTemplate({ ownerId: author.id, published: 1, visibility: 'public' });
      const other = await userSession(['technician']);
      const mine = await request(env.app).post(`/api/templates/${t.id}/corrections`).set(bearer(tech)).send({ versionNumber: 1, target: { kind: 'test-point', key: 'tp-v1p' }, change: { tolerancePct: 10 }, note: 'Chart says 10 %.' });
      expect(mine.status).toBe(201);
      const theirs = await request(env.app).post(`/api/templates/${t.id}/corrections`).set(bearer(other)).send({ versionNumber: 1, target: { kind: 'component', key: 'c-r1' }, change: { tolerancePct: 10 }, note: 'Silver band on mine.' });
      expect(theirs.status).toBe(201);
      const declined = await request(env.app).post(`/api/templates/${t.id}/corrections/${mine.body.id}/decision`).set(bearer(author)).send({ decision: 'decline', note: 'The sheet says 20 %.' });
      expect(declined.status).toBe(200);
      expect(declined.body.draft).toBeNull();
      expect((await versionsOf(t.id)).some((v) => v.state === 'draft')).toBe(false);
      const techList = await request(env.app).get(`/api/templates/${t.id}/corrections`).set(bearer(tech));
      expect(techList.body.items.map((c: { id: number; state: string; decisionNote: string }) => [c.id, c.state, c.decisionNote])).toEqual([[mine.body.id, 'declined', 'The sheet says 20 %.']]);
      const ownerList = await request(env.app).get(`/api/templates/${t.id}/corrections`).set(bearer(author));
      expect(ownerList.body.items.map((c: { id: number }) => c.id).sort()).toEqual([mine.body.id, theirs.body.id].sort());
      // Each target is named as a person names it in the correction's own version.
      const labels = new Map(ownerList.body.items.map((c: { id: number; targetLabel: string }) => [c.id, c.targetLabel]));
      expect(labels.get(theirs.body.id)).toBe('component R1');
      expect(labels.get(mine.body.id)).toMatch(/^test point \d+$/);
      // Only the owner decides: the sender may see the template but may not decide (403).
      const bySender = await request(env.app).post(`/api/templates/${t.id}/corrections/${theirs.body.id}/decision`).set(bearer(tech)).send({ decision: 'accept' });
      expect(bySender.status).toBe(403);
    });

    it('refuses a correction that names a missing key, an unknown field or leaves a problem (with its path); nothing is stored', async () => {
      const env = await apiEnv();
      const t = await makeTemplate({ ownerId: author.id, published: 1, visibility: 'public' });
      const send = (body: object) => request(env.app).post(`/api/templates/${t.id}/corrections`).set(bearer(tech)).send({ versionNumber: 1, note: 'n', ...body });
      const missing = await send({ target: { kind: 'component', key: 'c-r9' }, change: { tolerancePct: 5 } });
      expect([missing.status, missing.body.error.details.field]).toEqual([400, 'target.key']);
      const unknown = await send({ target: { kind: 'test-point', key: 'tp-r1' }, change: { ratedWatts: 1 } });
      expect([unknown.status, unknown.body.error.details.field]).toEqual([400, 'change.ratedWatts']);
      const broken = await send({ target: { kind: 'component', key: 'c-r2' }, change: { nodes: ['V1.7', 'B+9'] } });
      expect([broken.status, broken.body.error.details.field]).toEqual([400, 'change.nodes[1]']);
      const noVersion = await send({ versionNumber: 4, target: { kind: 'component', key: 'c-r2' }, change: { tolerancePct: 5 } });
      expect([noVersion.status, noVersion.body.error.details.field]).toEqual([400, 'versionNumber']);
      const [{ n }] = await env.database.db.select({ n: sql<number>`count(*)::int` }).from(templateCorrections).where(eq(templateCorrections.templateId, t.id));
      expect(n).toBe(0);
      const ok = await send({ target: { kind: 'component', key: 'c-r2' }, change: { tolerancePct: 5 } });
      expect(ok.status).toBe(201);
    });
  });
});
