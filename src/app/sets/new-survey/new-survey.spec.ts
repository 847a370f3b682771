import { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatButtonToggleHarness } from '@angular/material/button-toggle/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { Router } from '@angular/router';
import { clearAuthStorage, nextRequest } from '../../../testing/http-testing';
import { view } from '../../templates/testing/template-fixtures';
import { configureBed, mount } from '../testing/section-bed';
import { meterRecord, setDetail, surveyView } from '../testing/set-fixtures';
import { NewSurvey, ruleOf } from './new-survey';

describe('ruleOf', () => {
  const base = { bandFrom: 'template' as const, allowanceLow: '-20', allowanceHigh: '20', decision: 'simple' as const, nearLimit: '0.75' };

  it('builds the template rule, and an allowance rule with its two sides', () => {
    expect(ruleOf(base)).toEqual({ rule: { decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'template' } });
    expect(ruleOf({ ...base, bandFrom: 'allowance', allowanceLow: '-10', allowanceHigh: '30', decision: 'guarded' })).toEqual({
      rule: { decision: 'guarded', nearLimitFraction: 0.75, bandFrom: 'allowance', allowance: { lowPct: -10, highPct: 30 } },
    });
  });

  it('names the field it refuses', () => {
    expect(ruleOf({ ...base, nearLimit: '1.2' })).toEqual({ field: 'nearLimit', message: jasmine.any(String) });
    expect(ruleOf({ ...base, bandFrom: 'allowance', allowanceLow: '10' })).toEqual({ field: 'allowanceLow', message: jasmine.any(String) });
    expect(ruleOf({ ...base, bandFrom: 'allowance', allowanceHigh: '-5' })).toEqual({ field: 'allowanceHigh', message: jasmine.any(String) });
  });
});

describe('NewSurvey', () => {
  let http: HttpTestingController;
  beforeEach(() => (http = configureBed()));
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  async function open() {
    const m = await mount(NewSurvey, { id: '5' });
    (await nextRequest(http, '/api/sets/5')).flush(setDetail());
    (await nextRequest(http, '/api/templates/11')).flush(view());
    (await nextRequest(http, (r) => r.url === '/api/meter-profiles')).flush({ items: [meterRecord(), meterRecord({ id: 5, name: 'Old analogue', archived: true })] });
    await m.fixture.whenStable();
    return m;
  }

  it('refuses a bad allowance before sending anything', async () => {
    const { fixture, loader, text } = await open();
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: 'A restoration allowance' }))).check();
    await (await loader.getHarness(MatInputHarness.with({ selector: '[data-test=allowanceLow]' }))).setValue('15');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Start the survey' }))).click();
    await fixture.whenStable();
    http.expectNone((r) => r.method === 'POST');
    expect(text()).toContain('A negative percentage');
  });

  it('starts a survey with purpose, version, meter, rule and conditions, then opens its grid', async () => {
    const navigate = spyOn(TestBed.inject(Router), 'navigate').and.resolveTo(true);
    const { loader, text } = await open();
    expect(text()).toContain('The points, their order and the conditions carry over from the newest survey; the values never do.');
    expect(text()).toContain('Caution: this work can hurt you');
    const meter = await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=meterProfileId]' }));
    await meter.open();
    const options = await meter.getOptions();
    expect(options.length).toBe(2); // none, and the one profile not archived
    await meter.clickOptions({ text: /Bench DMM/ });
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=controls]' }))).setValue('volume max, tone bright');
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=ambientC]' }))).setValue('21');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Start the survey' }))).click();
    const req = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/sets/5/surveys');
    expect(req.request.body).toEqual({
      purpose: 'after-repair',
      versionNumber: 2,
      meterProfileId: 4,
      rule: { decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'template' },
      conditions: { tubesIn: false, speakerConnected: true, controls: 'volume max, tone bright', ambientC: 21, note: '' },
    });
    const answer = surveyView();
    req.flush({ ...answer, survey: { ...answer.survey, id: 77 } }, { status: 201, statusText: 'Created' });
    await new Promise((r) => setTimeout(r));
    expect(navigate).toHaveBeenCalledWith(['/surveys', 77]);
  });
});
