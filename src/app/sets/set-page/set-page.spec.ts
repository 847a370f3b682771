import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatTabGroupHarness } from '@angular/material/tabs/testing';
import { provideRouter } from '@angular/router';
import { clearAuthStorage, nextRequest, sessionFor } from '../../../testing/http-testing';
import { Auth } from '../../core/auth/auth';
import { authToken } from '../../core/http/auth-token';
import { httpErrors } from '../../core/http/http-errors';
import { sampleDocument, view } from '../../templates/testing/template-fixtures';
import { setDetail } from '../testing/set-fixtures';
import { SetPage } from './set-page';

describe('SetPage', () => {
  let fixture: ComponentFixture<SetPage>;
  let loader: HarnessLoader;
  let http: HttpTestingController;
  const text = () => (fixture.nativeElement as HTMLElement).textContent ?? '';

  async function open(set = setDetail()): Promise<void> {
    fixture = TestBed.createComponent(SetPage);
    fixture.componentRef.setInput('id', String(set.id));
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    (await nextRequest(http, `/api/sets/${set.id}`)).flush(set);
    await fixture.whenStable();
    (await nextRequest(http, '/api/templates/11/versions/2')).flush({ ...view().versions[0], templateId: 11, content: sampleDocument() });
    await fixture.whenStable();
  }

  beforeEach(() => {
    clearAuthStorage();
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(withInterceptors([httpErrors, authToken])), provideHttpClientTesting()],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(Auth).begin(sessionFor(['technician'], 1, 7));
  });
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('heads the page with the chassis, serial and status, and the hot-chassis caution for a hot set', async () => {
    await open();
    expect(text()).toContain('Wren on the shelf');
    expect(text()).toContain('Quillmere Radio Co. Wren 3');
    expect(text()).toContain('serial QW3-118');
    expect(text()).toContain('Hot chassis: the chassis may be at mains potential');
    expect(text()).not.toMatch(/\bis safe\b/i);
    const start = (fixture.nativeElement as HTMLElement).querySelector('a[href="/sets/5/surveys/new"]');
    expect(start?.textContent).toContain('Start survey');
  });

  it('leaves the caution out for a transformer set', async () => {
    await open(setDetail({ template: { ...setDetail().template, power: 'transformer', hotChassis: false } }));
    expect(text()).not.toContain('Hot chassis: the chassis may be at mains potential');
  });

  it('says "not shared with you" for a 404', async () => {
    fixture = TestBed.createComponent(SetPage);
    fixture.componentRef.setInput('id', '99');
    await fixture.whenStable();
    (await nextRequest(http, '/api/sets/99')).flush({ error: { code: 'not-found', message: 'Not found.' } }, { status: 404, statusText: 'Not Found' });
    await fixture.whenStable();
    expect(text()).toContain('No such set, or it is not shared with you.');
  });

  it('records a tube per socket of the template and reloads the set', async () => {
    await open();
    const tabs = await loader.getHarness(MatTabGroupHarness);
    await tabs.selectTab({ label: 'Tubes' });
    await fixture.whenStable();
    expect(text()).toContain('12AV6');
    expect(text()).toContain('not recorded');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Record V1' }))).click();
    const status = await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=status]' }));
    await status.open();
    await status.clickOptions({ text: 'wrong type' });
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=foundType]' }))).setValue('12AT6');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save' }))).click();
    const req = await nextRequest(http, (r) => r.method === 'PUT' && r.url === '/api/sets/5/tube-records/so-v1');
    expect(req.request.body).toEqual({ status: 'wrong-type', foundType: '12AT6', testResult: '', note: '' });
    req.flush({});
    (await nextRequest(http, '/api/sets/5')).flush(
      setDetail({ tubeRecords: [{ socketKey: 'so-v1', status: 'wrong-type', foundType: '12AT6', testResult: '', note: '', recordedBy: { id: 7, name: 'Ada Voss' }, updatedAt: '2026-03-02T10:00:00Z' }] }),
    );
    await fixture.whenStable();
    expect(text()).toContain('wrong type: 12AT6');
  });

  it('lists the surveys newest first with their verdict counts in words', async () => {
    await open(
      setDetail({
        surveys: [
          { ...setDetail().surveys[0], id: 31, startedAt: '2020-05-01T10:00:00Z', purpose: 'intake' },
          { ...setDetail().surveys[0], id: 32, startedAt: '2024-05-01T10:00:00Z', purpose: 'periodic', state: 'draft', completedAt: null },
        ],
      }),
    );
    const rows = Array.from((fixture.nativeElement as HTMLElement).querySelectorAll('table[aria-label="Surveys of this set"] tbody tr'));
    expect(rows.map((r) => r.querySelectorAll('td')[1].textContent?.trim())).toEqual(['periodic', 'intake']);
    expect(rows[1].textContent).toContain('2 in band · 0 near limit · 1 out · 0 inconclusive · 0 not read');
  });
});
