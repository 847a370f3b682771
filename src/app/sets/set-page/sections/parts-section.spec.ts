import { HttpTestingController } from '@angular/common/http/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { clearAuthStorage, nextRequest } from '../../../../testing/http-testing';
import { sampleDocument } from '../../../templates/testing/template-fixtures';
import { configureBed, mount } from '../../testing/section-bed';
import { ADA, setDetail } from '../../testing/set-fixtures';
import { PartsSection, newPartOf, optionalNumber } from './parts-section';

describe('newPartOf', () => {
  const blank = { text: '', watts: '', volts: '', uF: '', kind: '', measuredText: '' };

  it('parses a resistor value and its measured value with the core, and plain ratings', () => {
    expect(newPartOf({ ...blank, text: '47k', watts: '0,5', volts: '350', kind: 'metal film', measuredText: '46k8' })).toEqual({
      text: '47k',
      ohms: 47000,
      uF: null,
      watts: 0.5,
      volts: 350,
      kind: 'metal film',
      measuredText: '46k8',
      measuredOhms: 46800,
    });
  });

  it('names the field it refuses', () => {
    expect(newPartOf({ ...blank, watts: 'half' })).toEqual({ error: jasmine.any(String), field: 'newPart.watts' });
    expect(newPartOf({ ...blank, text: '4m7' })).toEqual({ error: jasmine.any(String), field: 'newPart.text' });
  });

  it('takes a capacitor by µF without reading its text as ohms', () => {
    const p = newPartOf({ ...blank, text: '0.047 µF film', uF: '0.047', volts: '630' });
    expect(p).toEqual(jasmine.objectContaining({ uF: 0.047, ohms: null, volts: 630 }));
  });

  it('optionalNumber: empty is null, junk is NaN', () => {
    expect(optionalNumber(' ')).toBeNull();
    expect(optionalNumber('1,5')).toBe(1.5);
    expect(optionalNumber('x')).toBeNaN();
  });
});

describe('PartsSection', () => {
  let http: HttpTestingController;
  beforeEach(() => (http = configureBed()));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('refuses a line with neither a prompting reading nor a reason, then records a replacement and shows the capacitor findings', async () => {
    const { fixture, loader, text } = await mount(PartsSection, { set: setDetail(), doc: sampleDocument() });
    (await nextRequest(http, '/api/sets/5/parts-record')).flush([]);
    await fixture.whenStable();
    expect(text()).toContain('Nothing recorded yet.');
    const component = await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=componentKey]' }));
    await component.open();
    await component.clickOptions({ text: /^R2/ });
    const input = (name: string) => loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }));
    await (await input('text')).setValue('270k');
    await (await input('watts')).setValue('1');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Record' }))).click();
    await fixture.whenStable();
    http.expectNone((r) => r.method === 'POST');
    expect(text()).toContain('Without a prompting reading, give the reason.');

    await (await input('readingId')).setValue('103');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Record' }))).click();
    const req = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/sets/5/parts-record');
    expect(req.request.body).toEqual(
      jasmine.objectContaining({ componentKey: 'c-r2', action: 'replaced', readingId: 103, newPart: { text: '270k', uF: null, watts: 1, volts: null, kind: '', measuredText: '' } }),
    );
    req.flush({ line: null, warnings: [{ code: 'volts', severity: 'warning', message: 'Working voltage below the B+ at this point.' }] });
    (await nextRequest(http, '/api/sets/5/parts-record')).flush([
      { id: 1, componentKey: 'c-r2', componentRef: 'R2', action: 'replaced', newPart: { text: '270k', ohms: 270000, uF: null, watts: 1, volts: null, kind: '', measuredText: '', measuredOhms: null }, readingId: 103, reason: '', note: '', recordedBy: ADA, createdAt: '2026-03-02T10:00:00Z' },
    ]);
    await fixture.whenStable();
    expect(text()).toContain('Working voltage below the B+ at this point.');
    expect(text()).toContain('prompted by a reading');
  });
});
