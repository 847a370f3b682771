/**
 * Import and export in our own format: the published JSON schema, the canonical export (stable
 * key order, no ids or timestamps), all-or-nothing import with every problem and its JSON path,
 * and export → import → export equal byte for byte.
 */
import { Ajv } from 'ajv';
import { count, eq } from 'drizzle-orm';
import request from 'supertest';
import { chassisTemplates, templateVersions } from '../../schema/index';
import { apiEnv, bearer, userSession, type Session } from '../support/api-env';

type Caller = Session & { id: number };
import { makeTemplate, sampleDocument, specTube } from '../support/template-fixtures';

describe('Template import and export', () => {
  let author: Caller;
  let tech: Caller;
  beforeAll(async () => {
    author = await userSession(['author']);
    tech = await userSession(['technician']);
  });

  it('publishes the format’s JSON schema to anyone; an independent validator accepts an export with it and rejects a broken one', async () => {
    const env = await apiEnv();
    const r = await request(env.app).get('/api/schemas/template.json');
    expect(r.status).toBe(200);
    expect(r.body.$schema).toBe('http://json-schema.org/draft-07/schema#');
    expect(r.body.required).toEqual(['format', 'formatVersion', 'chassis', 'conditions', 'stages', 'junctions', 'components', 'testPoints']);
    // A fresh ajv in its default (non-strict-about-types) setup, as a third party would use it.
    const check = new Ajv({ allErrors: true, allowUnionTypes: true }).compile(r.body);
    const t = await makeTemplate({ ownerId: author.id, published: 1 });
    const exported = await request(env.app).get(`/api/templates/${t.id}/export?version=1`).set(bearer(author));
    expect(check(JSON.parse(exported.text))).withContext(JSON.stringify(check.errors)).toBe(true);
    expect(check({ ...JSON.parse(exported.text), formatVersion: 2 })).toBe(false);
  });

  it('exports canonical JSON: keys in the format’s order, no ids or timestamps, as an attachment', async () => {
    const env = await apiEnv();
    const t = await makeTemplate({ ownerId: author.id, published: 1 });
    const r = await request(env.app).get(`/api/templates/${t.id}/export?version=1`).set(bearer(author));
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toMatch(/^application\/json/);
    expect(r.headers['content-disposition']).toBe('attachment; filename="quillmere-radio-co-wren-3-v1.driftmark.json"');
    expect(Object.keys(JSON.parse(r.text))).toEqual(['format', 'formatVersion', 'chassis', 'conditions', 'stages', 'junctions', 'components', 'testPoints']);
    expect(Object.keys(JSON.parse(r.text).components[0]).slice(0, 5)).toEqual(['key', 'ref', 'kind', 'stageKey', 'nodes']);
    expect(r.text).not.toMatch(/"(id|templateId|createdAt|updatedAt|publishedAt)"/);
    expect(r.text.endsWith('}\n')).toBe(true);
    expect(JSON.parse(r.text)).toEqual(t.doc);
  });

  it('export → import → export equals byte for byte, keys kept', async () => {
    const env = await apiEnv();
    const t = await makeTemplate({ ownerId: author.id, published: 2 });
    const first = await request(env.app).get(`/api/templates/${t.id}/export?version=2`).set(bearer(author));
    const imported = await request(env.app).post('/api/templates/import').set(bearer(author)).send({ document: JSON.parse(first.text) });
    expect(imported.status).withContext(JSON.stringify(imported.body)).toBe(201);
    expect(imported.body.id).not.toBe(t.id);
    const second = await request(env.app).get(`/api/templates/${imported.body.id}/export?version=draft`).set(bearer(author));
    expect(second.status).toBe(200);
    expect(Buffer.from(second.text).equals(Buffer.from(first.text))).toBe(true);
    // … and again through a publish of the imported draft.
    await request(env.app).post(`/api/templates/${imported.body.id}/publish`).set(bearer(author)).send({ changelog: 'Imported' });
    const third = await request(env.app).get(`/api/templates/${imported.body.id}/export`).set(bearer(author));
    expect(third.text).toBe(first.text);
  });

  it('import reports every problem with its JSON path and imports nothing; the corrected document imports', async () => {
    const env = await apiEnv();
    const tube = await specTube();
    const [{ before }] = await env.database.db.select({ before: count() }).from(chassisTemplates);
    const doc = sampleDocument(tube) as unknown as Record<string, any>;
    doc.chassis.kind = 'wireless';
    doc.components[1].nominal = { ohms: -3 };
    doc.components[2].capacitor.uF = 'ten';
    doc.testPoints[1].extra = true;
    delete doc.conditions;
    const shape = await request(env.app).post('/api/templates/import').set(bearer(author)).send({ document: doc });
    expect(shape.status).toBe(400);
    expect(shape.body.error.details.problems.map((p: { path: string }) => p.path)).toEqual(
      jasmine.arrayWithExactContents(['document.conditions', 'document.chassis.kind', 'document.components[1].nominal.ohms', 'document.components[2].capacitor.uF', 'document.testPoints[1].extra']),
    );
    for (const p of shape.body.error.details.problems) expect(typeof p.message).toBe('string');

    const rules = sampleDocument(tube) as unknown as Record<string, any>;
    rules.stages[0].sockets[0].tubeType = 'SPEC-NOSUCH';
    rules.testPoints[2].to = 'V1.7';
    rules.components[0].stageKey = 'st-elsewhere';
    const domain = await request(env.app).post('/api/templates/import').set(bearer(author)).send({ document: rules });
    expect(domain.status).toBe(400);
    expect(domain.body.error.details.problems.map((p: { path: string }) => p.path)).toEqual(
      jasmine.arrayWithExactContents(['document.stages[0].sockets[0].tubeType', 'document.components[0].stageKey', 'document.testPoints[2].to']),
    );
    expect(domain.body.error.details.field).toBe(domain.body.error.details.problems[0].path);

    const [{ after }] = await env.database.db.select({ after: count() }).from(chassisTemplates);
    expect(after).toBe(before);
    const ok = await request(env.app).post('/api/templates/import').set(bearer(author)).send({ document: sampleDocument(tube) });
    expect(ok.status).toBe(201);
    const rows = await env.database.db.select().from(templateVersions).where(eq(templateVersions.templateId, ok.body.id));
    expect(rows.map((r) => r.state)).toEqual(['draft']);
  });

  it('only authors and admins import (a technician 403); the author 201', async () => {
    const env = await apiEnv();
    const doc = sampleDocument(await specTube());
    expect((await request(env.app).post('/api/templates/import').set(bearer(tech)).send({ document: doc })).status).toBe(403);
    expect((await request(env.app).post('/api/templates/import').set(bearer(author)).send({ document: doc })).status).toBe(201);
  });

  it('a non-owner exports published versions of what they can see, not the draft', async () => {
    const env = await apiEnv();
    const t = await makeTemplate({ ownerId: author.id, published: 1, changedDraft: true, visibility: 'public' });
    const latest = await request(env.app).get(`/api/templates/${t.id}/export`).set(bearer(tech));
    expect(latest.status).toBe(200);
    expect(JSON.parse(latest.text)).toEqual(t.doc);
    expect((await request(env.app).get(`/api/templates/${t.id}/export?version=draft`).set(bearer(tech))).status).toBe(403);
    expect((await request(env.app).get(`/api/templates/${t.id}/export?version=draft`).set(bearer(author))).status).toBe(200);
  });
});
