import { HttpClient, HttpErrorResponse } from '@angular/common/http';
import { DestroyRef, Injectable, computed, inject, signal } from '@angular/core';
import { Router } from '@angular/router';
import { Observable, defer, finalize, from, map, shareReplay } from 'rxjs';
import { callerHandles } from '../errors/api-error';
import { Role, Session, User } from './roles';

/** localStorage keys: the refresh token (shared by the tabs, survives a reload) and the user. */
export const REFRESH_TOKEN_KEY = 'driftmark.refreshToken';
export const USER_KEY = 'driftmark.user';
/** Cross-tab names: the Web Locks lock that serialises refreshes and the broadcast channel. */
export const REFRESH_LOCK = 'driftmark-refresh';
export const AUTH_CHANNEL = 'driftmark-auth';

/** What the tabs tell each other on AUTH_CHANNEL. */
export type AuthMessage = { readonly type: 'session'; readonly session: Session } | { readonly type: 'signed-out' };

/** The refresh failed for good (the server refused the refresh token, or it is gone). */
export class SessionEnded extends Error {
  constructor() {
    super('The session has ended.');
    this.name = 'SessionEnded';
  }
}

const EXPIRED_NOTICE = 'Your session has ended. Sign in again to continue.';
export const DEACTIVATED_NOTICE = 'This account has been deactivated. Ask an administrator if you think it should not be.';

/** The API's error code in an error response, if any. */
export function errorCodeOf(err: unknown): string | null {
  if (!(err instanceof HttpErrorResponse)) return null;
  const body = err.error as { error?: { code?: unknown } } | null;
  return typeof body?.error?.code === 'string' ? body.error.code : null;
}

/**
 * The signed-in session. The access token lives in memory only; the refresh token and the user
 * (not secret, lets a reload render at once, also offline) live in localStorage so that tabs share
 * them. Refresh is single-flight: one in-flight refresh per tab shared by every caller, and across
 * tabs a Web Lock; inside it the stored token is read again and, when another tab has already
 * rotated it, that tab's broadcast tokens are used instead of refreshing again.
 */
@Injectable({ providedIn: 'root' })
export class Auth {
  private readonly http = inject(HttpClient);
  private readonly router = inject(Router);

  private access: string | null = null;
  private inflight: Observable<string> | null = null;
  private readonly channel: BroadcastChannel | null =
    typeof BroadcastChannel === 'function' ? new BroadcastChannel(AUTH_CHANNEL) : null;

  private readonly current = signal<User | null>(readStoredUser());
  /** The signed-in user, or null. */
  readonly user = this.current.asReadonly();
  readonly signedIn = computed(() => this.current() !== null);
  readonly roles = computed<ReadonlySet<Role>>(() => new Set(this.current()?.roles ?? []));
  /** A message for the sign-in page (why the user landed there). */
  readonly notice = signal<string | null>(null);

  constructor() {
    if (this.channel) {
      this.channel.onmessage = (event: MessageEvent<AuthMessage>) => this.adoptMessage(event.data);
      inject(DestroyRef).onDestroy(() => this.channel?.close());
    }
    // A stored user without a refresh token is a half-written session: drop it.
    if (this.current() && !readStorage(REFRESH_TOKEN_KEY)) this.clear();
  }

  hasRole(...roles: Role[]): boolean {
    const held = this.roles();
    return roles.some((r) => held.has(r));
  }

  /** The access token in memory (null after a reload until the first refresh). */
  accessToken(): string | null {
    return this.access;
  }

  hasRefreshToken(): boolean {
    return readStorage(REFRESH_TOKEN_KEY) !== null;
  }

  /** POST /api/auth/sign-in; the caller shows 400/401/429 itself. */
  signIn(email: string, password: string): Observable<User> {
    return this.http
      .post<Session>('/api/auth/sign-in', { email, password }, { context: callerHandles() })
      .pipe(map((session) => this.begin(session)));
  }

  /** Starts a session from any answer that carries tokens and the user; tells the other tabs. */
  begin(session: Session): User {
    this.store(session);
    this.notice.set(null);
    this.post({ type: 'session', session });
    return session.user;
  }

  /**
   * A fresh access token. Every caller in this tab shares one in-flight refresh. Fails with
   * SessionEnded (after signing out to /sign-in with a notice) when the server refuses the refresh
   * token; a network failure keeps the session and just fails.
   */
  refresh(): Observable<string> {
    this.inflight ??= defer(() => from(this.refreshAcrossTabs())).pipe(
      finalize(() => (this.inflight = null)),
      shareReplay({ bufferSize: 1, refCount: false }),
    );
    return this.inflight;
  }

  /** Signs out here and in the other tabs, tells the server (best effort), goes to the landing page. */
  signOut(): void {
    this.revokeStoredToken();
    this.clear();
    this.post({ type: 'signed-out' });
    void this.router.navigateByUrl('/');
  }

  /** Ends the session after a refused refresh: to /sign-in with a notice and the way back. */
  endSession(message = EXPIRED_NOTICE): void {
    const returnUrl = this.router.url;
    this.clear();
    this.post({ type: 'signed-out' });
    this.notice.set(message);
    void this.router.navigate(['/sign-in'], {
      queryParams: returnUrl && returnUrl !== '/' && !returnUrl.startsWith('/sign-in') ? { returnUrl } : {},
    });
  }

  private async refreshAcrossTabs(): Promise<string> {
    const startedWith = readStorage(REFRESH_TOKEN_KEY);
    const accessAtStart = this.access;
    const locks = typeof navigator !== 'undefined' ? navigator.locks : undefined;
    const run = async (): Promise<string> => {
      const stored = readStorage(REFRESH_TOKEN_KEY);
      if (!stored) throw this.ended();
      // Another tab rotated the token while we waited and its broadcast reached us: use it.
      if (stored !== startedWith && this.access && this.access !== accessAtStart) return this.access;
      try {
        const session = await new Promise<Session>((resolve, reject) =>
          this.http
            .post<Session>('/api/auth/refresh', { refreshToken: stored }, { context: callerHandles() })
            .subscribe({ next: resolve, error: reject }),
        );
        this.begin(session);
        return session.accessToken;
      } catch (err: unknown) {
        if (err instanceof HttpErrorResponse && [400, 401, 403].includes(err.status)) {
          throw this.ended(errorCodeOf(err) === 'account-deactivated' ? DEACTIVATED_NOTICE : EXPIRED_NOTICE);
        }
        throw err;
      }
    };
    return locks ? locks.request(REFRESH_LOCK, run) : run();
  }

  private ended(message = EXPIRED_NOTICE): SessionEnded {
    this.endSession(message);
    return new SessionEnded();
  }

  private adoptMessage(message: AuthMessage): void {
    if (message.type === 'session') {
      this.access = message.session.accessToken;
      this.current.set(message.session.user);
    } else if (this.current() !== null || this.access !== null) {
      this.access = null;
      this.current.set(null);
      this.notice.set('You signed out in another tab.');
      void this.router.navigateByUrl('/sign-in');
    }
  }

  private store(session: Session): void {
    this.access = session.accessToken;
    writeStorage(REFRESH_TOKEN_KEY, session.refreshToken);
    writeStorage(USER_KEY, JSON.stringify(session.user));
    this.current.set(session.user);
  }

  private clear(): void {
    this.access = null;
    removeStorage(REFRESH_TOKEN_KEY);
    removeStorage(USER_KEY);
    this.current.set(null);
  }

  private revokeStoredToken(): void {
    const refreshToken = readStorage(REFRESH_TOKEN_KEY);
    if (!refreshToken) return;
    this.http
      .post('/api/auth/sign-out', { refreshToken }, { context: callerHandles() })
      .subscribe({ error: () => undefined });
  }

  private post(message: AuthMessage): void {
    this.channel?.postMessage(message);
  }
}

function readStoredUser(): User | null {
  const raw = readStorage(USER_KEY);
  if (!raw) return null;
  try {
    const user = JSON.parse(raw) as Partial<User>;
    return typeof user.email === 'string' && Array.isArray(user.roles) ? (user as User) : null;
  } catch {
    return null;
  }
}

function readStorage(key: string): string | null {
  try {
    return globalThis.localStorage?.getItem(key) ?? null;
  } catch {
    return null;
  }
}

function writeStorage(key: string, value: string): void {
  try {
    globalThis.localStorage?.setItem(key, value);
  } catch {
    // Storage refused (private mode, quota): the session lasts as long as this tab.
  }
}

function removeStorage(key: string): void {
  try {
    globalThis.localStorage?.removeItem(key);
  } catch {
    // Nothing stored that we could remove.
  }
}
