import { HttpTestingController } from '@angular/common/http/testing';
import { ComponentFixture } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatButtonToggleHarness } from '@angular/material/button-toggle/testing';
import { MatCheckboxHarness } from '@angular/material/checkbox/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import type { AssignmentDetail } from '@domain/class-format';
import type { SetSummary, SurveySummary } from '@domain/set-format';
import { clearAuthStorage, nextRequest } from '../../../../testing/http-testing';
import { apiError, classBed, mountPage } from '../../testing/class-bed';
import { assignmentDetail, classDetail } from '../../testing/class-fixtures';
import { AssignmentForm, assignmentRule } from './assignment-form';

function set(id: number, templateId: number, label: string): SetSummary {
  return {
    id,
    label,
    accessionNumber: '',
    customer: '',
    jobStatus: 'surveying',
    serial: `S-${id}`,
    restorationLevel: 'repair',
    template: { id: templateId, maker: templateId === 11 ? 'Quillmere Radio Co.' : 'Harlow & Finch', model: templateId === 11 ? 'Wren 3' : 'Lark 5', chassisNumber: '', power: 'ac-dc', hotChassis: true },
    owner: { id: 7, name: 'Ada Voss' },
    sharedWithMe: false,
    surveyCount: 1,
    lastSurvey: null,
    openLiftedLeads: 0,
    firstPowerAt: null,
    updatedAt: '2027-01-01T10:00:00Z',
  };
}

function survey(id: number, state: SurveySummary['state'], purpose: SurveySummary['purpose'] = 'intake'): SurveySummary {
  return { id, setId: 5, purpose, state, templateId: 11, versionNumber: 3, meterName: 'Bench DMM', startedBy: { id: 7, name: 'Ada Voss' }, startedAt: '2027-01-02T10:00:00Z', completedAt: state === 'complete' ? '2027-01-03T10:00:00Z' : null, counts: { inBand: 3, nearLimit: 0, out: 0, inconclusive: 0, unread: 0 } };
}

describe('AssignmentForm', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<AssignmentForm>;
  let loader: HarnessLoader;
  let text: () => string;
  let created: AssignmentDetail[];

  beforeEach(async () => {
    ({ http } = classBed(['instructor'], 7));
    ({ fixture, loader, text } = await mountPage(AssignmentForm, { cls: classDetail() }));
    created = [];
    fixture.componentInstance.created.subscribe((a) => created.push(a));
    (await nextRequest(http, (r) => r.url === '/api/sets')).flush({ items: [set(5, 11, 'Bench Wren A'), set(6, 12, 'Bench Lark'), set(8, 11, 'Spare Wren')], total: 3, page: 1, pageSize: 100 });
    await fixture.whenStable();
  });
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  const select = (name: string) => loader.getHarness(MatSelectHarness.with({ selector: `[formControlName=${name}]` }));
  const input = (name: string) => loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }));

  async function chooseWren(): Promise<void> {
    const template = await select('templateId');
    await template.open();
    expect((await Promise.all((await template.getOptions()).map((o) => o.getText())))).toEqual(['Harlow & Finch Lark 5', 'Quillmere Radio Co. Wren 3']);
    await template.clickOptions({ text: 'Quillmere Radio Co. Wren 3' });
    (await nextRequest(http, '/api/templates/11')).flush({
      id: 11,
      versions: [
        { number: 1, state: 'retired', changelog: null },
        { number: 2, state: 'published', changelog: 'Audio stage values' },
        { number: 3, state: 'published', changelog: 'Converter added' },
      ],
    });
    await fixture.whenStable();
    const setSelect = await select('setId');
    await setSelect.open();
    expect((await Promise.all((await setSelect.getOptions()).map((o) => o.getText())))).toEqual(['Bench Wren A · serial S-5', 'Spare Wren · serial S-8']);
    await setSelect.clickOptions({ text: /Bench Wren A/ });
    (await nextRequest(http, '/api/sets/5/surveys')).flush({ items: [survey(70, 'complete'), survey(71, 'draft'), survey(72, 'complete', 'assignment'), survey(73, 'complete', 'periodic'), { ...survey(74, 'complete'), versionNumber: 2 }] });
    await fixture.whenStable();
  }

  it('offers the newest published version, the sets of that template and only their complete non-class surveys of that version as reference', async () => {
    await chooseWren();
    expect(await (await select('versionNumber')).getValueText()).toContain('Version 3');
    const ref = await select('referenceSurveyId');
    await ref.open();
    // "None yet", then surveys 70 and 73 (version 3); not the draft, the class survey or the version-2 survey.
    expect((await ref.getOptions()).length).toBe(3);
    await ref.clickOptions({ text: /intake/ });
    const version = await select('versionNumber');
    await version.open();
    await version.clickOptions({ text: /Version 2/ });
    await fixture.whenStable();
    await ref.open();
    expect((await ref.getOptions()).length).toBe(2);
    expect(await ref.getValueText()).toBe('');
  });

  it('refuses a due date in the past and a missing title without a request', async () => {
    await chooseWren();
    await (await input('dueAt')).setValue('2001-02-03T10:00');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Create the assignment' }))).click();
    await fixture.whenStable();
    expect(text()).toContain('The due date is in the past.');
    expect(text()).toContain('Give the assignment a title.');
    http.expectNone((r) => r.method === 'POST');
  });

  it('creates the assignment with the allowance rule, predict first and hidden verdicts', async () => {
    await chooseWren();
    const ref = await select('referenceSurveyId');
    await ref.open();
    await ref.clickOptions({ text: /intake/ });
    await (await input('title')).setValue('Wren 3: the audio stage');
    await (await input('dueAt')).setValue('2031-04-01T18:00');
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: 'A restoration allowance' }))).check();
    await (await loader.getHarness(MatCheckboxHarness.with({ label: /Predict first/ }))).check();
    await (await loader.getHarness(MatCheckboxHarness.with({ label: /Show verdicts/ }))).uncheck();
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Create the assignment' }))).click();
    const req = await nextRequest(http, (r) => r.method === 'POST');
    expect(req.request.url).toBe('/api/classes/3/assignments');
    expect(req.request.body).toEqual({
      title: 'Wren 3: the audio stage',
      instructions: '',
      templateId: 11,
      versionNumber: 3,
      setId: 5,
      dueAt: new Date('2031-04-01T18:00').toISOString(),
      rule: { decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'allowance', allowance: { lowPct: -20, highPct: 20 } },
      referenceSurveyId: 70,
      predictFirst: true,
      showVerdicts: false,
    });
    req.flush(assignmentDetail(), { status: 201, statusText: 'Created' });
    await fixture.whenStable();
    expect(created.map((a) => a.id)).toEqual([41]);
  });

  it('shows the API refusal (a version that is not published) beside the form', async () => {
    await chooseWren();
    await (await input('title')).setValue('Wren');
    await (await input('dueAt')).setValue('2031-04-01T18:00');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Create the assignment' }))).click();
    (await nextRequest(http, (r) => r.method === 'POST')).flush(...apiError(409, 'version-not-published', 'Version 3 is not published.'));
    await fixture.whenStable();
    expect(text()).toContain('Version 3 is not published.');
    expect(created).toEqual([]);
  });

  it('words the allowance rule and refuses a positive lower allowance', () => {
    expect(assignmentRule('template', '', '')).toEqual({ decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'template' });
    expect(assignmentRule('allowance', '−15', '25')).toEqual({ decision: 'simple', nearLimitFraction: 0.75, bandFrom: 'allowance', allowance: { lowPct: -15, highPct: 25 } });
    expect(assignmentRule('allowance', '10', '20')).toEqual({ field: 'allowanceLow', message: 'A negative percentage, such as −20.' });
  });
});
