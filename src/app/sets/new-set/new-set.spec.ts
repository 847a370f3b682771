import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatAutocompleteHarness } from '@angular/material/autocomplete/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { Router, provideRouter } from '@angular/router';
import { clearAuthStorage, nextRequest, sessionFor } from '../../../testing/http-testing';
import { Auth } from '../../core/auth/auth';
import { authToken } from '../../core/http/auth-token';
import { httpErrors } from '../../core/http/http-errors';
import { summary } from '../../templates/testing/template-fixtures';
import { setDetail } from '../testing/set-fixtures';
import { NewSet } from './new-set';

describe('NewSet', () => {
  let fixture: ComponentFixture<NewSet>;
  let loader: HarnessLoader;
  let http: HttpTestingController;

  beforeEach(async () => {
    clearAuthStorage();
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(withInterceptors([httpErrors, authToken])), provideHttpClientTesting()],
    });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(Auth).begin(sessionFor(['technician'], 1, 7));
    fixture = TestBed.createComponent(NewSet);
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    // Only templates with a published version are offered.
    (await nextRequest(http, (r) => r.url === '/api/templates' && !r.params.has('q'))).flush({
      items: [summary(), summary({ id: 12, maker: 'Harrowgate', model: 'Draft only', latestVersion: null })],
      total: 2,
      page: 1,
      pageSize: 20,
    });
    await fixture.whenStable();
  });
  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  const input = (name: string) => loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }));

  it('refuses to create a set without a template and says why, sending nothing', async () => {
    await (await input('label')).setValue('Kitchen radio');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Create the set' }))).click();
    await fixture.whenStable();
    expect((fixture.nativeElement as HTMLElement).textContent).toContain('Choose the template this set follows.');
    http.expectNone((r) => r.method === 'POST');
  });

  it('creates the set with the chosen template and the intake fields, then opens it', async () => {
    const navigate = spyOn(TestBed.inject(Router), 'navigate').and.resolveTo(true);
    const auto = await loader.getHarness(MatAutocompleteHarness);
    await auto.focus();
    const options = await auto.getOptions();
    expect(options.length).toBe(1);
    expect(await options[0].getText()).toContain('Quillmere Radio Co. Wren 3');
    await options[0].click();
    await (await input('label')).setValue('Kitchen radio');
    await (await input('serial')).setValue('QW3-118');
    await (await input('complaint')).setValue('hums, no stations');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Create the set' }))).click();
    const req = await nextRequest(http, (r) => r.method === 'POST' && r.url === '/api/sets');
    expect(req.request.body).toEqual(
      jasmine.objectContaining({ templateId: 11, label: 'Kitchen radio', serial: 'QW3-118', complaint: 'hums, no stations', jobStatus: 'intake', restorationLevel: 'repair' }),
    );
    req.flush(setDetail({ id: 44 }), { status: 201, statusText: 'Created' });
    await fixture.whenStable();
    expect(navigate).toHaveBeenCalledWith(['/sets', 44]);
  });
});
