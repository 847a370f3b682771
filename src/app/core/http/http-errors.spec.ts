import { HttpClient, provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatSnackBarHarness } from '@angular/material/snack-bar/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatSnackBar } from '@angular/material/snack-bar';
import { callerHandles } from '../errors/api-error';
import { httpErrors } from './http-errors';

/** A host for the harness loader: the snackbar lives in the overlay, outside any component. */
@Component({ selector: 'dm-placeholder', template: '' })
class Placeholder {}

describe('httpErrors interceptor', () => {
  let client: HttpClient;
  let http: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [provideHttpClient(withInterceptors([httpErrors])), provideHttpClientTesting()],
    });
    client = TestBed.inject(HttpClient);
    http = TestBed.inject(HttpTestingController);
  });

  afterEach(() => {
    http.verify();
    TestBed.inject(MatSnackBar).dismiss();
  });

  async function snackBars(): Promise<MatSnackBarHarness[]> {
    const fixture = TestBed.createComponent(Placeholder);
    return TestbedHarnessEnvironment.documentRootLoader(fixture).getAllHarnesses(MatSnackBarHarness);
  }

  it("shows the API's message when the caller does not handle the error, and still passes the error on", async () => {
    let failed = false;
    client.put('/api/admin/settings', {}).subscribe({ error: () => (failed = true) });
    http
      .expectOne('/api/admin/settings')
      .flush({ error: { code: 'conflict', message: 'Settings changed meanwhile.' } }, { status: 409, statusText: 'Conflict' });
    const bars = await snackBars();
    expect(bars.length).toBe(1);
    expect(await bars[0].getMessage()).toBe('Settings changed meanwhile.');
    expect(failed).toBeTrue();
  });

  it('stays quiet when the caller says it handles that status', async () => {
    let failed = false;
    client.post('/api/admin/users', {}, { context: callerHandles(400) }).subscribe({ error: () => (failed = true) });
    http
      .expectOne('/api/admin/users')
      .flush({ error: { code: 'invalid', message: 'Email taken.', details: { field: 'email' } } }, { status: 400, statusText: 'Bad Request' });
    expect((await snackBars()).length).toBe(0);
    expect(failed).toBeTrue();
  });

  it('still speaks for statuses the caller did not name', async () => {
    client.post('/api/admin/users', {}, { context: callerHandles(400) }).subscribe({ error: () => undefined });
    http.expectOne('/api/admin/users').flush(null, { status: 500, statusText: 'Server Error' });
    const bars = await snackBars();
    expect(bars.length).toBe(1);
    expect(await bars[0].getMessage()).toContain('server ran into a problem');
  });

  it('leaves 401s to the authToken interceptor and the sign-in flow', async () => {
    client.get('/api/me').subscribe({ error: () => undefined });
    http.expectOne('/api/me').flush(null, { status: 401, statusText: 'Unauthorized' });
    expect((await snackBars()).length).toBe(0);
  });
});
