import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { clearAuthStorage, nextRequest, nextTask, sessionFor } from '../../../testing/http-testing';
import { AUTH_CHANNEL, Auth, AuthMessage, REFRESH_LOCK, REFRESH_TOKEN_KEY, SessionEnded, USER_KEY } from './auth';

describe('Auth', () => {
  let auth: Auth;
  let http: HttpTestingController;
  let otherTab: BroadcastChannel;
  let heard: AuthMessage[];

  beforeEach(() => {
    clearAuthStorage();
    TestBed.configureTestingModule({
      providers: [
        provideRouter([{ path: 'sign-in', children: [] }, { path: 'home', children: [] }]),
        provideHttpClient(),
        provideHttpClientTesting(),
      ],
    });
    auth = TestBed.inject(Auth);
    http = TestBed.inject(HttpTestingController);
    heard = [];
    otherTab = new BroadcastChannel(AUTH_CHANNEL);
    otherTab.onmessage = (e: MessageEvent<AuthMessage>) => heard.push(e.data);
  });

  /** Waits until the other tab has heard `count` messages (delivery is asynchronous). */
  async function heardSoon(count: number): Promise<void> {
    for (let i = 0; i < 100 && heard.length < count; i++) await nextTask(10);
  }

  afterEach(() => {
    http.verify();
    otherTab.close();
    clearAuthStorage();
  });

  it('keeps the access token in memory only and the refresh token and user in localStorage', () => {
    auth.begin(sessionFor(['technician'], 1));
    expect(auth.accessToken()).toBe('access-1');
    expect(localStorage.getItem(REFRESH_TOKEN_KEY)).toBe('refresh-1');
    expect(JSON.parse(localStorage.getItem(USER_KEY) ?? 'null').name).toBe('Ada Voss');
    const stored = Object.keys(localStorage).map((k) => localStorage.getItem(k) ?? '');
    expect(stored.some((v) => v.includes('access-1'))).toBeFalse();
    expect(auth.signedIn()).toBeTrue();
    expect(auth.hasRole('technician')).toBeTrue();
    expect(auth.hasRole('admin')).toBeFalse();
  });

  it('restores the user after a reload from storage, without an access token', () => {
    auth.begin(sessionFor(['admin'], 1));
    TestBed.resetTestingModule();
    TestBed.configureTestingModule({ providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()] });
    const reloaded = TestBed.inject(Auth);
    http = TestBed.inject(HttpTestingController);
    expect(reloaded.user()?.email).toBe('ada.voss@example.org');
    expect(reloaded.hasRole('admin')).toBeTrue();
    expect(reloaded.accessToken()).toBeNull();
    expect(reloaded.hasRefreshToken()).toBeTrue();
  });

  it('shares one in-flight refresh among all callers of the tab', async () => {
    auth.begin(sessionFor(['technician'], 1));
    const first = firstValueFrom(auth.refresh());
    const second = firstValueFrom(auth.refresh());
    const req = await nextRequest(http, '/api/auth/refresh');
    expect(req.request.body).toEqual({ refreshToken: 'refresh-1' });
    req.flush(sessionFor(['technician'], 2));
    expect(await first).toBe('access-2');
    expect(await second).toBe('access-2');
    expect(localStorage.getItem(REFRESH_TOKEN_KEY)).toBe('refresh-2');
    // The refresh is over: the next caller starts a new one.
    const third = firstValueFrom(auth.refresh());
    (await nextRequest(http, '/api/auth/refresh')).flush(sessionFor(['technician'], 3));
    expect(await third).toBe('access-3');
  });

  it('tells the other tabs about the new tokens', async () => {
    auth.begin(sessionFor(['technician'], 1));
    await heardSoon(1);
    heard = [];
    const done = firstValueFrom(auth.refresh());
    (await nextRequest(http, '/api/auth/refresh')).flush(sessionFor(['technician'], 2));
    await done;
    await heardSoon(1);
    expect(heard).toEqual([{ type: 'session', session: sessionFor(['technician'], 2) }]);
  });

  it('uses the token another tab rotated while this tab waited for the lock, without refreshing again', async () => {
    auth.begin(sessionFor(['technician'], 1));
    let release!: () => void;
    let held!: () => void;
    const heldNow = new Promise<void>((r) => (held = r));
    // Another tab holds the refresh lock, rotates the token, broadcasts, then lets go.
    const otherTabsRefresh = navigator.locks.request(REFRESH_LOCK, () => {
      held();
      return new Promise<void>((r) => (release = r));
    });
    await heldNow;
    const mine = firstValueFrom(auth.refresh());
    await nextTask(20);
    http.expectNone('/api/auth/refresh');
    localStorage.setItem(REFRESH_TOKEN_KEY, 'refresh-9');
    otherTab.postMessage({ type: 'session', session: sessionFor(['technician'], 9) } satisfies AuthMessage);
    for (let i = 0; i < 50 && auth.accessToken() !== 'access-9'; i++) await nextTask(10);
    release();
    await otherTabsRefresh;
    expect(await mine).toBe('access-9');
    http.expectNone('/api/auth/refresh');
  });

  it('refreshes with the stored token when no other tab rotated it in the meantime', async () => {
    auth.begin(sessionFor(['technician'], 1));
    let release!: () => void;
    let held!: () => void;
    const heldNow = new Promise<void>((r) => (held = r));
    const otherTabsWork = navigator.locks.request(REFRESH_LOCK, () => {
      held();
      return new Promise<void>((r) => (release = r));
    });
    await heldNow;
    const mine = firstValueFrom(auth.refresh());
    release();
    await otherTabsWork;
    const req = await nextRequest(http, '/api/auth/refresh');
    expect(req.request.body).toEqual({ refreshToken: 'refresh-1' });
    req.flush(sessionFor(['technician'], 2));
    expect(await mine).toBe('access-2');
  });

  it('signs out to /sign-in with a notice when the server refuses the refresh token', async () => {
    auth.begin(sessionFor(['technician'], 1));
    const router = TestBed.inject(Router);
    await router.navigateByUrl('/home');
    const result = firstValueFrom(auth.refresh());
    (await nextRequest(http, '/api/auth/refresh')).flush(
      { error: { code: 'invalid-token', message: 'Refresh token expired.' } },
      { status: 401, statusText: 'Unauthorized' },
    );
    await expectAsync(result).toBeRejectedWithError(SessionEnded);
    expect(auth.signedIn()).toBeFalse();
    expect(localStorage.getItem(REFRESH_TOKEN_KEY)).toBeNull();
    expect(auth.notice()).toContain('Sign in again');
    await nextTask();
    expect(router.url).toBe('/sign-in?returnUrl=%2Fhome');
  });

  it('keeps the session when the refresh fails only because the server cannot be reached', async () => {
    auth.begin(sessionFor(['technician'], 1));
    const result = firstValueFrom(auth.refresh());
    (await nextRequest(http, '/api/auth/refresh')).error(new ProgressEvent('error'), { status: 0 });
    await expectAsync(result).toBeRejected();
    expect(auth.signedIn()).toBeTrue();
    expect(localStorage.getItem(REFRESH_TOKEN_KEY)).toBe('refresh-1');
  });

  it('signs out: revokes the refresh token, clears storage and tells the other tabs', async () => {
    auth.begin(sessionFor(['technician'], 1));
    await heardSoon(1);
    heard = [];
    auth.signOut();
    const req = http.expectOne('/api/auth/sign-out');
    expect(req.request.body).toEqual({ refreshToken: 'refresh-1' });
    req.flush(null, { status: 204, statusText: 'No Content' });
    expect(auth.user()).toBeNull();
    expect(auth.accessToken()).toBeNull();
    expect(localStorage.getItem(REFRESH_TOKEN_KEY)).toBeNull();
    await heardSoon(1);
    expect(heard).toEqual([{ type: 'signed-out' }]);
  });

  it('adopts a sign-out and a new session broadcast by another tab', async () => {
    otherTab.postMessage({ type: 'session', session: sessionFor(['admin'], 4) } satisfies AuthMessage);
    for (let i = 0; i < 50 && !auth.signedIn(); i++) await nextTask(10);
    expect(auth.user()?.roles).toEqual(['admin']);
    expect(auth.accessToken()).toBe('access-4');
    otherTab.postMessage({ type: 'signed-out' } satisfies AuthMessage);
    for (let i = 0; i < 50 && auth.signedIn(); i++) await nextTask(10);
    expect(auth.signedIn()).toBeFalse();
    expect(auth.accessToken()).toBeNull();
  });
});
