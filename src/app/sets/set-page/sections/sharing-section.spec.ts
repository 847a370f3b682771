import { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { clearAuthStorage, nextRequest, sessionFor } from '../../../../testing/http-testing';
import { Auth } from '../../../core/auth/auth';
import { configureBed, mount } from '../../testing/section-bed';
import { BRAM, setDetail } from '../../testing/set-fixtures';
import { SharingSection } from './sharing-section';

describe('SharingSection', () => {
  let http: HttpTestingController;
  beforeEach(() => (http = configureBed()));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('lets the owner add and remove people by account number and save the list', async () => {
    const { fixture, loader, text } = await mount(SharingSection, { set: setDetail({ sharedWith: [BRAM] }) });
    let changed = 0;
    fixture.componentInstance.changed.subscribe(() => changed++);
    expect(text()).toContain('Bram Oduya');
    const id = await loader.getHarness(MatInputHarness);
    await id.setValue('twelve');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Add' }))).click();
    expect(text()).toContain('An account number is a whole number');
    await id.setValue('12');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Add' }))).click();
    await (await loader.getHarness(MatButtonHarness.with({ text: /Remove Bram Oduya/ }))).click();
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save sharing' }))).click();
    const req = await nextRequest(http, (r) => r.method === 'PUT' && r.url === '/api/sets/5/sharing');
    expect(req.request.body).toEqual({ userIds: [12] });
    req.flush(setDetail({ sharedWith: [{ id: 12, name: 'Cato Pell' }] }));
    await fixture.whenStable();
    expect(text()).toContain('Sharing saved.');
    expect(changed).toBe(1);
  });

  it('shows a shared-with user the list without the means to change it', async () => {
    TestBed.inject(Auth).begin(sessionFor(['technician'], 2, 9));
    const { loader, text } = await mount(SharingSection, { set: setDetail({ sharedWith: [BRAM], sharedWithMe: true }) });
    expect(text()).toContain('Only the owner or an admin changes who the set is shared with.');
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: 'Save sharing' }))).toHaveSize(0);
  });
});
