import { HttpTestingController } from '@angular/common/http/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { clearAuthStorage, nextRequest } from '../../../../testing/http-testing';
import { configureBed, mount } from '../../testing/section-bed';
import { setDetail } from '../../testing/set-fixtures';
import { IntakeSection } from './intake-section';

describe('IntakeSection', () => {
  let http: HttpTestingController;
  beforeEach(() => (http = configureBed()));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('refuses an empty label, then saves the changed job status with the set version', async () => {
    const { fixture, loader, text } = await mount(IntakeSection, { set: setDetail() });
    let emitted: unknown = null;
    fixture.componentInstance.changed.subscribe((s) => (emitted = s));
    const label = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=label]' }));
    expect(await label.getValue()).toBe('Wren on the shelf');
    await label.setValue('');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save the intake record' }))).click();
    await fixture.whenStable();
    http.expectNone((r) => r.method === 'PATCH');
    await label.setValue('Wren on the shelf');
    const status = await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=jobStatus]' }));
    await status.open();
    await status.clickOptions({ text: 'waiting for parts' });
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save the intake record' }))).click();
    const req = await nextRequest(http, (r) => r.method === 'PATCH' && r.url === '/api/sets/5');
    expect(req.request.body).toEqual(jasmine.objectContaining({ jobStatus: 'waiting-parts', label: 'Wren on the shelf', version: 3 }));
    const updated = setDetail({ jobStatus: 'waiting-parts', version: 4 });
    req.flush(updated);
    await fixture.whenStable();
    expect(text()).toContain('Saved.');
    expect(emitted).toEqual(updated);
  });
});
