import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpRequest } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import { clearAuthStorage, nextRequest, sessionFor } from '../../../testing/http-testing';
import { Auth } from '../../core/auth/auth';
import { authToken } from '../../core/http/auth-token';
import { httpErrors } from '../../core/http/http-errors';
import { setDetail } from '../testing/set-fixtures';
import { SetList } from './set-list';

const sets = (check: (p: HttpRequest<unknown>['params']) => boolean) => (req: HttpRequest<unknown>) => req.url === '/api/sets' && check(req.params);

describe('SetList', () => {
  let fixture: ComponentFixture<SetList>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  async function start(roles: Parameters<typeof sessionFor>[0]): Promise<void> {
    TestBed.inject(Auth).begin(sessionFor(roles, 1, 7));
    fixture = TestBed.createComponent(SetList);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
  }

  beforeEach(() => {
    clearAuthStorage();
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(withInterceptors([httpErrors, authToken])), provideHttpClientTesting()],
    });
    http = TestBed.inject(HttpTestingController);
  });
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('shows each set with its chassis, serial, status words, last survey and open leads', async () => {
    await start(['technician']);
    (await nextRequest(http, sets((p) => p.get('page') === '1' && !p.has('q')))).flush({
      items: [setDetail({ openLiftedLeads: 2 }), setDetail({ id: 6, label: 'Shop job 118', customer: 'R. Penhallow', jobStatus: 'waiting-parts', lastSurvey: null, surveyCount: 0, template: { ...setDetail().template, hotChassis: false } })],
      total: 2,
      page: 1,
      pageSize: 25,
    });
    await fixture.whenStable();
    const cells = await (await loader.getHarness(MatTableHarness)).getCellTextByColumnName();
    expect(cells['label'].text[0]).toContain('Wren on the shelf');
    expect(cells['label'].text[0]).toContain('Accession ACC-0042');
    expect(cells['chassis'].text[0]).toContain('hot chassis');
    expect(cells['chassis'].text[1]).not.toContain('hot chassis');
    expect(cells['serial'].text[0]).toBe('QW3-118');
    expect(cells['status'].text).toEqual(['surveying', 'waiting for parts']);
    expect(cells['lastSurvey'].text[0]).toContain('intake');
    expect(cells['lastSurvey'].text[1]).toBe('none yet');
    expect(cells['leads'].text[0]).toContain('2');
    expect((fixture.nativeElement as HTMLElement).textContent).toContain('2 sets');
  });

  it('searches and filters by job status from the first page', async () => {
    await start(['technician']);
    (await nextRequest(http, sets(() => true))).flush({ items: [], total: 0, page: 1, pageSize: 25 });
    await (await loader.getHarness(MatInputHarness.with({ selector: '[type=search]' }))).setValue('wren');
    (await nextRequest(http, sets((p) => p.get('q') === 'wren'))).flush({ items: [], total: 0, page: 1, pageSize: 25 });
    const status = await loader.getHarness(MatSelectHarness);
    await status.open();
    await status.clickOptions({ text: 'done' });
    const req = await nextRequest(http, sets((p) => p.get('status') === 'done'));
    expect(req.request.params.get('q')).toBe('wren');
    expect(req.request.params.get('page')).toBe('1');
    req.flush({ items: [], total: 0, page: 1, pageSize: 25 });
    await fixture.whenStable();
    expect((fixture.nativeElement as HTMLElement).textContent).toContain('No set matches.');
  });

  it('offers a new set to a technician but not to a student', async () => {
    await start(['technician']);
    (await nextRequest(http, sets(() => true))).flush({ items: [], total: 0, page: 1, pageSize: 25 });
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /New set/ }))).toHaveSize(1);
    fixture.destroy();
    await start(['student']);
    (await nextRequest(http, sets(() => true))).flush({ items: [], total: 0, page: 1, pageSize: 25 });
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /New set/ }))).toHaveSize(0);
  });

  it('exports as CSV, and says so when the export fails', async () => {
    await start(['technician']);
    (await nextRequest(http, sets(() => true))).flush({ items: [], total: 0, page: 1, pageSize: 25 });
    const click = spyOn(HTMLAnchorElement.prototype, 'click');
    await (await loader.getHarness(MatButtonHarness.with({ text: /Export CSV/ }))).click();
    (await nextRequest(http, (r) => r.url === '/api/export/sets' && r.params.get('format') === 'csv')).flush('set\n', { headers: { 'Content-Disposition': 'attachment; filename="sets.csv"' } });
    await fixture.whenStable();
    expect(click).toHaveBeenCalledTimes(1);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Export JSON/ }))).click();
    (await nextRequest(http, (r) => r.url === '/api/export/sets' && r.params.get('format') === 'json')).flush({ error: { code: 'boom', message: 'The server ran into a problem.' } }, { status: 500, statusText: 'Error' });
    await fixture.whenStable();
    expect(click).toHaveBeenCalledTimes(1);
    expect((fixture.nativeElement as HTMLElement).querySelector('[role=alert]')?.textContent).toContain('The export failed');
  });
});
