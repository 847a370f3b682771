import { HttpTestingController } from '@angular/common/http/testing';
import { clearAuthStorage, nextRequest } from '../../../testing/http-testing';
import { configureBed, mount } from '../../sets/testing/section-bed';
import { PublicRecordPage } from './public-record';

describe('PublicRecordPage', () => {
  let http: HttpTestingController;
  beforeEach(() => (http = configureBed(null)));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('shows chassis, serial, surveys with counts in words and parts replaced, and certifies nothing', async () => {
    const { fixture, text } = await mount(PublicRecordPage, { token: 'abcdefghijklmnopqrstuvwxyz012345' });
    const req = await nextRequest(http, '/api/public/labels/abcdefghijklmnopqrstuvwxyz012345');
    expect(req.request.headers.has('Authorization')).toBeFalse();
    req.flush({
      chassis: { maker: 'Quillmere Radio Co.', model: 'Wren 3', chassisNumber: 'QW-3', yearFrom: 1951, yearTo: 1953 },
      serial: 'QW3-118',
      restorationLevel: 'conserve',
      surveys: [{ purpose: 'intake', state: 'complete', date: '2024-03-02T12:00:00Z', startedAt: '2024-03-02T10:00:00Z', completedAt: '2024-03-02T12:00:00Z', counts: { inBand: 2, nearLimit: 0, out: 1, inconclusive: 0, unread: 0 } }],
      partsReplaced: [{ ref: 'R1', text: '10M', date: '2024-03-04T10:00:00Z' }],
      firstPowerAt: null,
      gatesSigned: [{ title: 'Fuse in the hot lead', at: '2026-03-02T10:00:00Z' }],
      notice: 'A read-only record of what was measured and replaced on this set. It is a record, not a certification.',
    });
    await fixture.whenStable();
    expect(text()).toContain('Quillmere Radio Co. Wren 3');
    expect(text()).toContain('serial QW3-118');
    expect(text()).toContain('made 1951–1953');
    expect(text()).toContain('2 in band · 0 near limit · 1 out');
    expect(text()).toContain('R1: 10M');
    expect(text()).toContain('Fuse in the hot lead');
    expect(text()).toContain('It certifies nothing');
  });

  it('says unknown or revoked for a 404', async () => {
    const { fixture, text } = await mount(PublicRecordPage, { token: 'zzzzzzzzzzzzzzzzzzzzzzzz' });
    (await nextRequest(http, '/api/public/labels/zzzzzzzzzzzzzzzzzzzzzzzz')).flush({ error: { code: 'not-found', message: 'No such label, or it was revoked.' } }, { status: 404, statusText: 'Not Found' });
    await fixture.whenStable();
    expect(text()).toContain('This link is unknown or has been revoked');
  });
});
