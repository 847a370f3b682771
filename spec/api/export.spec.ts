/**
 * Export (issue 5 "Export"): a user's own sets with their surveys and readings as JSON and CSV, so
 * that the records outlive the account. Sets shared with the caller and other users' sets are not
 * the caller's to export.
 */
import request from 'supertest';
import { apiEnv, bearer, userSession } from '../support/api-env';
import { addReading, makeSet, makeSurvey } from '../support/bench-fixtures';
import { EXPORT_CSV_HEADER } from '../../api/records/reports.use-cases';

describe('Export of a user\u2019s sets', () => {
  it('gives the caller\u2019s own sets with surveys and readings as one JSON document, leaving out shared and others\u2019 sets', async () => {
    const env = await apiEnv();
    const tech = await userSession(['technician']);
    const friend = await userSession(['technician']);
    const own = await makeSet({ ownerId: tech.id, label: 'Kitchen set', serial: 'SN-1' });
    const s = await makeSurvey({ setId: own.id, state: 'complete' });
    const r1 = await addReading(s.id, { testPointKey: 'tp-r2', text: '262k', method: 'lead-lifted', liftedEnd: 1 });
    await addReading(s.id, { testPointKey: 'tp-r1', state: 'open' });
    await makeSet({ ownerId: friend.id, label: 'Friend\u2019s set', sharedWith: [tech.id] });
    await makeSet({ label: 'Stranger\u2019s set' });

    const r = await request(env.app).get('/api/export/sets?format=json').set(bearer(tech));
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toMatch(/^application\/json/);
    expect(r.headers['content-disposition']).toMatch(/^attachment; filename="driftmark-sets-\d{4}-\d{2}-\d{2}\.json"$/);
    expect(r.body.format).toBe('driftmark-sets-export');
    expect(r.body.formatVersion).toBe(1);
    expect(r.body.sets.map((x: { label: string }) => x.label)).toEqual(['Kitchen set']);
    const set = r.body.sets[0];
    expect(set.template).toEqual(jasmine.objectContaining({ maker: 'Quillmere Radio Co.', model: 'Wren 3' }));
    expect(set.surveys.length).toBe(1);
    expect(set.surveys[0].readings.map((x: { id: number; text: string; state: string; ohms: number | null }) => [x.id, x.text, x.state, x.ohms])).toEqual([
      [r1, '262k', 'value', 262_000],
      [jasmine.any(Number), '', 'open', null],
    ]);

    const friendExport = await request(env.app).get('/api/export/sets').set(bearer(friend));
    expect(friendExport.body.sets.map((x: { label: string }) => x.label)).toEqual(['Friend\u2019s set']);
  });

  it('gives CSV with a header row and one row per reading with its set and survey columns (RFC 4180 quoting)', async () => {
    const env = await apiEnv();
    const tech = await userSession(['technician']);
    const own = await makeSet({ ownerId: tech.id, label: 'Parlour set, "the big one"', serial: 'SN-2' });
    const s = await makeSurvey({ setId: own.id });
    await addReading(s.id, { testPointKey: 'tp-r2', text: '262k', method: 'lead-lifted', liftedEnd: 1, note: 'lead lifted at B+1' });
    await addReading(s.id, { testPointKey: 'tp-r1', text: '9.8M' });
    const r = await request(env.app).get('/api/export/sets?format=csv').set(bearer(tech));
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toMatch(/^text\/csv/);
    const rows = r.text.split('\r\n');
    expect(rows[0]).toBe(EXPORT_CSV_HEADER.join(','));
    expect(rows.length).toBe(4); // header, two readings, and the empty string after the final CRLF
    expect(rows[1].startsWith(`${own.id},"Parlour set, ""the big one""",,SN-2,Quillmere Radio Co.,Wren 3,${s.id},intake,draft,1,`)).toBeTrue();
    expect(rows[1]).toContain(',tp-r2,');
    expect(rows[1]).toContain(',262k,value,262000,lead-lifted,1,');
    expect(rows[2]).toContain(',9.8M,value,9800000,in-circuit,,');
  });

  it('gives an empty export to a user with no sets, and refuses an unknown format (400)', async () => {
    const env = await apiEnv();
    const student = await userSession(['student']);
    const r = await request(env.app).get('/api/export/sets').set(bearer(student));
    expect(r.status).toBe(200);
    expect(r.body.sets).toEqual([]);
    expect((await request(env.app).get('/api/export/sets?format=xml').set(bearer(student))).status).toBe(400);
  });
});
