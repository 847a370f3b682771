import { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatButtonToggleHarness } from '@angular/material/button-toggle/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { Router } from '@angular/router';
import { clearAuthStorage, nextRequest } from '../../../testing/http-testing';
import { configureBed, mount } from '../../sets/testing/section-bed';
import { meterRecord } from '../../sets/testing/set-fixtures';
import { MeterForm, profileOf } from './meter-form';

describe('profileOf', () => {
  it('reads the ranges with the measurement core', () => {
    expect(profileOf({ kind: 'digital', autorange: false, lead: '0.2', digital: [{ fullScale: '1999', resolution: '1', pct: '0.8', counts: '2' }], analogue: [] })).toEqual({
      profile: { kind: 'digital', autorange: false, leadOhms: 0.2, ranges: [{ fullScaleOhms: 1999, resolutionOhms: 1, pctOfReading: 0.8, counts: 2 }] },
    });
    expect(profileOf({ kind: 'analogue', autorange: false, lead: '', digital: [], analogue: [{ centre: '12', arcPct: '3' }] })).toEqual({
      profile: { kind: 'analogue', leadOhms: 0, ranges: [{ centreOhms: 12, arcFraction: 0.03 }] },
    });
  });

  it("gives the domain's problems for a profile it cannot use", () => {
    const bad = profileOf({ kind: 'analogue', autorange: false, lead: '0.2', digital: [], analogue: [{ centre: '12', arcPct: '60' }] });
    expect(bad).toEqual({ problems: [jasmine.stringMatching(/arc error/)] });
    // Its twin with a usable arc error gives a profile.
    expect('profile' in profileOf({ kind: 'analogue', autorange: false, lead: '0.2', digital: [], analogue: [{ centre: '12', arcPct: '6' }] })).toBeTrue();
  });
});

describe('MeterForm', () => {
  let http: HttpTestingController;
  let navigate: jasmine.Spy;
  beforeEach(() => {
    http = configureBed();
    navigate = spyOn(TestBed.inject(Router), 'navigate').and.resolveTo(true);
  });
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  const input = (loader: Awaited<ReturnType<typeof mount>>['loader'], name: string) => loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }));

  it('adds an analogue profile with its check resistor; refuses a resistor without its tolerance first', async () => {
    const { fixture, loader, text } = await mount(MeterForm, {});
    await (await input(loader, 'name')).setValue('Grey analogue');
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: 'Analogue' }))).check();
    await fixture.whenStable();
    await (await input(loader, 'lead')).setValue('0.1');
    await (await input(loader, 'checkResistor')).setValue('10k');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Add the profile' }))).click();
    await fixture.whenStable();
    http.expectNone((r) => r.method === 'POST');
    expect(text()).toContain("Give the check resistor's tolerance");

    await (await input(loader, 'checkTolerance')).setValue('1');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Add the profile' }))).click();
    const req = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/meter-profiles');
    expect(req.request.body.name).toBe('Grey analogue');
    expect(req.request.body.profile.kind).toBe('analogue');
    expect(req.request.body.profile.leadOhms).toBe(0.1);
    expect(req.request.body.profile.ranges.length).toBeGreaterThan(0);
    expect(req.request.body.checkResistorOhms).toBe(10000);
    expect(req.request.body.checkResistorTolerancePct).toBe(1);
    expect(req.request.body.checkKind).toBe('check');
    req.flush(meterRecord({ id: 9 }), { status: 201, statusText: 'Created' });
    await fixture.whenStable();
    expect(navigate).toHaveBeenCalledWith(['/meters']);
  });

  it('edits a profile with its version, and says so when it went stale (409)', async () => {
    const { fixture, loader, text } = await mount(MeterForm, { id: '4' });
    (await nextRequest(http, '/api/meter-profiles/4')).flush(meterRecord());
    await fixture.whenStable();
    expect(await (await input(loader, 'name')).getValue()).toBe('Bench DMM');
    expect(await (await loader.getAllHarnesses(MatInputHarness.with({ selector: '[formControlName=fullScale]' }))).length).toBe(2);
    await (await input(loader, 'name')).setValue('Bench DMM (new leads)');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save' }))).click();
    const req = await nextRequest(http, (r) => r.method === 'PUT' && r.url === '/api/meter-profiles/4');
    expect(req.request.body.version).toBe(2);
    expect(req.request.body.name).toBe('Bench DMM (new leads)');
    expect(req.request.body.profile.ranges.map((r: { fullScaleOhms: number }) => r.fullScaleOhms)).toEqual([1999, 19990]);
    req.flush({ error: { code: 'stale', message: 'stale' } }, { status: 409, statusText: 'Conflict' });
    await fixture.whenStable();
    expect(text()).toContain('This profile was changed meanwhile');
    expect(navigate).not.toHaveBeenCalled();
  });
});
