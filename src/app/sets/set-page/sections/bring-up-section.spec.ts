import { HttpTestingController } from '@angular/common/http/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatCheckboxHarness } from '@angular/material/checkbox/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { clearAuthStorage, nextRequest } from '../../../../testing/http-testing';
import { configureBed, mount } from '../../testing/section-bed';
import { ADA, setDetail } from '../../testing/set-fixtures';
import { BringUpSection } from './bring-up-section';

describe('BringUpSection', () => {
  let http: HttpTestingController;
  beforeEach(() => (http = configureBed()));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('offers no form before first power is recorded, and says where to record it', async () => {
    const { fixture, text } = await mount(BringUpSection, { set: setDetail() });
    (await nextRequest(http, '/api/sets/5/bring-up')).flush([]);
    await fixture.whenStable();
    expect(text()).toContain('once "ready for first power" is recorded under Safety gates');
    expect((fixture.nativeElement as HTMLElement).querySelector('form')).toBeNull();
  });

  it('shows the refusal of a step the API will not log (409)', async () => {
    const { fixture, loader, text } = await mount(BringUpSection, { set: setDetail({ firstPowerAt: '2026-03-05T10:00:00Z' }) });
    (await nextRequest(http, '/api/sets/5/bring-up')).flush([]);
    await fixture.whenStable();
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Add to the log' }))).click();
    (await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/sets/5/bring-up')).flush(
      { error: { code: 'first-power-not-recorded', message: 'Record "ready for first power" before logging the bring-up.' } },
      { status: 409, statusText: 'Conflict' },
    );
    await fixture.whenStable();
    expect(text()).toContain('Record it under Safety gates first.');
    expect((fixture.nativeElement as HTMLElement).querySelector('form')).toBeNull();
  });

  it('refuses mains volts beyond 300 before sending', async () => {
    const { fixture, loader, text } = await mount(BringUpSection, { set: setDetail({ firstPowerAt: '2026-03-05T10:00:00Z' }) });
    (await nextRequest(http, '/api/sets/5/bring-up')).flush([]);
    await fixture.whenStable();
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=mainsVolts]' }))).setValue('2400');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Add to the log' }))).click();
    await fixture.whenStable();
    http.expectNone((r) => r.method === 'POST');
    expect(text()).toContain('A number of volts from 0 to 300');
  });

  it('adds a limiter step with mains volts, current, a B+ reading and what was seen', async () => {
    const { fixture, loader, text } = await mount(BringUpSection, { set: setDetail({ firstPowerAt: '2026-03-05T10:00:00Z' }) });
    (await nextRequest(http, '/api/sets/5/bring-up')).flush([]);
    await fixture.whenStable();
    expect(text()).toContain('Power is on from here');
    const input = (name: string) => loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }));
    await (await input('setting')).setValue('60 W lamp');
    await (await input('mainsVolts')).setValue('118');
    await (await input('currentAmps')).setValue('0,32');
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add a B\+ reading/ }))).click();
    await (await input('volts')).setValue('95');
    await (await loader.getHarness(MatCheckboxHarness.with({ label: 'hum' }))).check();
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Add to the log' }))).click();
    const req = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/sets/5/bring-up');
    expect(req.request.body).toEqual({ step: 'limiter-lamp', setting: '60 W lamp', mainsVolts: 118, currentAmps: 0.32, bPlus: [{ node: 'B+', volts: 95 }], observations: ['hum'], note: '' });
    req.flush({ id: 1, ...req.request.body, recordedBy: ADA, createdAt: '2026-03-05T10:10:00Z' });
    await fixture.whenStable();
    expect(text()).toContain('118 V mains');
    expect(text()).toContain('B+: 95 V');
    expect(text()).toContain('Seen: hum');
  });
});
