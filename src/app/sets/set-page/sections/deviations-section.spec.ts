import { HttpTestingController } from '@angular/common/http/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { clearAuthStorage, nextRequest } from '../../../../testing/http-testing';
import { sampleDocument } from '../../../templates/testing/template-fixtures';
import { configureBed, mount } from '../../testing/section-bed';
import { setDetail } from '../../testing/set-fixtures';
import { DeviationsSection, deviationKey, deviationNominal } from './deviations-section';

describe('deviationNominal', () => {
  it('reads values and the open and short states with the measurement core', () => {
    expect(deviationNominal('4k7')).toEqual({ nominal: { ohms: 4700, text: '4k7' } });
    expect(deviationNominal('open')).toEqual({ nominal: { state: 'open' } });
    expect(deviationNominal('short')).toEqual({ nominal: { state: 'short' } });
  });

  it("refuses what the core cannot read, with the core's message, and reading states that are not values", () => {
    const bad = deviationNominal('4m7');
    expect('error' in bad && bad.error.length > 0).toBeTrue();
    expect(deviationNominal('climbing')).toEqual({ error: jasmine.stringMatching(/value/) });
  });
});

describe('deviationKey', () => {
  it('makes distinct dv- keys', () => {
    const a = deviationKey();
    expect(a).toMatch(/^dv-[0-9a-f]{16}$/);
    expect(deviationKey()).not.toBe(a);
  });
});

describe('DeviationsSection', () => {
  let http: HttpTestingController;
  beforeEach(() => (http = configureBed()));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('adds a deviation by PATCHing the whole list with the set version, and refuses a value the core cannot read', async () => {
    const { fixture, loader, text } = await mount(DeviationsSection, { set: setDetail(), doc: sampleDocument() });
    let emitted: unknown = null;
    fixture.componentInstance.changed.subscribe((s) => (emitted = s));
    const component = await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=componentKey]' }));
    await component.open();
    await component.clickOptions({ text: /^R2/ });
    const value = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=value]' }));
    await value.setValue('22m');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Add the deviation' }))).click();
    await fixture.whenStable();
    http.expectNone((r) => r.method === 'PATCH');
    expect(text()).toContain('22m');

    await value.setValue('220k');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Add the deviation' }))).click();
    const req = await nextRequest(http, (r) => r.method === 'PATCH' && r.url === '/api/sets/5');
    expect(req.request.body.version).toBe(3);
    expect(req.request.body.deviations).toEqual([
      { key: jasmine.stringMatching(/^dv-/), kind: 'non-original', componentKey: 'c-r2', nominal: { ohms: 220000, text: '220k' }, tolerancePct: null, note: '' },
    ]);
    const updated = setDetail({ version: 4, deviations: req.request.body.deviations });
    req.flush(updated);
    await fixture.whenStable();
    expect(emitted).toEqual(updated);
  });

  it('says the set changed meanwhile on a 409', async () => {
    const dv = { key: 'dv-1', kind: 'factory-change' as const, componentKey: 'c-r1', nominal: { ohms: 4.7e6, text: '4M7' }, tolerancePct: 10, note: 'from serial 100' };
    const { fixture, loader, text } = await mount(DeviationsSection, { set: setDetail({ deviations: [dv] }), doc: sampleDocument() });
    expect(text()).toContain('R1');
    expect(text()).toContain('factory change in this serial range');
    await (await loader.getHarness(MatButtonHarness.with({ text: /^Remove/ }))).click();
    const req = await nextRequest(http, (r) => r.method === 'PATCH' && r.url === '/api/sets/5');
    expect(req.request.body).toEqual({ deviations: [], version: 3 });
    req.flush({ error: { code: 'stale', message: 'stale version' } }, { status: 409, statusText: 'Conflict' });
    await fixture.whenStable();
    expect(text()).toContain('The set was changed meanwhile');
  });
});
