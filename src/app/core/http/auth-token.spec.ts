import { HttpClient, provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { clearAuthStorage, nextRequest, sessionFor } from '../../../testing/http-testing';
import { Auth } from '../auth/auth';
import { authToken, needsBearer } from './auth-token';

describe('needsBearer', () => {
  it('is true for our own API paths and false for the token-less auth ones and other origins', () => {
    expect(needsBearer('/api/me')).toBeTrue();
    expect(needsBearer('/api/admin/users?page=1')).toBeTrue();
    expect(needsBearer(`${location.origin}/api/me`)).toBeTrue();
    expect(needsBearer('/api/auth/sign-in')).toBeFalse();
    expect(needsBearer('/api/auth/refresh')).toBeFalse();
    expect(needsBearer('/api/settings/public')).toBeFalse();
    expect(needsBearer('/index.html')).toBeFalse();
    expect(needsBearer('https://elsewhere.example.org/api/me')).toBeFalse();
  });
});

describe('authToken interceptor', () => {
  let client: HttpClient;
  let http: HttpTestingController;
  let auth: Auth;

  beforeEach(() => {
    clearAuthStorage();
    TestBed.configureTestingModule({
      providers: [
        provideRouter([{ path: 'sign-in', children: [] }]),
        provideHttpClient(withInterceptors([authToken])),
        provideHttpClientTesting(),
      ],
    });
    client = TestBed.inject(HttpClient);
    http = TestBed.inject(HttpTestingController);
    auth = TestBed.inject(Auth);
  });

  afterEach(() => {
    http.verify();
    clearAuthStorage();
  });

  it('adds the bearer token to /api/ requests', async () => {
    auth.begin(sessionFor(['technician'], 1));
    const answer = firstValueFrom(client.get('/api/me'));
    const req = http.expectOne('/api/me');
    expect(req.request.headers.get('Authorization')).toBe('Bearer access-1');
    req.flush({ id: 7 });
    expect(await answer).toEqual({ id: 7 });
  });

  it('sends no token to the token-less auth endpoints', () => {
    auth.begin(sessionFor(['technician'], 1));
    client.post('/api/auth/sign-in', {}).subscribe();
    const req = http.expectOne('/api/auth/sign-in');
    expect(req.request.headers.has('Authorization')).toBeFalse();
    req.flush({});
  });

  it('on a 401 refreshes once and retries with the new token', async () => {
    auth.begin(sessionFor(['technician'], 1));
    const answer = firstValueFrom(client.get('/api/me'));
    http.expectOne('/api/me').flush({ error: { code: 'unauthorized', message: 'Token expired.' } }, { status: 401, statusText: 'Unauthorized' });
    (await nextRequest(http, '/api/auth/refresh')).flush(sessionFor(['technician'], 2));
    const retry = await nextRequest(http, '/api/me');
    expect(retry.request.headers.get('Authorization')).toBe('Bearer access-2');
    retry.flush({ id: 7 });
    expect(await answer).toEqual({ id: 7 });
  });

  it('does not refresh again when the retried request is refused too', async () => {
    auth.begin(sessionFor(['technician'], 1));
    const answer = firstValueFrom(client.get('/api/me'));
    http.expectOne('/api/me').flush(null, { status: 401, statusText: 'Unauthorized' });
    (await nextRequest(http, '/api/auth/refresh')).flush(sessionFor(['technician'], 2));
    (await nextRequest(http, '/api/me')).flush(null, { status: 401, statusText: 'Unauthorized' });
    await expectAsync(answer).toBeRejected();
    http.expectNone('/api/auth/refresh');
  });

  it('passes other errors through without refreshing', async () => {
    auth.begin(sessionFor(['technician'], 1));
    const answer = firstValueFrom(client.get('/api/admin/users'));
    http.expectOne('/api/admin/users').flush(null, { status: 403, statusText: 'Forbidden' });
    await expectAsync(answer).toBeRejected();
    http.expectNone('/api/auth/refresh');
  });

  it('after a reload (no access token yet) refreshes first, then sends the request', async () => {
    auth.begin(sessionFor(['technician'], 1));
    TestBed.resetTestingModule();
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(withInterceptors([authToken])), provideHttpClientTesting()],
    });
    client = TestBed.inject(HttpClient);
    http = TestBed.inject(HttpTestingController);
    const answer = firstValueFrom(client.get('/api/me'));
    http.expectNone('/api/me');
    (await nextRequest(http, '/api/auth/refresh')).flush(sessionFor(['technician'], 2));
    const req = await nextRequest(http, '/api/me');
    expect(req.request.headers.get('Authorization')).toBe('Bearer access-2');
    req.flush({ id: 7 });
    expect(await answer).toEqual({ id: 7 });
  });

  it('sends no token at all when nobody is signed in', () => {
    client.get('/api/me').subscribe({ error: () => undefined });
    const req = http.expectOne('/api/me');
    expect(req.request.headers.has('Authorization')).toBeFalse();
    req.flush(null, { status: 401, statusText: 'Unauthorized' });
    http.expectNone('/api/auth/refresh');
  });

  it('signs out when the refresh is refused after a 401', async () => {
    auth.begin(sessionFor(['technician'], 1));
    const answer = firstValueFrom(client.get('/api/me'));
    http.expectOne('/api/me').flush(null, { status: 401, statusText: 'Unauthorized' });
    (await nextRequest(http, '/api/auth/refresh')).flush(
      { error: { code: 'invalid-token', message: 'Refresh token revoked.' } },
      { status: 401, statusText: 'Unauthorized' },
    );
    await expectAsync(answer).toBeRejected();
    expect(auth.signedIn()).toBeFalse();
    expect(auth.notice()).not.toBeNull();
  });
});
