import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpRequest } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatPaginatorHarness } from '@angular/material/paginator/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatSortHarness } from '@angular/material/sort/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import { clearAuthStorage, nextRequest, sessionFor } from '../../../testing/http-testing';
import { Auth } from '../../core/auth/auth';
import { authToken } from '../../core/http/auth-token';
import { httpErrors } from '../../core/http/http-errors';
import { summary } from '../testing/template-fixtures';
import { Library } from './library';

const library = (check: (p: HttpRequest<unknown>['params']) => boolean) => (req: HttpRequest<unknown>) => req.url === '/api/templates' && check(req.params);

describe('Library', () => {
  let fixture: ComponentFixture<Library>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  async function start(roles: Parameters<typeof sessionFor>[0]): Promise<void> {
    TestBed.inject(Auth).begin(sessionFor(roles, 1, 7));
    fixture = TestBed.createComponent(Library);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
  }

  async function firstPage(total = 60): Promise<void> {
    const req = await nextRequest(http, library((p) => p.get('page') === '1' && p.get('sort') === 'use'));
    req.flush({ items: [summary(), summary({ id: 12, maker: 'Harrowgate', model: 'Console 9', chassisNumber: '', kind: 'console', surveyCount: 1 })], total, page: 1, pageSize: 25 });
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

  it('asks for the first page sorted by use and shows each row with its counts and words', async () => {
    await start(['technician']);
    const req = await nextRequest(http, library(() => true));
    expect(req.request.params.keys().sort()).toEqual(['page', 'pageSize', 'sort']);
    expect(req.request.params.get('sort')).toBe('use');
    expect(req.request.params.get('page')).toBe('1');
    expect(req.request.params.get('pageSize')).toBe('25');
    req.flush({ items: [summary()], total: 1, page: 1, pageSize: 25 });
    await fixture.whenStable();
    const cells = await (await loader.getHarness(MatTableHarness)).getCellTextByColumnName();
    expect(cells['maker'].text[0]).toContain('Quillmere Radio Co.');
    // The model has its own column on a wide screen and sits beside the maker on a tablet.
    expect(cells['model']?.text[0] ?? cells['maker'].text[0]).toContain('Wren 3');
    expect(cells['chassis'].text).toEqual(['QW-3']);
    expect(cells['kind'].text).toEqual(['table radio']);
    expect(cells['stages'].text).toEqual(['1']);
    expect(cells['testPoints'].text).toEqual(['3']);
    expect(cells['versions'].text).toEqual(['2']);
    expect(cells['surveys'].text).toEqual(['4']);
  });

  it('searches from the first page with what was typed', async () => {
    await start(['technician']);
    await firstPage();
    await (await loader.getHarness(MatPaginatorHarness)).goToNextPage();
    (await nextRequest(http, library((p) => p.get('page') === '2'))).flush({ items: [], total: 60, page: 2, pageSize: 25 });
    await (await loader.getHarness(MatInputHarness.with({ selector: '[type=search]' }))).setValue('wren');
    const req = await nextRequest(http, library((p) => p.get('q') === 'wren'));
    expect(req.request.params.get('page')).toBe('1');
    req.flush({ items: [summary()], total: 1, page: 1, pageSize: 25 });
  });

  it('sorts by the column header clicked, and by the sort chooser', async () => {
    await start(['technician']);
    await firstPage();
    const sort = await loader.getHarness(MatSortHarness);
    const [maker] = await sort.getSortHeaders({ label: 'Maker' });
    await maker.click();
    const byMaker = await nextRequest(http, library((p) => p.get('sort') === 'maker'));
    expect(byMaker.request.params.get('page')).toBe('1');
    byMaker.flush({ items: [], total: 0, page: 1, pageSize: 25 });
    await fixture.whenStable();
    expect(await maker.getSortDirection()).toBe('asc');

    const chooser = await loader.getHarness(MatSelectHarness.with({ selector: '.sort mat-select' }));
    await chooser.open();
    await chooser.clickOptions({ text: 'Recently updated' });
    (await nextRequest(http, library((p) => p.get('sort') === 'updated'))).flush({ items: [], total: 0, page: 1, pageSize: 25 });
  });

  it('asks the API for the page and page size the paginator shows (1-based pages)', async () => {
    await start(['technician']);
    await firstPage();
    const paginator = await loader.getHarness(MatPaginatorHarness);
    await paginator.goToNextPage();
    const second = await nextRequest(http, library((p) => p.get('page') === '2'));
    expect(second.request.params.get('pageSize')).toBe('25');
    second.flush({ items: [], total: 60, page: 2, pageSize: 25 });
    await paginator.setPageSize(50);
    (await nextRequest(http, library((p) => p.get('pageSize') === '50'))).flush({ items: [], total: 60, page: 1, pageSize: 50 });
  });

  it('sends the filters it is given, and only those', async () => {
    await start(['technician']);
    await firstPage();
    await (await loader.getHarness(MatButtonHarness.with({ text: /Filters/ }))).click();
    await (await loader.getHarness(MatInputHarness.with({ placeholder: '', selector: '[formControlName=tubeType]' }))).setValue('12AV6');
    const req = await nextRequest(http, library((p) => p.get('tubeType') === '12AV6'));
    expect(req.request.params.has('maker')).toBeFalse();
    expect(req.request.params.has('kind')).toBeFalse();
    req.flush({ items: [], total: 0, page: 1, pageSize: 25 });
    await fixture.whenStable();
    expect((fixture.nativeElement as HTMLElement).textContent).toContain('No template matches.');
  });

  it('offers New template and Import to authors, not to technicians', async () => {
    await start(['author']);
    await firstPage();
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: /New template/ }))).not.toBeNull();
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: /Import/ }))).not.toBeNull();
  });

  it('hides New template and Import from a technician', async () => {
    await start(['technician']);
    await firstPage();
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: /New template/ }))).toBeNull();
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: /Import/ }))).toBeNull();
  });
});
